"""``?`` on the adjudication, agreement and quality screens: their keys and how they work.

The layout is the review help's; only the paragraph on how the screen works differs (review is
blind, adjudication is not).
"""

from __future__ import annotations

from collections.abc import Collection
from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from .help import HelpScreen, KeyRow

ADJUDICATION = (
    "Each pair here waits for a final label: its reviewers disagree, one held it, or a chain "
    "of gold matches contradicts a gold non-match. Every reviewer's label, note and time on "
    "the pair (0:00 for labels read from a file) is shown beside the card; when they are "
    "more than it holds, it scrolls (Tab moves to it, then the arrow keys). Decide with the "
    "review keys, then give a short reason: the adjudication is saved with it at once, and "
    "the pair becomes gold (a hold leaves it waiting). Escape in the reason box writes "
    "nothing. Undo adds a retraction to the log; nothing is deleted. Only adjudicators may "
    "open this screen."
)
AGREEMENT = (
    "Cohen's kappa for every two reviewers with pairs in common, with its 95 % confidence "
    "interval, the number of pairs it rests on and the Landis & Koch band. Enter on a cell "
    "lists that reviewer pair's disagreements; Enter on one shows the pair with both labels "
    "and notes. By default a hold is no rating; the holds key counts it as a third category."
)
QUALITY = (
    "Precision, recall and F1 of the model, estimated from the audit slice with design-based "
    "weights and 95 % intervals, with the naive figure from all gold labels beside them, "
    "marked biased. Recall is within the candidate pairs. The plots show the score by gold "
    "label and the precision-recall curve; the clusters tab lists the conflicts, clusters of "
    "gold matches that hold a gold non-match (Enter shows the members)."
)


class TeamHelp(HelpScreen):
    """The review help's layout with a paragraph of this screen's own."""

    def __init__(self, rows: list[KeyRow], keymap_file: Path, problems: list[str],
                 how: str, masked: Collection[str] = ()) -> None:
        super().__init__(rows, keymap_file, problems, masked)
        self.how = how

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-box") as box:
            box.border_title = "help"
            box.border_subtitle = "esc closes"
            yield Static(self._caution(), id="help-caution")
            yield Static(self._keys(), id="help-keys")
            yield Static(Text(self.how), id="help-how")
            yield Static(self._keymap(), id="help-keymap")
