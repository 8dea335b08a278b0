"""``?``: the keys of the review screen, built from its live bindings, and a caution."""

from __future__ import annotations

from collections.abc import Callable, Collection
from dataclasses import dataclass, replace
from pathlib import Path
from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.screen import ModalScreen, Screen
from textual.widgets import Static

# Masking was the one caution of 'docket new' missing here, where a reviewer may need it
CAUTION = (
    "Records may be personal data. Keep the project file private: it holds every record and "
    "every decision; never copy it to shared places, and delete copies you no longer need. "
    "Show reviewers only what they need (--mask). Decisions here can merge people's records: "
    "when you cannot tell, hold the pair. Follow your local data-protection law and your "
    "organisation's policy."
)

HOW = (
    "Every decision is saved the moment you make it; quitting loses nothing, and reopening "
    "resumes your queue. Review is blind: other reviewers' labels are never shown. A note is "
    "saved the moment you write it and goes with your decision on the pair. Changing a "
    "past decision, or undoing one, adds to the log; nothing is deleted. When the pair card is "
    "taller than the screen, the arrow keys and Page Up / Page Down scroll it. While the model "
    "is refit in the background (\"refitting\"), go on deciding."
)


@dataclass(frozen=True)
class KeyRow:
    keys: str
    description: str
    binding_id: str
    tooltip: str


def key_rows(screen: Screen, key_display: Callable[[Binding], str],
             keymap: dict[str, str]) -> list[KeyRow]:
    """One row per binding of ``screen`` itself, keys as live now (after the keymap).

    Bindings switched off at the moment (such as "back to the queue" while in the queue) are
    not among the live ones; they are listed from the class with their remapped keys.
    """
    own = {b.id for b in type(screen).BINDINGS if isinstance(b, Binding) and b.id}
    rows: dict[str, KeyRow] = {}
    for active in screen.active_bindings.values():
        binding: Binding = active.binding
        if binding.id not in own or not binding.description:
            continue
        bid = binding.id or binding.action
        shown = key_display(binding)
        if bid in rows:
            old = rows[bid]
            rows[bid] = KeyRow(f"{old.keys} {shown}", old.description, bid, old.tooltip)
        else:
            rows[bid] = KeyRow(shown, binding.description, bid, binding.tooltip)
    for binding in type(screen).BINDINGS:
        if not isinstance(binding, Binding) or not binding.id or binding.id in rows:
            continue
        keys = keymap.get(binding.id, binding.key)
        shown = " ".join(key_display(replace(binding, key=k)) for k in keys.split(","))
        rows[binding.id] = KeyRow(shown, binding.description, binding.id, binding.tooltip)
    order = [b.id for b in type(screen).BINDINGS if isinstance(b, Binding)]
    return sorted(rows.values(), key=lambda r: order.index(r.binding_id)
                  if r.binding_id in order else len(order))


class HelpScreen(ModalScreen[None]):
    """Keys, what they do and their ids (for the keymap file), then the caution."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "close", id="help-close"),
        Binding("question_mark", "close", "close", show=False, id="help-close-again"),
        Binding("q", "close", "close", show=False, id="help-close-q"),
    ]

    def __init__(self, rows: list[KeyRow], keymap_file: Path, problems: list[str],
                 masked: Collection[str] = ()) -> None:
        super().__init__()
        self.rows = rows
        self.keymap_file = keymap_file
        self.problems = problems
        self.masked = sorted(masked)

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-box") as box:
            box.border_title = "help"
            box.border_subtitle = "esc closes"
            yield Static(self._caution(), id="help-caution")
            yield Static(self._keys(), id="help-keys")
            yield Static(Text(HOW), id="help-how")
            yield Static(self._keymap(), id="help-keymap")

    def _caution(self) -> Text:
        """The caution, and the columns masked on this screen: nothing on screen named them,
        and a reviewer could take '01•• ••• ••69' for a damaged value."""
        text = Text(CAUTION, style="bold")
        if self.masked:
            text.append(f"\nMasked here: {', '.join(self.masked)} (• hides their characters; "
                        "find never searches them).", style="not bold")
        return text

    def _keys(self) -> Table:
        # a grid, so that a long explanation wraps under itself, not under the keys
        grid = Table.grid(padding=(0, 1))
        grid.add_column(no_wrap=True, style="bold", min_width=4)
        # a cell wider than the longest name ('full values'): at its width, one space apart,
        # the row read as one sentence, 'full values show in full the values...'
        grid.add_column(no_wrap=True, min_width=12)
        grid.add_column()
        for row in self.rows:
            grid.add_row(Text(row.keys), Text(row.description), Text(row.tooltip or ""))
        return grid

    def _keymap(self) -> Text:
        text = Text("Remap keys in ")
        text.append(str(self.keymap_file), "bold")
        # the example without spaces, which TOML allows: wrapped at its spaces, 'match =' ended
        # one line and '"m"' began the next (on a line of its own, it pushed the last line of
        # ids below a 120x40 help box). It names one of this screen's ids: the quality
        # screen's help gave 'match', an id it does not have.
        ids = [r.binding_id for r in self.rows]
        example = "match" if "match" in ids or not ids else ids[0]
        text.append(f", one line per binding id, for example  {example}=\"m\"\n")
        text.append("ids: " + ", ".join(r.binding_id for r in self.rows))
        for problem in self.problems:
            text.append("\n" + problem, "italic")
        return text

    def action_close(self) -> None:
        self.dismiss(None)
