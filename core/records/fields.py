"""Which columns are compared, and as what kind of field."""

from __future__ import annotations

import re
import unicodedata
import warnings

import pandas as pd

from ..errors import DocketError
from ..types import KINDS, FieldSpec
from . import normalise, placeholders
from .chosen_columns import chosen
from .silent_columns import one_value, silent_lines, without_values
from .unpaired import map_advice, unpaired_warning
from .unreadable import unreadable_warning

_CODE_HINT = re.compile(r"(post|zip|plz|phone|tel|mobile|fax|e-?mail|code|iban|ssn|nhs|vat|isbn)",
                        re.I)
# an identifier by its column's name: 'soc_sec_id', 'patient id', 'patientID', 'member_no',
# 'account number'; letters on both sides are looked at, so 'paid' and 'idle' are not ids,
# and 'no_of_pets' or 'number of children' count
_ID_HINT = re.compile(r"((?<![a-z])(id|ref)(?![a-z])|(?<![a-z])(no|nr|num)\.?\s*$|"
                      r"number(?![\s_-]*of)|ident|passport|licen[cs]e|account|member|serial|"
                      r"sku|ean|gtin|upc)", re.I)
_QUANTITY_HINT = re.compile(r"(amount|price|cost|total|salary|income|balance|value|sum|qty|"
                            r"quantit|count|age|year|weight|height|size|area|popul|score)", re.I)
_CAMEL_ID = re.compile(r"(?<=[a-z])(Id|ID|No|Nr)(?![a-z])")
_NAME_HINT = re.compile(r"(name|owner|surname|forename|given|first|last|pet)", re.I)
_DATE_HINT = re.compile(r"(date|dob|born|birth)", re.I)
# a date by the shape of its values, for columns whose name says nothing ('c3', 'geburtsdatum'):
# digits split by '-', '/' or '.', or a day and a year around a month in words ('3 Mar 1980',
# 'March 3, 1980')
_MONTH = r"(?:jan|feb|mar|apr|may|jun|jul|aug|sep|oct|nov|dec)[a-z]*\.?"
_DATE_SHAPE = re.compile(rf"(?:\d[-/.]\d|\b\d{{1,2}}\s+{_MONTH}\s+\d{{2,4}}\b|"
                         rf"\b{_MONTH}\s+\d{{1,2}},?\s+\d{{2,4}}\b)", re.I)
LONG_CHARS, LONG_WORDS = 400, 60  # a long value, as far as a column's kind goes
_GROUPING = re.compile(r"[\s\-./]+")  # how an identifier's digits are grouped: 'QX 12 34 56 C'


def detect_kind(column: str, values: pd.Series) -> str:
    """Guess a field kind from the column name and a sample of its values."""
    # by position: the same sample as over the ids (Series.sample draws positions), without
    # copying the ids of every record to drop the missing ones
    sample = pd.Series(values.to_numpy(dtype=object)).dropna()
    sample = sample.sample(min(len(sample), 2000), random_state=0) if len(sample) else sample
    if len(sample) == 0:
        return "text"
    texts = sample.astype(str)
    def share(func) -> float:
        return float(texts.map(lambda v: func(v) is not None).mean())
    # each value counted up to a long text's length: one stray value of 2,000,000 characters
    # (a file pasted into a cell) made a column of 2,000 names 'longtext'
    mean_len = float(texts.str.len().clip(upper=LONG_CHARS).mean())
    mean_tokens = float(texts.str.split().str.len().clip(upper=LONG_WORDS).mean())
    if (_DATE_HINT.search(column) or texts.str.contains(_DATE_SHAPE).mean() > 0.9) and \
            share(normalise.date) > 0.9 and mean_len <= 30:
        return "date"
    leading_zero = texts.str.match(r"^0\d").mean() > 0.05
    if share(normalise.number) > 0.95 and not leading_zero and not _CODE_HINT.search(column):
        if not _id_like(column, texts):
            return "number"
        return "code"
    if _CODE_HINT.search(column) or (texts.str.contains("@").mean() > 0.5) or \
            _identifiers(texts) > 0.9:
        return "code"
    if mean_tokens >= 5 or mean_len >= 40:
        return "longtext"
    if _NAME_HINT.search(column) and mean_tokens <= 4:
        return "name"
    alpha = texts.str.fullmatch(r"[^\d@]+").mean()
    distinct = texts.nunique() / len(texts)
    if alpha > 0.95 and distinct > 0.3 and mean_tokens <= 4:
        return "name"
    if texts.str.contains(" ").mean() < 0.05 and texts.str.contains(r"\d").mean() > 0.8:
        return "code"
    return "text"


