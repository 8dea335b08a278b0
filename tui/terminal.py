"""The one door between the command line and the terminal: nothing printed acts on it.

Every ``docket`` command runs with standard output and standard error behind ``SafeStream``:
each character a terminal could act on (ESC and the OSC/CSI sequences it starts, BEL, NUL, a
bare CR that would overwrite the line, C1 controls, BiDi overrides...) is written as the
same visible stand-in the screens use (``\\x1b``, ``⟨U+202E⟩``), whatever printed it: a table
of reviewer names, a record id in an error message, a warning, argparse's usage line. Only
the newline that ends a line passes as it is. JSON output is escaped inside its strings
instead (``json_text``), so it stays valid and exact. Data written to ``-`` by ``export``
goes to the binary stream beneath (``raw_bytes``) when that is not a terminal: a pipe gets
the exact bytes.
"""

from __future__ import annotations

import io
import json
import re
import sys
from collections.abc import Iterator
from contextlib import contextmanager, suppress
from typing import Any, TextIO

from .characters import stand_in


def shown(value: object) -> str:
    """``value`` as text with every unsafe character, newline included, made visible."""
    text = str(value)
    if text.isprintable():
        return text
    return "".join(stand_in(c) or c for c in text)


LONGEST_WORD = 200  # characters without a space that a message shows whole (a long path fits)
LONGEST_MESSAGE = 2000


def said(value: object) -> str:
    """An error or warning as one line a person can read: ``shown``, with a value of more than
    ``LONGEST_WORD`` characters without a space cut to its start and its length, and a longer
    line to its start and its end, which say where and what to do. A 1 MB cell in a refused
    file was quoted whole: one line of two megabytes."""
    text = re.sub(rf"\S{{{LONGEST_WORD + 1},}}",
                  lambda m: f"{m[0][:LONGEST_WORD // 2]}…({len(m[0]):,} characters)",
                  shown(value))
    if len(text) <= LONGEST_MESSAGE:
        return text
    cut = len(text) - LONGEST_MESSAGE
    return f"{text[:LONGEST_MESSAGE * 2 // 3]} …({cut:,} characters)… " \
           f"{text[-(LONGEST_MESSAGE // 3):]}"


def padded(value: object, width: int) -> str:
    """``shown(value)`` with spaces after it to ``width`` terminal cells. Padding counted
    characters: a CJK id (two cells a character) or a Thai one (its vowel marks take none)
    pushed every column after it out of line."""
    from rich.cells import cell_len  # the width of each character as a terminal draws it

    text = shown(value)
    return text + " " * max(0, width - cell_len(text))


def _line_safe(text: str) -> str:
    if text.replace("\n", "").isprintable():
        return text
    return "".join(c if c == "\n" else (stand_in(c) or c) for c in text)


class SafeStream(io.TextIOBase):
    """A text stream that writes through ``_line_safe`` to the stream it wraps."""

    def __init__(self, inner: TextIO, name: str = "standard output") -> None:
        super().__init__()
        self.inner = inner
        self.name = name

    def write(self, text: str) -> int:
        with self._reported():
            self.inner.write(_line_safe(text))
        return len(text)

    def flush(self) -> None:
        with self._reported():
            self.inner.flush()

    @contextmanager
    def _reported(self) -> Iterator[None]:
        # 'docket status > file' on a full disk ended in a traceback
        try:
            yield
        except BrokenPipeError:
            raise  # the reader stopped reading: the command ends quietly
        except OSError as exc:
            from docket.core import DocketError, output_cut_short
            raise DocketError(output_cut_short(exc, self.name)) from None

    def isatty(self) -> bool:
        return self.inner.isatty()

    def fileno(self) -> int:
        return self.inner.fileno()

    def writable(self) -> bool:
        return True

    @property
    def encoding(self) -> str:  # type: ignore[override]
        return getattr(self.inner, "encoding", "utf-8")

    @property
    def buffer(self) -> Any:
        return self.inner.buffer


@contextmanager
def safe_streams() -> Iterator[None]:
    """Put standard output and error behind ``SafeStream`` for the length of a command."""
    saved = sys.stdout, sys.stderr
    # a closed standard error ('2>&-') is None: its few lines are kept nowhere, the exit
    # code stands
    sys.stdout, sys.stderr = (SafeStream(saved[0]),  # type: ignore[assignment]
                              SafeStream(saved[1] or io.StringIO(), "standard error"))
    try:
        yield
    finally:
        for stream in (sys.stdout, sys.stderr):
            with suppress(Exception):  # reported by the command, or nowhere left to say it
                stream.flush()
        sys.stdout, sys.stderr = saved


def output_closed() -> bool:
    """Whether standard output is closed ('docket status >&-'), which Python gives as None:
    every print then ended in a traceback, after the command's work was done."""
    return sys.stdout is None


def unwrapped(stream: Any) -> Any:
    """The stream a ``SafeStream`` wraps (for drawing our own progress bars); else ``stream``."""
    return stream.inner if isinstance(stream, SafeStream) else stream



def _json_escape(char: str) -> str:
    code = ord(char)
    if code <= 0xFFFF:
        return f"\\u{code:04x}"
    code -= 0x10000
    return f"\\u{0xD800 + (code >> 10):04x}\\u{0xDC00 + (code & 0x3FF):04x}"


def json_text(value: Any, indent: int | None = 2) -> str:
    """JSON of ``value`` with readable non-ASCII text but every unsafe character escaped.

    ``json.dumps`` already escapes C0 controls; C1 controls, DEL and format characters
    (BiDi overrides, zero-width characters, line separators) become ``\\uXXXX`` here. They
    can only sit inside strings, so the document keeps its meaning exactly.
    """
    text = json.dumps(value, indent=indent, ensure_ascii=False)
    if text.replace("\n", "").isprintable():
        return text
    return "".join(_json_escape(c) if c != "\n" and stand_in(c) else c for c in text)


def need_terminal(command: str) -> None:
    """Refuse to open a screen without a terminal on standard input and output: from a pipe,
    /dev/null or a job with no terminal, the screen got no key, so it never ended, and spun a
    core meanwhile. Checked before anything is written."""
    if not (sys.stdin is not None and sys.stdin.isatty() and sys.stdout.isatty()):
        from docket.core import DocketError
        raise DocketError(f"{command} opens a screen, which needs a terminal for its "
                          "keys and display (standard input and output are not one); run it "
                          "in a terminal, or script with docket next, label and export")
