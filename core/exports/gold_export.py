"""Gold labels out: the gold table, a training set, language-model records, clusters, conflicts.

Every frame here is built from the gold labels under the project's policy (``reviewing.gold``), so
pairs on hold or in disagreement never leave the project as if they were settled.

The gold table carries how each label was reached (``gold_detail``); the train/test split
keeps each record on one side by default (``split``).
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..reviewing.gold import gold_labels, needs_adjudication
from ..storage import store
from ..storage.project_file import ProjectFile
from ..types import ClusterConflict
from . import clusters as clustering
from .gold_detail import DETAIL_COLUMNS, details
from .gold_supplement import supplement_entries
from .split import split, split_of

__all__ = ["split_of"]  # kept here for callers of the pair split

GOLD_COLUMNS = ("pair_id", "left_id", "right_id", "label", "how", "reviewers", "n_reviews",
                "audit", "audit_stratum", "inclusion_probability", "audit_weight",
                "supplements", *DETAIL_COLUMNS)
LEFT, RIGHT = "L:", "R:"  # link mode: the two sides share no id space once clustered


# -- gold ---------------------------------------------------------------------------------------
def gold_frame(project: ProjectFile) -> pd.DataFrame:
    """One row per gold-labelled pair, by pair id, with how its label was reached.

    ``how`` is unanimous, adjudicated or single; ``reviewers`` is ';'-joined; ``reviews`` is
    every reviewer's standing label, note and time as JSON; adjudicated pairs add
    ``why_adjudicated``, ``adjudicator``, ``reason`` and ``adjudicated_at`` (see
    ``gold_detail``). The audit columns are set only for pairs of the audit slice: a pair the
    queue chose by uncertainty has no known probability of having been chosen.
    ``inclusion_probability`` is n_h / N_h, the chance that a pair of stratum h was drawn into
    the slice (n_h drawn of its N_h candidate pairs). Not every drawn pair is gold yet, so the
    weight that lets the labelled pairs stand for the candidate pairs is ``audit_weight`` =
    N_h / m_h, m_h the gold-labelled audit pairs of the stratum: a stratum's weights add up to
    N_h, and equal 1 / inclusion_probability once every drawn pair is gold. ``supplements``
    gives the same for each supplement that drew the pair, with its chance of being drawn by
    the slice or that supplement (JSON, see ``gold_supplement``).
    """
    golds = gold_labels(project.connection)
    rows = {pid: (a, b, audit, stratum, inc) for pid, a, b, audit, stratum, inc in
            project.connection.execute(
                "SELECT pair_id, left_id, right_id, audit, stratum, inclusion FROM pairs "
                "WHERE pair_id IN (SELECT pair_id FROM current)")}
    how = details(project.connection, {g.pair_id for g in golds})
    weight = _audit_weights(project, [rows[g.pair_id] for g in golds])
    drawn_by = supplement_entries(project, (g.pair_id for g in golds))
    records = []
    for g in golds:
        a, b, audit, stratum, inc = rows[g.pair_id]
        records.append((g.pair_id, a, b, g.label, g.how, ";".join(g.reviewers), g.n_reviews,
                        bool(audit), stratum if audit else None, inc if audit else None,
                        weight.get(stratum) if audit else None, drawn_by.get(g.pair_id),
                        *how[g.pair_id].row()))
    frame = pd.DataFrame.from_records(records, columns=list(GOLD_COLUMNS))
    return frame.astype({"pair_id": "int64", "n_reviews": "int64", "audit": "bool",
                         "audit_stratum": "Int64", "inclusion_probability": "float64",
                         "audit_weight": "float64",
                         **{c: "object" for c in ("left_id", "right_id", "label", "how",
                                                  "reviewers", "supplements",
                                                  *DETAIL_COLUMNS)}})


def _audit_weights(project: ProjectFile, rows: list[tuple]) -> dict[int, float]:
    """N_h / m_h per audit stratum, m_h its gold-labelled audit pairs (see ``gold_frame``)."""
    sizes = {int(h): int(v[0]) for h, v in project.meta.get("audit_strata", {}).items()}
    labelled = Counter(int(stratum) for _, _, audit, stratum, _ in rows if audit)
    return {h: sizes[h] / m for h, m in labelled.items()}


def gold_split(project: ProjectFile, gold: pd.DataFrame, test_share: float = 0.2,
               seed: int = 0, by: str = "record") -> np.ndarray:
    """'train' or 'test' per row of ``gold`` (see ``split``: by record cluster or by pair)."""
    ends = [(_node(project, "left", a), _node(project, "right", b))
            for a, b in gold[["left_id", "right_id"]].itertuples(index=False)]
    return split(gold["pair_id"].tolist(), ends, test_share, seed, by)


# -- training -----------------------------------------------------------------------------------
def _records(project: ProjectFile, side: str, ids: Iterable[str]) -> pd.DataFrame:
    """Records of one side, indexed by id, every column as stored (text or None)."""
    table = "right_records" if side == "right" and project.link else "left_records"
    key = project.meta["right_id_column" if table == "right_records" else "left_id_column"]
    wanted = sorted(set(ids))
    if not wanted:
        cols = [r[1] for r in project.connection.execute(f"PRAGMA table_info({table})")]
        return pd.DataFrame(columns=[c for c in cols if c != key])
    parts = []
    for start in range(0, len(wanted), 900):  # stay under SQLite's bound-parameter limit
        chunk = wanted[start:start + 900]
        parts.append(pd.read_sql_query(
            f"SELECT * FROM {table} WHERE {store.quote(key)} IN ({','.join('?' * len(chunk))})",
            project.connection, params=chunk))
    frame = pd.concat(parts, ignore_index=True).set_index(key)
    return frame.astype(object).where(frame.notna(), None)


def _prefixed(frame: pd.DataFrame, prefix: str, taken: set[str]) -> pd.DataFrame:
    names = {}
    for col in frame.columns:
        name = f"{prefix}{col}"
        while name in taken:  # a record column called "id" must not overwrite left_id
            name += "_"
        taken.add(name)
        names[col] = name
    return frame.rename(columns=names)


def training_frame(project: ProjectFile, test_share: float = 0.2, seed: int = 0,
                   split_by: str = "record") -> pd.DataFrame:
    """Gold rows plus ``split``, the per-field similarities and both records' columns.

    Similarity columns are ``sim_<field>`` (None where a side is missing); record columns are
    ``left_<column>`` and ``right_<column>``, every column of the record but its id.
    """
    gold = gold_frame(project)
    gold.insert(4, "split", gold_split(project, gold, test_share, seed, split_by))
    sim_names = [f"sim_{f.name}" for f in project.fields]
    sims = pd.read_sql_query(
        f"SELECT pair_id, {', '.join(store.similarity_column(f.name) for f in project.fields)} "
        "FROM pairs WHERE pair_id IN (SELECT pair_id FROM current)", project.connection)
    # typed even when empty: read_sql_query gives an empty result object columns, and the
    # merge would carry that to pair_id
    sims = sims.astype({"pair_id": "int64", **{c: "float64" for c in sim_names}})
    out = gold.merge(sims, on="pair_id", how="left")
    taken = set(out.columns)
    for side in ("left", "right"):
        recs = _records(project, side, out[f"{side}_id"])
        recs = _prefixed(recs, f"{side}_", taken)
        out = out.join(recs, on=f"{side}_id")
    return out.reset_index(drop=True)


# -- clusters and conflicts ---------------------------------------------------------------------
@dataclass(frozen=True)
class _State:
    cluster_of: dict[str, int]
    conflicts: list[clustering.Conflict]
    match_pairs: dict[int, list[int]]  # cluster -> gold match pair ids
    non_match_ids: dict[tuple[str, str], int]  # sorted node pair -> pair id


def _node(project: ProjectFile, side: str, record_id: str) -> str:
    if not project.link:
        return record_id
    return (LEFT if side == "left" else RIGHT) + record_id


def _unnode(project: ProjectFile, node: str) -> tuple[str, str]:
    if not project.link:
        return "", node
    return ("left" if node.startswith(LEFT) else "right"), node[len(LEFT):]


def _state(project: ProjectFile, all_records: bool = False,
           gold: pd.DataFrame | None = None) -> _State:
    gold = gold_frame(project) if gold is None else gold
    ends = [(int(p), _node(project, "left", a), _node(project, "right", b), lab)
            for p, a, b, lab in gold[["pair_id", "left_id", "right_id", "label"]]
            .itertuples(index=False)]
    nodes = {n for _, a, b, _ in ends for n in (a, b)}
    if all_records:
        key = store.quote(project.meta["left_id_column"])
        nodes |= {_node(project, "left", r) for (r,) in
                  project.connection.execute(f"SELECT {key} FROM left_records")}
        if project.link:
            key = store.quote(project.meta["right_id_column"])
            nodes |= {_node(project, "right", r) for (r,) in
                      project.connection.execute(f"SELECT {key} FROM right_records")}
    matches = [(a, b) for _, a, b, lab in ends if lab == "match"]
    non = [(a, b) for _, a, b, lab in ends if lab == "non-match"]
    cluster_of = clustering.clusters(nodes, matches)
    by_cluster: dict[int, list[int]] = {}
    for p, a, _, lab in ends:
        if lab == "match":
            by_cluster.setdefault(cluster_of[a], []).append(p)
    non_ids = {(min(a, b), max(a, b)): p for p, a, b, lab in ends if lab == "non-match"}
    return _State(cluster_of, clustering.conflicts(cluster_of, non), by_cluster, non_ids)


def clusters_frame(project: ProjectFile, all_records: bool = False,
                   gold: pd.DataFrame | None = None) -> pd.DataFrame:
    """Record id -> cluster id over the connected components of the gold matches.

    By default the records named by some gold label; with ``all_records`` every record (the
    rest are singletons). Link mode adds ``side`` (left or right): the same id may occur on
    both sides and name different records. ``cluster_size`` counts members; ``conflict`` marks
    a cluster that holds a gold non-match. ``gold``: ``gold_frame``, when the caller has it.
    """
    state = _state(project, all_records, gold)
    sizes = pd.Series(list(state.cluster_of.values())).value_counts().to_dict()
    bad = {c.cluster for c in state.conflicts}
    rows = []
    for node, c in state.cluster_of.items():
        side, rid = _unnode(project, node)
        rows.append((side, rid, c, int(sizes[c]), c in bad))
    frame = pd.DataFrame.from_records(
        rows, columns=["side", "record_id", "cluster", "cluster_size", "conflict"])
    frame = frame.astype({"side": "object", "record_id": "object", "cluster": "int64",
                          "cluster_size": "int64", "conflict": "bool"})
    frame = frame.sort_values(["cluster", "side", "record_id"], kind="stable")
    if not project.link:
        frame = frame.drop(columns="side")
    return frame.reset_index(drop=True)


def conflicts(project: ProjectFile, gold: pd.DataFrame | None = None) -> list[ClusterConflict]:
    """Clusters of gold matches that contain a gold non-match, by cluster id; ``gold`` is
    ``gold_frame``, when the caller has it already."""
    state = _state(project, gold=gold)
    return [ClusterConflict(
        c.cluster, tuple(_unnode(project, m) for m in c.members),
        tuple(sorted(state.non_match_ids[pair] for pair in c.non_matches)),
        tuple(sorted(state.match_pairs.get(c.cluster, []))))
        for c in state.conflicts]


def clusters_and_conflicts(project: ProjectFile
                           ) -> tuple[pd.DataFrame, list[ClusterConflict]]:
    """``clusters_frame`` and ``conflicts`` from one reading of the gold labels."""
    gold = gold_frame(project)
    return clusters_frame(project, gold=gold), conflicts(project, gold)


def conflict_pairs(project: ProjectFile) -> set[int]:
    """Pair ids of the gold non-matches that a chain of gold matches contradicts."""
    return {p for c in conflicts(project) for p in c.non_match_pairs}


def conflicts_frame(project: ProjectFile) -> pd.DataFrame:
    """The conflicts listing: one row per contradicted gold non-match."""
    frame = gold_frame(project)
    gold = frame.set_index("pair_id")
    rows = []
    for c in conflicts(project, frame):
        for p in c.non_match_pairs:
            rows.append((c.cluster, p, gold.at[p, "left_id"], gold.at[p, "right_id"],
                         len(c.members), ";".join(map(str, c.match_pairs))))
    frame = pd.DataFrame.from_records(rows, columns=["cluster", "pair_id", "left_id",
                                                     "right_id", "cluster_size",
                                                     "match_pairs"])
    return frame.astype({"cluster": "int64", "pair_id": "int64", "cluster_size": "int64",
                         "left_id": "object", "right_id": "object", "match_pairs": "object"})


def conflict_queue_pairs(project: ProjectFile) -> set[int]:
    """The pairs a conflict sends to adjudication.

    The contradicted non-matches first; once an adjudicator has confirmed every non-match of
    a cluster, the chain of matches is what must be wrong, so its matches not yet adjudicated
    go instead. Without that step a confirmed conflict would leave the queue unresolved.
    """
    gold = gold_frame(project)  # once: 1.3 s of the queue's 3.1 at 28,000 gold labels
    how = dict(gold[["pair_id", "how"]].itertuples(index=False))
    out: set[int] = set()
    for c in conflicts(project, gold):
        open_ = {p for p in c.non_match_pairs if how.get(p) != "adjudicated"}
        out |= open_ or {p for p in c.match_pairs if how.get(p) != "adjudicated"}
    return out


def adjudication_queue(project: ProjectFile) -> list[tuple[int, str]]:
    """``gold.needs_adjudication`` with the cluster conflicts added ("cluster conflict")."""
    return needs_adjudication(project.connection, extra=conflict_queue_pairs(project))
