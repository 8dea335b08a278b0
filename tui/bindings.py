"""Bindings the review and adjudication screens share.

One keymap file remaps both screens by binding id, so the ids and default keys they have in
common are declared once, here.
"""

from __future__ import annotations

from textual.binding import Binding


def history(what: str) -> list[Binding]:
    """[ and ] through the user's own ``what`` (decisions, adjudications): one key-bar entry."""
    group = Binding.Group("history")
    return [
        Binding("left_square_bracket", "back", "back", key_display="[", id="history-back",
                group=group, tooltip=f"step back through your {what} (decide again to change one)"),
        Binding("right_square_bracket", "forward", "fwd", key_display="]",
                id="history-forward", group=group,
                tooltip="step forward again, back to the queue"),
    ]


HELP = Binding("question_mark", "help", "help", key_display="?", id="help", tooltip="this help")
QUIT = Binding("q", "quit", "quit", id="quit", tooltip="quit (everything is already saved)")
EXTRA_COLUMNS = Binding("x", "extra", "columns", id="extra-columns",
                        tooltip="show or hide the columns that are not compared")
FULL_VALUES = Binding("w", "full_values", "full values", id="full-values",
                      tooltip="show in full the values shortened with … to fit (the card may "
                              "then scroll), or shorten them again")
REDRAW = Binding("ctrl+l", "redraw", "redraw", show=False, id="redraw",
                 tooltip="paint the screen again")
