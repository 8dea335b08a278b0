"""Where column names say nothing ('c5', 'col_3'), the fields of one home found by the shape of
their values.

:mod:`together` finds the fields that say where a record lives by their names. An export
without a header, or one whose columns were numbered, leaves it nothing to go on, and the
model then counts street, town, postcode and phone as four agreements for two people of one
home. So, only when every compared column's name is of that blank kind, the values decide: a
street is a number beside a word ('207 nandgos road', 'hauptstrasse 5'), a postcode one or two
short tokens holding a digit, a landline nine to fifteen digits, a town a few alphabetic words
that many records share. A street must be among them, or nothing is grouped: a street is what
makes the others a home rather than a catalogue's brand or a code.
"""

from __future__ import annotations

import re

import numpy as np

from ..types import FieldSpec

# 'c5', 'col_3', 'Column 7', 'field12', 'V4', 'x1', 'Unnamed: 3', or a bare number
_BLANK_NAME = re.compile(r"^(c|col|column|field|f|v|var|x|attr|unnamed:?)?[\s_\-.]*\d+$", re.I)
SAMPLE = 2000  # values looked at per field: shapes show in a few thousand
_STREET = re.compile(r"^(?=.*\b\d+[a-z]?\b)(?=.*\b[a-z]{3,}\b)\S+(\s+\S+){1,5}$")
_POSTCODE = re.compile(r"^(?=[a-z0-9 ]{4,8}$)(?=.*\d)[a-z0-9]+( [a-z0-9]+)?$")
_PHONE = re.compile(r"^\d{9,15}$")
_DIGITS = re.compile(r"^[\d\s]+$")
_TOWN = re.compile(r"^[a-z][a-z'\-]*( [a-z][a-z'\-]*){0,2}$")


def blank_names(fields: list[FieldSpec]) -> bool:
    """Whether no compared column's name says what it holds."""
    return bool(fields) and all(_BLANK_NAME.match(f.name.strip()) for f in fields)


def _sample(values: np.ndarray) -> list[str]:
    present = [v for v in values.tolist() if v is not None]
    step = max(1, len(present) // SAMPLE)  # every k-th: the same values every run
    return [str(v) for v in present[::step][:SAMPLE]]


def _share(texts: list[str], shape: re.Pattern[str]) -> float:
    return sum(1 for t in texts if shape.match(t)) / len(texts) if texts else 0.0


def _home_part(texts: list[str]) -> bool:
    """A landline (digits alone), a postcode or a town, by the shape of most values."""
    if _share(texts, _DIGITS) >= 0.8 and \
            _share([re.sub(r"\D", "", t) for t in texts], _PHONE) >= 0.8:
        return True
    if _share(texts, _POSTCODE) >= 0.8:
        return True
    # a town: a few words of letters, each held by many records
    return _share(texts, _TOWN) >= 0.9 and 5 <= len(set(texts)) <= 0.05 * len(texts) and \
        float(np.mean([len(t) for t in texts])) >= 3


def shape_fields(fields: list[FieldSpec], values: dict[str, np.ndarray]) -> list[str]:
    """The fields whose values look like the parts of an address or a landline, given one
    normalised value per record (``scoring.normalised``); none without a street among them."""
    street, others = [], []
    for f in fields:
        if f.kind not in ("text", "code") or f.name not in values:
            continue
        texts = _sample(values[f.name])
        if len(texts) < 20:
            continue
        if _share(texts, _STREET) >= 0.6:
            street.append(f.name)
        elif _home_part(texts):
            others.append(f.name)
    if not street or not others:
        return []
    return [f.name for f in fields if f.name in street or f.name in others]
