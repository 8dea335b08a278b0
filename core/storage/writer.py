"""Writing a freshly built project into its (temporary) SQLite file."""

from __future__ import annotations

import json
import sqlite3
from collections.abc import Callable
from typing import Any

import numpy as np

from ..matching.explain import LogOddsTable
from ..matching.model import FSModel
from ..ordering import queue
from ..types import FieldSpec
from . import search, store

BATCH = 50_000


def write_records(conn: sqlite3.Connection, table: str, frame: Any, id_column: str) -> None:
    import sqlite_utils  # pulls in pandas: only building a project needs it

    db = sqlite_utils.Database(conn)
    names = [id_column, *map(str, frame.columns)]
    db.table(table).create(dict.fromkeys(names, str), pk=id_column)
    # one executemany over plain tuples of whole columns: a dict per record (insert_all), or a
    # row at a time (itertuples over an Arrow-backed id index), cost more than the writing
    marks = ", ".join("?" * len(names))
    columns = [frame.index.tolist(), *(frame[c].tolist() for c in frame.columns)]
    conn.executemany(f'INSERT INTO "{table}" VALUES ({marks})', zip(*columns, strict=True))
    search.index_records(conn, table, [str(c) for c in frame.columns])


def rounded_rows(s: np.ndarray) -> list[list[float | None]]:
    """Each value as Python's round(v, 4) gives it, missing as None, without a Python call per
    value (that loop was a fifth of a million-pair build)."""
    return _rounded(s).tolist()


def _rounded(s: np.ndarray) -> np.ndarray:
    r = np.round(s, 4)  # rint(v * 1e4) / 1e4: Python's value except next to a half
    scaled = s * 1e4
    near_half = np.abs(scaled - np.floor(scaled) - 0.5) < 1e-6
    for i, j in zip(*np.nonzero(near_half), strict=True):
        r[i, j] = round(float(s[i, j]), 4)
    out = r.astype(object)
    out[np.isnan(s)] = None
    return out


def write_model(conn: sqlite3.Connection, model: FSModel) -> None:
    conn.execute("DELETE FROM model")
    rows = []
    for f, names, m, u, w in zip(model.fields, model.level_names, model.m, model.u,
                                 model.weights(), strict=True):
        for lv, name in enumerate(names):
            missing = lv == len(names) - 1
            rows.append((f, lv, name, None if missing else m[lv], None if missing else u[lv],
                         float(w[lv])))
    conn.executemany("INSERT INTO model VALUES (?, ?, ?, ?, ?, ?)", rows)


def write_project(conn: sqlite3.Connection, *, spec: Any, left: Any, right: Any,
                  fields: list[FieldSpec], li: np.ndarray, ri: np.ndarray,
                  rule_ix: np.ndarray, rule_names: list[str], sims: np.ndarray,
                  patterns: np.ndarray, pattern_ix: np.ndarray, counts: np.ndarray,
                  weight: np.ndarray, prob: np.ndarray, model: FSModel, pair_ids: np.ndarray,
                  audit: queue.AuditSlice, overlap: np.ndarray, fingerprint: str,
                  report: Any, step: Callable[..., None]) -> None:
    conn.execute("BEGIN")
    step("writing records", 0, 2)
    write_records(conn, "left_records", left.frame, left.id_column)
    if right is not None:
        write_records(conn, "right_records", right.frame, right.id_column)
    step("writing records", 2, 2)
    conn.executemany(
        "INSERT INTO fields VALUES (?, ?, ?, ?, ?, ?)",
        [(i, f.name, f.left_column, f.right_column, f.kind,
          json.dumps(model.level_names[i])) for i, f in enumerate(fields)])
    prio = queue.priority(prob, spec.threshold)
    conn.executemany(
        "INSERT INTO patterns VALUES (?, ?, ?, ?, ?, ?, ?)",
        [(i, ",".join(map(str, patterns[i])), int(counts[i]), float(weight[i]),
          float(prob[i]), float(prob[i]), float(prio[i])) for i in range(len(patterns))])
    write_model(conn, model)

    order = np.argsort(pair_ids)
    lid = left.frame.index.to_numpy()
    rid = (left if right is None else right).frame.index.to_numpy()
    sim_cols = ", ".join(store.similarity_column(f.name) for f in fields)
    marks = ", ".join("?" * (13 + len(fields)))
    sql = (f"INSERT INTO pairs (pair_id, left_id, right_id, pattern_id, rule, overlap, need, "
           f"n_labels, open, audit, stratum, inclusion, audit_order, {sim_cols}) "
           f"VALUES ({marks})")
    rules = np.array(rule_names, dtype=object)
    n = len(order)
    for start in range(0, n, BATCH):
        ix = order[start:start + BATCH]
        rounded = _rounded(sims[ix].astype(float))
        audit_order = audit.order[ix].astype(object)
        audit_order[audit.order[ix] < 0] = None
        # whole columns zipped into rows: no Python frame per pair between them and SQLite
        columns = [pair_ids[ix].tolist(), lid[li[ix]].tolist(), rid[ri[ix]].tolist(),
                   pattern_ix[ix].tolist(), rules[rule_ix[ix]].tolist(),
                   overlap[ix].astype(int).tolist(),
                   np.where(overlap[ix], spec.overlap_reviewers, 1).astype(int).tolist(),
                   [0] * len(ix), [1] * len(ix), audit.selected[ix].astype(int).tolist(),
                   audit.stratum[ix].tolist(), audit.inclusion[ix].tolist(),
                   audit_order.tolist(), *(rounded[:, j].tolist() for j in range(len(fields)))]
        conn.executemany(sql, zip(*columns, strict=True))
        step("writing pairs", min(n, start + BATCH), n)
    store.set_meta(
        conn,
        name=spec.name or spec.path.stem,
        mode="dedupe" if right is None else "link",
        created_at=store.now(),
        left_file=str(left.path.name), right_file=None if right is None else str(right.path.name),
        left_id_column=left.id_column,
        right_id_column=None if right is None else right.id_column,
        fields=[f.to_dict() for f in fields],
        blocking=report.to_dict(),
        threshold=spec.threshold,
        one_to_one=bool(spec.one_to_one),
        overlap_share=spec.overlap,
        overlap_reviewers=spec.overlap_reviewers,
        audit_every=queue.AUDIT_EVERY,
        audit_strata={str(h): list(v) for h, v in audit.sizes.items()},
        refit_every=spec.refit_every,
        seed=spec.seed,
        fingerprint=fingerprint,
        fs_model=model.to_dict(),
        explain=LogOddsTable.from_fs(model).to_dict(),
        ranker="fellegi-sunter",
        ranker_note="no labels yet",
        refits=0,
    )
    from .fingerprint import fingerprint_of_written
    tables = [("left_records", left.id_column, left.frame)]
    if right is not None:
        tables.append(("right_records", right.id_column, right.frame))
    store.set_meta(conn, records_fingerprint=fingerprint_of_written(
        tables, pair_ids[order].tolist(), lid[li[order]].tolist(), rid[ri[order]].tolist()))
    conn.execute("COMMIT")
