"""Errors the user can fix. Front ends print the message as one line and exit with code 2."""


class DocketError(Exception):
    """A problem with the user's input or project file, with a message that says what to do."""

    exit_code = 2


class NotAProject(DocketError):
    pass


class Interrupted(KeyboardInterrupt):
    """A Ctrl-C after work that stands: the message says what was kept and what was not."""


class Cancelled(Exception):
    """Long work stopped because the caller set its cancel event."""
