"""Choosing the queue order: the model's uncertain pairs first, or the pairs machine raters
split on first (served by ``split_queue``).

Switching to disagreement first stores the split pairs with their split share; the audit slice
is drawn and shown exactly as before, so the estimates stay honest. The project records which
order was used and since when, and ``evaluate`` says so.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Sequence
from typing import Any

import numpy as np

from ..errors import DocketError
from ..ordering.queue_order import MODES, split_shares
from ..storage import store
from ..storage.project_file import ProjectFile
from . import catalogue
from .judged import predictions


def set_mode(conn: sqlite3.Connection, mode: str, members: Sequence[str] | None = None
             ) -> dict[str, Any]:
    """Switch the queue order (inside the caller's transaction); returns the new setting."""
    if mode not in MODES:
        raise DocketError(f"queue order {mode!r}: use uncertain or disagreement")
    conn.execute("DELETE FROM queue_disagreement")
    raters: list[str] = []
    split_pairs = 0
    if mode == "disagreement":
        infos = {m.name: m for m in catalogue.matchers(conn)}
        raters = list(members) if members else [n for n, m in infos.items()
                                                if m.kind != "ensemble"]
        if len(set(raters)) < 2:
            raise DocketError("disagreement first needs at least two machine raters; import "
                              "them with 'docket matchers PROJECT import FILE'")
        scores = catalogue.load_scores(conn, raters)
        split = split_shares([predictions(scores[r], infos[r].threshold) for r in raters])
        ids = catalogue.pair_ids(conn)
        at = np.flatnonzero(split > 0)
        conn.executemany("INSERT INTO queue_disagreement VALUES (?, ?)",
                         zip(ids[at].tolist(), split[at].tolist(), strict=True))
        split_pairs = int(at.size)
    history = store.get_meta(conn).get("queue_order_history", [])
    setting = {"mode": mode, "since": store.now(), "raters": raters, "split_pairs": split_pairs}
    store.set_meta(conn, queue_order=setting, queue_order_history=[*history, setting])
    return setting


def choose_order(project: ProjectFile, mode: str, members: Sequence[str] | None = None
                 ) -> dict[str, Any]:
    """Switch an open project's queue order; what ``describe`` says of it afterwards."""
    from ..ordering.queue_order import describe
    with project.transaction() as conn:
        set_mode(conn, mode, members)
    project.reload()
    return describe(project.meta)

