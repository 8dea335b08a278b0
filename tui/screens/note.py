"""``e``: write a note on the pair on screen."""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from .. import literal

NOTE_LIMIT = 2000


class NoteScreen(ModalScreen[str | None]):
    """Returns the note text on Enter, or None on Escape (nothing changes)."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "cancel", id="note-cancel")]

    def __init__(self, pair_id: int, initial: str, decided: bool) -> None:
        super().__init__()
        self.pair_id = pair_id
        # A stored note holding control characters is offered in its visible form, so
        # editing it never puts raw escapes on the screen.
        self.initial = literal.visible(initial)
        self.decided = decided

    def compose(self) -> ComposeResult:
        with Vertical(id="note-box") as box:
            box.border_title = f"note on pair {self.pair_id}"
            yield Input(self.initial, placeholder="why you decided as you did",
                        max_length=NOTE_LIMIT, id="note-input")
            when = ("saved now, with your current label" if self.decided else
                    "saved now, and goes with your decision on this pair")
            yield Static(Text(f"Enter saves ({when}) · Escape cancels"), id="note-hint")

    def on_mount(self) -> None:
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.dismiss(event.value.strip())

    def action_cancel(self) -> None:
        self.dismiss(None)
