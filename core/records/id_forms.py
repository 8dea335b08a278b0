"""Ids that are one id as a person reads them: the same but for spaces at their ends, or for
how their accents are encoded. Kept apart they are two records that look like one on every
screen and in every file, and that a pairs or label file typed by hand cannot tell apart."""

from __future__ import annotations

import unicodedata
import warnings
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError


def check_written_alike(path: Path, id_column: str, ids: pd.Series,
                        rows: Callable[[np.ndarray], str]) -> None:
    """Refuse ids that are one id once trimmed ('1', ' 1', '1 ') or composed (NFC: 'José'
    typed on one system, 'Jose' + U+0301 on another); ``rows`` names positions of rows."""
    _check(path, id_column, ids, ids.str.strip(), rows, repr,
           "differ only in spaces at their ends", "trim them so each record has one id")
    _case_warning(path, id_column, ids, rows)
    if all(str(v).isascii() for v in ids):
        return  # nothing to compose: most tables' ids, at no cost
    composed = ids.map(lambda v: unicodedata.normalize("NFC", v) if isinstance(v, str) else v)
    _check(path, id_column, ids, composed, rows, ascii,
           "differ only in how their accents are encoded, one composed and one as separate "
           "marks", "write them one way, composed (NFC) as most systems do, so each record "
           "has one id")


def _check(path: Path, id_column: str, ids: pd.Series, read: pd.Series,
           rows: Callable[[np.ndarray], str], quote: Callable[[object], str], how: str,
           fix: str) -> None:
    clash = read.duplicated(keep=False).to_numpy()
    if not clash.any():
        return
    first = (clash & (read == read[clash].iloc[0]).to_numpy())
    shown = ", ".join(quote(v) for v in ids[first][:5])
    raise DocketError(f"{path}: column '{id_column}' holds ids that {how} ({shown} on "
                      f"{rows(np.flatnonzero(first)[:5])}); {fix}")


def _case_warning(path: Path, id_column: str, ids: pd.Series,
                  rows: Callable[[np.ndarray], str]) -> None:
    """Ids that differ only in letter case ('ab12', 'AB12') stay two records, as ids are
    matched exactly; but a system that reads ids in any case (a spreadsheet's lookup, many
    databases' default collation) takes them for one, so they are named in a warning."""
    folded = ids.str.casefold()
    clash = folded.duplicated(keep=False).to_numpy()
    if not clash.any():
        return
    first = clash & (folded == folded[clash].iloc[0]).to_numpy()
    shown = ", ".join(repr(v) for v in ids[first][:5])
    more = int(folded[clash].nunique()) - 1
    others = f", and {more:,} more such set{'s' if more > 1 else ''}" if more else ""
    warnings.warn(f"{path}: column '{id_column}' holds ids that differ only in letter case "
                  f"({shown} on {rows(np.flatnonzero(first)[:5])}{others}); each is a record "
                  "of its own, and labels name them in that case exactly", stacklevel=2)
