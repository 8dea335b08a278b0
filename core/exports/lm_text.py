"""Pairs as text for a language model: one template, the user's or ours, filled in per pair.

A template is plain UTF-8 text with three placeholders, in Python's ``string.Template``
syntax: ``$first`` and ``$second`` (the two records — left and right in link mode — each as
``field: value; field: value``, under docket's field names and in the same order) and
``$fields`` (the field names, comma-separated). ``$$`` is a literal dollar sign; ``${first}``
may be written where a letter follows. Every other ``$name`` is refused, naming the file, so
a typing slip never reaches a model unnoticed.

What a record holds depends on what is exported: ``scores`` gives every candidate pair with
the model's probability (text to label); ``gold`` every gold pair with its label and how it
was reached (text to measure a model against); ``training`` the gold pairs with the
train/test split (text to fine-tune on).
"""

from __future__ import annotations

import re
import string
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from ..errors import DocketError

PLACEHOLDERS = ("first", "second", "fields")
MISSING = "(missing)"
DEFAULT_TEMPLATE = """\
Below are two entries, field by field, taken from record registers that may hold the same \
person or thing more than once. Fields compared: $fields.

First entry: $first
Second entry: $second

Are these two entries about one and the same person or thing? Small differences in spelling, \
formatting or missing values are common in such registers. Reply with exactly one word: \
match (the same) or non-match (different).
"""


def clean(value: object) -> str:
    """A value on one line: whitespace runs collapsed, nothing (or NaN) as ``(missing)``."""
    if value is None or (isinstance(value, float) and value != value):
        return MISSING
    text = re.sub(r"\s+", " ", str(value)).strip()
    return text or MISSING


def serialise_record(names: Sequence[str], values: Sequence[object]) -> str:
    """``owner: Anna Berg; pet: Bixsy; …``: the same names, in the same order, for both."""
    return "; ".join(f"{n}: {clean(v)}" for n, v in zip(names, values, strict=True))


MAX_TEMPLATE_BYTES = 1_000_000  # a prompt's wording; its records come in through $first


@dataclass(frozen=True)
class LmTemplate:
    text: str
    source: str = "docket's default"

    @classmethod
    def load(cls, path: str | Path | None) -> LmTemplate:
        """The user's template file, checked; or the default when ``path`` is None."""
        if path is None:
            return cls(DEFAULT_TEMPLATE)
        path = Path(path)
        try:
            with path.open("rb") as f:  # at most a little more than a template holds:
                raw = f.read(MAX_TEMPLATE_BYTES + 1)  # /dev/zero was read until memory ran out
            if len(raw) > MAX_TEMPLATE_BYTES:
                raise DocketError(f"{path}: over {MAX_TEMPLATE_BYTES // 1_000_000} MB, too "
                                  "long for a template (a data file given by mistake?); give "
                                  "a text with $first and $second")
            text = raw.decode("utf-8-sig")
        except FileNotFoundError:
            raise DocketError(f"{path}: no such template file; check the path") from None
        except UnicodeDecodeError:
            raise DocketError(f"{path}: not UTF-8 text; save the template as UTF-8") from None
        except OSError as exc:
            raise DocketError(f"{path}: cannot be read ({exc.strerror})") from None
        return cls.checked(text, str(path))

    @classmethod
    def checked(cls, text: str, source: str) -> LmTemplate:
        template = string.Template(text)
        if not template.is_valid():
            raise DocketError(f"{source}: a '$' that starts no placeholder; write $$ for a "
                              "dollar sign, or use $first, $second, $fields")
        unknown = [n for n in template.get_identifiers() if n not in PLACEHOLDERS]
        if unknown:
            raise DocketError(f"{source}: unknown placeholder ${unknown[0]}; the template "
                              "may use $first, $second and $fields ($$ for a dollar sign)")
        used = set(template.get_identifiers())
        if not {"first", "second"} <= used:
            lacking = [f"${n}" for n in ("first", "second") if n not in used]
            raise DocketError(f"{source}: the template lacks {' and '.join(lacking)}; a model "
                              "must be shown both records")
        return cls(text, source)

    def fill(self, names: Sequence[str], first: Sequence[object],
             second: Sequence[object]) -> str:
        return string.Template(self.text).substitute(
            first=serialise_record(names, first), second=serialise_record(names, second),
            fields=", ".join(names))
