"""What the adjudicator's screens share: the app they run in, help, back and quit."""

from __future__ import annotations

from typing import TYPE_CHECKING, ClassVar, cast

from textual.binding import Binding
from textual.screen import Screen

from .help import key_rows
from .team_help import TeamHelp

if TYPE_CHECKING:
    from ..hosts import TeamHost


class TeamScreen(Screen[None]):
    """A screen of the adjudicator's app. ``HELP`` is the text its help screen ends with."""

    HELP: ClassVar[str] = ""

    @property
    def team_app(self) -> TeamHost:
        return cast("TeamHost", self.app)

    def action_help(self) -> None:
        app = self.team_app
        rows = key_rows(self, app.get_key_display, app.keymap.keymap)
        if self.check_action("back", ()) is False:  # opened alone from the shell: no way back,
            back = {b.id for b in self.BINDINGS  # and help listed 'esc back' all the same
                    if isinstance(b, Binding) and b.action == "back"}
            rows = [r for r in rows if r.binding_id not in back]
        self.app.push_screen(TeamHelp(rows, app.keymap.path, app.keymap.problems, self.HELP,
                                      app.mask.columns))

    def action_back(self) -> None:
        if len(self.app.screen_stack) > 2:  # never the last screen: a blank one is under it
            self.app.pop_screen()

    def action_quit(self) -> None:
        self.app.exit()