def _id_like(column: str, texts: pd.Series) -> bool:
    """Whole numbers that identify rather than measure: a column named for an id, or whole
    numbers of six digits or more, nearly all different. As a number, two ids of seven digits
    within 1 % of each other were 'near'; as a code a typo is 'one edit' and the rest differ.
    Years, ages, counts and amounts (short, repeated, or with decimals) stay numbers."""
    whole = texts.str.strip().str.fullmatch(r"[+-]?\d+")
    if whole.mean() < 0.95:
        return False
    if _ID_HINT.search(column) or _CAMEL_ID.search(column):
        return True
    if _QUANTITY_HINT.search(column):
        return False
    digits = texts.str.strip().str.lstrip("+-").str.len()
    return bool(digits.median() >= 6 and texts.nunique() / len(texts) > 0.9)


def _identifiers(texts: pd.Series) -> float:
    """Share of values that are one run of letters and digits, mostly digits (at least four),
    once the spaces, hyphens, dots and slashes that group them go: a national number or phone
    written 'QX 12 34 56 C' in one register and 'QX123456C' in another. As text the two forms
    differ in five characters; as a code they are one value."""
    bare = texts.str.replace(_GROUPING, "", regex=True)
    digits = bare.str.count(r"\d")
    return float((bare.str.fullmatch(r"[A-Za-z0-9]{5,}") & (digits >= 4) &
                  (2 * digits >= bare.str.len())).mean())


def parse_map(items: list[str] | None) -> dict[str, str]:
    out: dict[str, str] = {}
    for item in items or []:
        left, sep, right = item.partition("=")
        if not sep or not left.strip() or not right.strip():
            raise DocketError(f"--map {item!r}: write it as LEFT_COLUMN=RIGHT_COLUMN")
        if out.get(left.strip(), right.strip()) != right.strip():  # the last one won, unsaid
            raise DocketError(f"--map pairs left column '{left.strip()}' with "
                              f"'{out[left.strip()]}' and with '{right.strip()}'; keep one")
        taken = next((k for k, v in out.items() if v == right.strip() and k != left.strip()),
                     None)
        if taken is not None:  # one right column read as two fields counts its evidence twice
            raise DocketError(f"--map pairs right column '{right.strip()}' with '{taken}' and "
                              f"with '{left.strip()}'; keep one")
        out[left.strip()] = right.strip()
    return out


def parse_kinds(items: list[str] | None) -> dict[str, str]:
    out: dict[str, str] = {}
    for item in items or []:
        col, sep, kind = item.rpartition(":")
        kind = kind.strip().lower().replace("-", "").replace(" ", "")
        if not sep or not col.strip():
            raise DocketError(f"--field {item!r}: write it as COLUMN:KIND, "
                              f"with KIND one of {', '.join(KINDS)}")
        if kind != "skip" and kind not in KINDS:
            raise DocketError(f"--field {item!r}: unknown kind '{kind}'; "
                              f"use one of {', '.join(KINDS)} (or skip)")
        if out.get(col.strip(), kind) != kind:  # the last one won, unsaid
            raise DocketError(f"--field gives column '{col.strip()}' two kinds, "
                              f"{out[col.strip()]} and {kind}; keep one")
        out[col.strip()] = kind
    return out


