"""The reason an adjudicator gives for a final label: asked for after the decision key."""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from .. import literal

REASON_LIMIT = 500
HINT = "Enter saves the adjudication · Escape cancels (nothing is written)"
EMPTY = "A reason is needed: say in a few words why this label. Escape cancels."


def placeholder(fields: tuple[str, ...]) -> str:
    """An example reason in the project's own terms: 'same phone and pet, new address' was
    the sample's, and read oddly on two shops' product listings."""
    if not fields:
        return "why this label, e.g. which fields decided it"
    # column names as shown everywhere else: control characters made visible
    named = ", ".join(literal.one_line(f, 24).plain for f in fields[:3])
    return f"why this label, e.g. what in {named}{', ...' if len(fields) > 3 else ''} decided it"


class ReasonScreen(ModalScreen[str | None]):
    """Returns the reason (never empty) on Enter, or None on Escape."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "cancel", id="reason-cancel",
                tooltip="write nothing and go back to the pair")]

    def __init__(self, pair_id: int, label: str, fields: tuple[str, ...] = ()) -> None:
        super().__init__()
        self.pair_id = pair_id
        self.label = label
        self.fields = fields  # the compared fields, named in the example of a reason

    def compose(self) -> ComposeResult:
        with Vertical(id="reason-box") as box:
            box.border_title = Text(f"final label for pair {self.pair_id}: {self.label}")
            yield Input(placeholder=placeholder(self.fields), max_length=REASON_LIMIT,
                        id="reason-input")
            yield Static(Text(HINT), id="reason-hint")

    def on_mount(self) -> None:
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        reason = event.value.strip()
        if not reason:
            hint = self.query_one("#reason-hint", Static)
            hint.update(Text(EMPTY))
            hint.add_class("-refused")
            return
        self.dismiss(reason)

    def action_cancel(self) -> None:
        self.dismiss(None)
