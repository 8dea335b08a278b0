"""Quitting a screen leaves no stale frame where the terminal has no alternate screen."""

from __future__ import annotations

from typing import Any

from textual.driver import Driver
from textual.drivers.linux_driver import LinuxDriver

from docket.tui.review_app import ReviewApp
from docket.tui.screen_exit import CLEAR, clearing
from docket.tui.team_app import TeamApp


class Recording(Driver):
    def __init__(self, *args: Any, **kwargs: Any) -> None:
        self.written: list[str] = []

    def write(self, data: str) -> None:
        self.written.append(data)

    def start_application_mode(self) -> None:
        pass

    def disable_input(self) -> None:
        pass

    def stop_application_mode(self) -> None:
        self.written.append("\x1b[?1049l")  # what a real driver does: leave the alternate screen


def test_the_display_is_cleared_before_the_terminal_is_handed_back() -> None:
    driver = clearing(Recording)()
    driver.stop_application_mode()
    # cleared while still in application mode: on the alternate screen when there is one
    assert driver.written == [CLEAR, "\x1b[?1049l"]


def test_both_apps_use_the_clearing_driver() -> None:
    for app_class in (ReviewApp, TeamApp):
        chosen = app_class.get_driver_class(object.__new__(app_class))
        assert issubclass(chosen, LinuxDriver) and chosen.__name__.startswith("Clearing")