def resolve_fields(left: pd.DataFrame, right: pd.DataFrame | None, left_name: str,
                   right_name: str | None, mapping: dict[str, str],
                   kinds: dict[str, str], keep_placeholders: bool = False,
                   only: list[str] | None = None) -> list[FieldSpec]:
    """The compared fields: common columns (after the map), or those of them ``only`` names,
    each with a detected kind and the placeholders it reads as missing (none with
    ``keep_placeholders``)."""
    right_frame = left if right is None else right
    for lcol, rcol in mapping.items():
        if lcol == left.index.name or rcol == right_frame.index.name:
            raise DocketError(f"--map {lcol}={rcol}: names an id column, which identifies "
                              "records and is not compared; map the columns to compare")
        if lcol not in left.columns and right is not None and lcol in right.columns and \
                rcol in left.columns:
            raise DocketError(f"--map {lcol}={rcol} is the wrong way round: '{lcol}' is a column "
                              f"of {right_name} and '{rcol}' of {left_name}; the left table's "
                              f"column comes first: --map {rcol}={lcol}")
        if lcol not in left.columns:
            raise DocketError(f"{left_name}: --map names column '{lcol}', which it does not have "
                              f"(columns: {', '.join(left.columns)})")
        if rcol not in right_frame.columns:
            raise DocketError(f"{right_name or left_name}: --map names column '{rcol}', which it "
                              f"does not have (columns: {', '.join(right_frame.columns)})")
    pairs: list[tuple[str, str]] = []
    # a column named alike but for letter case ('Name', 'name') or Unicode form ('Prénom'
    # composed, or with its accent a mark of its own) is the same field: two exports of one
    # register differ that way; an exact name or a --map pairing goes first
    def alike(name: object) -> str:
        return unicodedata.normalize("NFC", str(name)).lower()

    by_case = {alike(c): c for c in right_frame.columns}
    taken = set(mapping.values()) | (set(left.columns) & set(right_frame.columns))
    for lcol in left.columns:
        rcol = mapping.get(lcol, lcol)
        if rcol not in right_frame.columns and lcol not in mapping:
            rcol = by_case.get(alike(lcol), rcol)
            if rcol in taken:
                continue
        if rcol in right_frame.columns:
            pairs.append((lcol, rcol))
            taken.add(rcol)
    shared = pairs  # what the tables share, whatever --compare leaves out of it
    if only is not None:
        pairs = chosen(pairs, only)
    for col in kinds:
        if col not in {p[0] for p in pairs}:
            raise DocketError(f"--field {col}: no compared column of that name; compared "
                              f"columns are {', '.join(p[0] for p in pairs) or '(none)'}")
    fields = []
    left_out: dict[str, str] = {}  # column -> why it holds nothing to compare
    constant: list[str] = []  # those of them holding one value throughout
    said: list[str] = []  # the placeholder warnings, said once the fields stand
    for lcol, rcol in pairs:
        kind = kinds.get(lcol)
        if kind == "skip":
            continue
        if kind is None:
            empty = without_values(left, right, lcol, rcol, left_name, right_name)
            same = None if empty else one_value(left, right, lcol, rcol, left_name, right_name)
            if same:
                constant.append(lcol)
            empty = empty or same
            if empty:
                # every pair would be 'missing' (or at one level) there: a field of no
                # evidence, whose levels the model would still weigh and the screens show
                left_out[lcol] = empty
                continue
        sides = [(left, lcol, left_name)] if right is None else [
            (left, lcol, left_name), (right, rcol, right_name or "the right table")]
        found = [{} if keep_placeholders else placeholders.found(frame[col])
                 for frame, col, _ in sides]
        if kind is None:
            # on the values without placeholders: 30 % 'unknown' hides a column of dates
            every = sorted({v for shares in found for v in shares})
            kind = detect_kind(lcol, pd.concat([placeholders.without(frame[col], every)
                                                for frame, col, _ in sides]))
        found = [placeholders.for_kind(shares, kind) for shares in found]
        only = [table for (frame, col, table), shares in zip(sides, found, strict=True)
                if shares and placeholders.only_placeholders(frame[col], kind)]
        if only and lcol not in kinds:
            left_out[lcol] = (f"column '{lcol}' holds only placeholders ("
                              f"{', '.join(repr(v) for v in found[0] or found[-1])}) in "
                              f"{' and in '.join(only)}")
            continue
        if any(found):
            said.append(placeholders.warning(lcol, [(table, col, shares) for (_, col, table),
                                                    shares in zip(sides, found, strict=True)]))
        fields.append(FieldSpec(name=lcol, left_column=lcol, right_column=rcol, kind=kind,
                                missing=tuple(sorted({v for shares in found for v in shares}))))
    if not fields:
        where = left_name if right is None else f"{left_name} and {right_name}"
        skipped = [c for c, k in kinds.items() if k == "skip"]
        if skipped and not left_out:
            raise DocketError(f"{where}: --field ...:skip leaves no column to compare (skipped: "
                              f"{', '.join(skipped)}); leave one to compare")
        if left_out and not constant:
            raise DocketError(f"{where}: no column to compare holds values ("
                              f"{', '.join(left_out)} {'holds' if len(left_out) == 1 else 'hold'}"
                              " none); give tables with values in the columns to compare")
        if left_out:
            raise DocketError(f"{where}: no column to compare tells records apart: "
                              f"{next(iter(left_out.values()))}"
                              + (f" (and {len(left_out) - 1} more such)" if len(left_out) > 1
                                 else "")
                              + "; give --field COL:KIND to compare one anyway")
        advice = "name them alike or pair them with --map LEFT=RIGHT" if right is None else \
            map_advice(left, right, [str(c) for c in left.columns],
                       [str(c) for c in right.columns])
        raise DocketError(f"{where}: no columns in common to compare; {advice}")
    for silent in silent_lines(left_out, constant):
        warnings.warn(silent, stacklevel=2)
    unpaired = None if right is None else \
        unpaired_warning(left, right, shared, left_name, right_name or "the right table")
    if unpaired:
        warnings.warn(unpaired, stacklevel=2)
    for said_line in said:
        warnings.warn(said_line, stacklevel=2)
    for f in fields:
        sides = [(left, f.left_column, left_name)] if right is None else [
            (left, f.left_column, left_name),
            (right, f.right_column, right_name or "the right table")]
        for frame, col, table in sides:
            line = unreadable_warning(f.name, f.kind, placeholders.without(frame[col], f.missing),
                                      table, col)
            if line:
                warnings.warn(line, stacklevel=2)
    return fields


def masked(frame: pd.DataFrame, fields: list[FieldSpec], side: str) -> pd.DataFrame:
    """The records as compared: each field's placeholders missing (the frame itself when no
    field has any; else a shallow copy with those columns replaced)."""
    out = frame
    for f in fields:
        column = f.left_column if side == "left" else f.right_column
        if f.missing and column in frame.columns:
            if out is frame:
                out = frame.copy(deep=False)
            out[column] = placeholders.without(frame[column], f.missing)
    return out
