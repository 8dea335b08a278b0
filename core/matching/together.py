"""Fields that say where a record lives are read together, so one home counts once.

Fellegi–Sunter adds one weight per field as if fields agreed independently. Street, town,
postcode and a landline phone all say where one household lives: summed, two people of one
home (spouses, a parent and a child, twins) get four agreements' worth of evidence for a
match, and a person who moved gets four disagreements against one. On invented people
(``bench/invented_people.py``) 1,202 of 1,255 false matches with no labels shared a home, and
all 331 missed pairs were people who had moved.

So such fields form one group. EM reads it as one column (:func:`composite`): with four,
its two classes came out as "same home" and "not". After EM, the group is weighed as one
composite field would be at its best level: its
weight there is ln(m_G / u_G), where u_G is the chance that two random records agree on every
member at once (from value frequencies, as each field's exact level is measured in
:mod:`random_pairs`) and m_G the smallest of the members' exact-level m (a match that keeps
its street keeps its town too). Every level of every member is multiplied by one factor
c = ln(m_G / u_G) / sum of ln(m_f / u_f), so that all members agreeing adds up to the
composite's weight, and a move (all disagreeing) counts about once too. A positive factor
keeps each field's levels in order and every sign, and the explanation still adds up: each
field's part is its weight times the factor.

The group is found by column name (words for address parts and a phone in English and five
other European languages), the way the kind of a field is guessed, or by the shape of the
values where no column's name says anything (:mod:`home_shapes`); ``docket new --together``
names it instead, or turns it off.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..types import FieldSpec
from . import home_shapes

FLOOR = 0.05  # the same floor as the shrink of dependence.py: a group never says nothing


def _words(*words: str) -> str:
    """Words matched only whole: 'state' not in 'estate', 'ort' not in 'report'."""
    return "|".join(rf"(?<![a-z]){w}(?![a-z])" for w in words)


# Address parts and a phone line, in English and in the languages of the nearest registers
# (German, French, Spanish, Italian, Dutch); 'mobile' is left out: a mobile belongs to a person.
_PLACE = re.compile(r"(addr|adr|street|road|house|flat|apartment|suburb|locality|town|city|"
                    r"village|county|district|provinc|region|country|post|zip|phone|tel(?!l)|"
                    r"landline|stra(ss|ß)e|straat|stadt|wohnort|gemeinde|plaats|gemeente|"
                    r"ville|commune|calle|ciudad|direcci|municip|indirizzo|citt|comune|"
                    + _words("state", "ort", "plz", "rue", "via", "cap", "cp", "huis") + ")",
                    re.I)
_NOT_PLACE = re.compile(r"(e-?mail|mobile|cell|handy|portable|movil|móvil|mobiel|name|date|"
                        r"birth|born|geburt|naissance|nacimiento|nascita|geboorte)", re.I)
OFF = "none"  # ``--together none``: every field counts on its own


def place_fields(fields: list[FieldSpec]) -> list[str]:
    """The fields whose names say they describe where a record lives."""
    return [f.name for f in fields
            if f.kind != "date" and _PLACE.search(f.name) and not _NOT_PLACE.search(f.name)]


def choose_group(fields: list[FieldSpec], named: list[str] | None,
                 values: dict[str, np.ndarray] | None = None) -> list[str]:
    """The group read together: the fields ``named`` (``[OFF]`` for none), else found by name,
    or, where no column's name says anything, by the shape of ``values`` (one normalised value
    per record and field: :mod:`home_shapes`); a group of one field is no group."""
    if named is not None:
        group = [] if [n.lower() for n in named] == [OFF] else list(dict.fromkeys(named))
        known = [f.name for f in fields]
        for name in group:
            if name not in known:
                raise DocketError(f"--together {name}: no compared field of that name; "
                                  f"the fields are {', '.join(known)}")
        if len(group) == 1:
            raise DocketError(f"--together {group[0]}: one field is no group; name two or "
                              "more, comma-separated, or 'none'")
    else:
        group = place_fields(fields)
        if len(group) < 2 and values is not None and home_shapes.blank_names(fields):
            group = home_shapes.shape_fields(fields, values)
    return group if len(group) >= 2 else []


def joint_chance(left: list[np.ndarray], right: list[np.ndarray] | None) -> float:
    """P(two random records agree on every field of a group, all present), from each member's
    value codes per record (one numbering over both sides, -1 missing: ``compare.Prepared``);
    ``right`` None for one table. Codes, not joined strings: those took 4.8 s at 1,000,000
    records."""
    n_left = len(left[0])
    key = np.zeros(n_left + (0 if right is None else len(right[0])), dtype=np.int64)
    for f, codes in enumerate(left):
        both = codes if right is None else np.concatenate([codes, right[f]])
        missing = (both < 0) | (key < 0)
        key, _ = pd.factorize(key * (int(both.max(initial=0)) + 2) + both)
        key = np.where(missing, -1, key).astype(np.int64)
    lcount = np.bincount(key[:n_left][key[:n_left] >= 0], minlength=1)
    if right is None:
        n = lcount.sum()
        return float((lcount * (lcount - 1.0)).sum() / max(1.0, n * (n - 1.0)))
    rkeys = key[n_left:]
    rcount = np.bincount(rkeys[rkeys >= 0], minlength=len(lcount))
    lcount = np.pad(lcount, (0, len(rcount) - len(lcount)))
    return float((lcount / max(1, lcount.sum()) * (rcount / max(1, rcount.sum()))).sum())


def _exact_levels(names: list[str]) -> int:
    """How many of a field's levels are exact agreement: they come first, one of them, or
    'exact, rare' and 'exact, common'."""
    return max(1, sum(1 for name in names if name.startswith("exact")))


def factors(fields: list[str], level_names: list[list[str]], m: list[np.ndarray],
            u: list[np.ndarray], group: list[str], joint_u: float) -> list[float]:
    """Per field, the factor its weights are multiplied by (1 outside the group)."""
    out = [1.0] * len(fields)
    members = [fields.index(name) for name in group if name in fields]
    if len(members) < 2 or joint_u <= 0:
        return out

    def exact(values: np.ndarray, f: int) -> float:
        return float(np.sum(np.asarray(values)[:_exact_levels(level_names[f])]))

    m_top = [exact(m[f], f) for f in members]
    u_top = [exact(u[f], f) for f in members]
    summed = sum(math.log(a / b) for a, b in zip(m_top, u_top, strict=True) if a > 0 and b > 0)
    composite = math.log(min(m_top) / joint_u) if min(m_top) > 0 else 0.0
    if summed <= 0 or composite <= 0:
        return out
    c = float(np.clip(composite / summed, FLOOR, 1.0))
    for f in members:
        out[f] = c
    return out


def composite(patterns: np.ndarray, level_names: list[list[str]], members: list[int]
              ) -> tuple[np.ndarray, list[list[str]]]:
    """Patterns with the ``members`` columns replaced by one: every present member exact,
    some, none, or all missing (last, as a missing level always is)."""
    exact = np.zeros(len(patterns), dtype=np.int64)
    present = np.zeros(len(patterns), dtype=np.int64)
    for f in members:
        missing = len(level_names[f]) - 1
        exact += patterns[:, f] < _exact_levels(level_names[f])
        present += patterns[:, f] != missing
    column = np.where(present == 0, 3, np.where(exact == present, 0, np.where(exact > 0, 1, 2)))
    rest = [f for f in range(patterns.shape[1]) if f not in members]
    seen = np.column_stack([patterns[:, rest], column]) if rest else column[:, None]
    names = [level_names[f] for f in rest] + [["all exact", "some exact", "none", "missing"]]
    return seen.astype(np.int64), names
