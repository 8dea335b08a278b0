"""Ids that are one id as a person reads them: the same but for spaces at their ends, or for
how their accents are encoded. Kept apart they are two records that look like one on every
screen and in every file, and that a pairs or label file typed by hand cannot tell apart."""

from __future__ import annotations

import unicodedata
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
