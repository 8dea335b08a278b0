"""Toasts that do not pile up: a message already on screen is not shown a second time.

Pressing a key that has nothing to do (back at the first decision, forward at the newest pair)
again and again stacked one toast per press over the pair card.
"""

from __future__ import annotations

import time

from textual.app import App
from textual.notifications import SeverityLevel


class OneToastEach(App[None]):
    """An App whose ``notify`` skips a message (same text, title and severity) that still shows."""

    def notify(self, message: str, *, title: str = "", severity: SeverityLevel = "information",
               timeout: float | None = None, markup: bool = True) -> None:
        shown: dict[tuple[str, str, str], float] = self.__dict__.setdefault("_toasts_until", {})
        key = (message, title, severity)
        now = time.monotonic()
        if shown.get(key, 0.0) > now:
            return
        shown[key] = now + (self.NOTIFICATION_TIMEOUT if timeout is None else timeout)
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=markup)
