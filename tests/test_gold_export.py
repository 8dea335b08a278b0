"""Gold-label exports: read back in every format, golden files, clusters, conflicts, the split.

Golden files live in tests/golden/; after a deliberate change of an export, rewrite them with
``DOCKET_UPDATE_GOLDEN=1 pytest tests/test_gold_export.py`` and review the diff.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow.csv as pacsv
import pyarrow.json as pajson
import pyarrow.parquet as pq
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core import DocketError, NewProject, Project
from docket.core.exports import gold_export as ge
from docket.core.exports.exporting import write_frame
from docket.core.reviewing.team import add_reviewer

GOLDEN = Path(__file__).resolve().parent / "golden"
UPDATE = os.environ.get("DOCKET_UPDATE_GOLDEN") == "1"

# Same ids on both sides on purpose: link-mode clusters must keep left 1 and right 1 apart.
LEFT = ("id,name,town,note\n1,Anna Berg,Oslo,first\n2,Anna Berg,Oslo,\n3,Jon Dahl,Bergen,"
        "\"two\nlines; here\"\n4,Kari Lund,Tromsø,\n5,Per Moe,Bodø,\n")
RIGHT = ("id,name,town,note\n1,Anna Berg,Oslo,\n2,Anne Berg,Oslo,x\n3,Jon Dal,Bergen,\n"
         "4,Kari Lund,Tromso,\n5,Pål Moe,,\n")
PAIRS = [("1", "1"), ("2", "1"), ("2", "2"), ("1", "2"), ("3", "3"), ("4", "4"), ("5", "5"),
         ("3", "4")]


@pytest.fixture(scope="module")
def tiny_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A small link project with fixed labels of every kind of gold (and some that are not)."""
    folder = tmp_path_factory.mktemp("gold")
    (folder / "left.csv").write_text(LEFT, encoding="utf-8")
    (folder / "right.csv").write_text(RIGHT, encoding="utf-8")
    (folder / "pairs.csv").write_text("left_id,right_id\n" + "".join(
        f"{a},{b}\n" for a, b in PAIRS), encoding="utf-8")
    path = folder / "tiny.docket"
    Project.create(NewProject(path=path, left=folder / "left.csv", right=folder / "right.csv",
                              id_column="id", pairs_file=folder / "pairs.csv", audit=4,
                              kinds={"name": "name", "town": "name", "note": "skip"},
                              name="tiny", seed=0))
    with Project.open(path) as project:
        pid = pair_ids(project)
        for (a, b), reviewer, label in [
            (("1", "1"), "maya", "match"), (("1", "1"), "ola", "match"),  # unanimous
            (("2", "1"), "maya", "match"), (("2", "2"), "maya", "match"),  # single
            (("1", "2"), "maya", "non-match"),  # single, but a chain of matches joins 1 and 2
            (("3", "3"), "maya", "match"), (("3", "3"), "ola", "non-match"),  # disagreement
            (("4", "4"), "maya", "hold"),  # never gold
            (("5", "5"), "maya", "non-match"),
        ]:
            project.decide(pid[(a, b)], reviewer, label)
        add_reviewer(project, "ada", "adjudicator", granted_by="lead")
        project.decide(pid[("3", "3")], "ada", "match", role="adjudicator")
    return path


@pytest.fixture
def tiny(tiny_file: Path, tmp_path: Path) -> Project:
    copy = tmp_path / "tiny.docket"
    copy.write_bytes(tiny_file.read_bytes())
    project = Project.open(copy)
    yield project
    project.close()


def pair_ids(project: Project) -> dict[tuple[str, str], int]:
    return {(a, b): p for p, a, b in
            project.connection.execute("SELECT pair_id, left_id, right_id FROM pairs")}


def plain(frame: pd.DataFrame) -> list[list[object]]:
    """Rows as plain Python values, every missing value None (pandas reads back NaN or NA)."""
    return [[None if pd.isna(v) else v.item() if hasattr(v, "item") else v for v in row]
            for row in frame.astype(object).itertuples(index=False)]


def check_golden(name: str, text: str) -> None:
    path = GOLDEN / name
    if UPDATE:
        GOLDEN.mkdir(exist_ok=True)
        path.write_text(text, encoding="utf-8")
    assert path.exists(), f"golden file {path} missing; run with DOCKET_UPDATE_GOLDEN=1"
    assert text == path.read_text(encoding="utf-8"), f"{name} differs from its golden file"


# -- gold -------------------------------------------------------------------------------------
def test_gold_rows_follow_the_policy(tiny: Project) -> None:
    pid = pair_ids(tiny)
    gold = ge.gold_frame(tiny).set_index("pair_id")
    assert pid[("4", "4")] not in gold.index  # a hold is never gold
    assert pid[("3", "4")] not in gold.index  # never reviewed
    assert len(gold) == 6
    assert gold.loc[pid[("1", "1")], ["label", "how", "reviewers", "n_reviews"]].tolist() == [
        "match", "unanimous", "maya;ola", 2]
    assert gold.loc[pid[("3", "3")], ["label", "how"]].tolist() == ["match", "adjudicated"]
    assert gold.loc[pid[("5", "5")], "how"] == "single"
    # inclusion probability only where it is known: the audit slice
    audit = gold[gold["audit"]]
    assert audit["inclusion_probability"].between(0, 1, inclusive="right").all()
    assert gold.loc[~gold["audit"], "inclusion_probability"].isna().all()
    assert gold.loc[~gold["audit"], "audit_stratum"].isna().all()


@pytest.mark.parametrize("what", ["gold", "training", "clusters"])
@pytest.mark.parametrize("fmt", ["csv", "parquet", "jsonl"])
def test_exports_read_back_with_pandas_and_pyarrow(tiny: Project, tmp_path: Path, what: str,
                                                   fmt: str) -> None:
    frame = {"gold": ge.gold_frame, "training": ge.training_frame,
             "clusters": ge.clusters_frame}[what](tiny)
    target = tmp_path / f"{what}.{fmt}"
    write_frame(frame, str(target))
    ids = {c: str for c in ("left_id", "right_id", "record_id") if c in frame.columns}
    if fmt == "csv":
        back = pd.read_csv(target, dtype=ids, keep_default_na=False, na_values=[""])
        arrow = pacsv.read_csv(target)
    elif fmt == "parquet":
        back = pd.read_parquet(target)
        arrow = pq.read_table(target)
    else:
        back = pd.read_json(target, lines=True, dtype=ids)
        arrow = pajson.read_json(target)
    assert list(back.columns) == list(frame.columns) == arrow.column_names
    assert len(back) == len(frame) == arrow.num_rows
    assert back["pair_id" if what != "clusters" else "cluster"].tolist() == \
        frame["pair_id" if what != "clusters" else "cluster"].tolist()
    if fmt == "parquet":  # the one format that keeps types: compare everything
        assert plain(back) == plain(frame)


def test_gold_golden_csv_and_jsonl(tiny: Project, tmp_path: Path) -> None:
    frame = ge.gold_frame(tiny)
    for name in ("gold.csv", "gold.jsonl"):
        write_frame(frame, str(tmp_path / name))
        check_golden(name, (tmp_path / name).read_text(encoding="utf-8"))


def test_training_golden_parquet_schema_and_rows(tiny: Project, tmp_path: Path) -> None:
    write_frame(ge.training_frame(tiny, test_share=0.5, seed=3), str(tmp_path / "t.parquet"))
    table = pq.read_table(tmp_path / "t.parquet")
    doc = {"schema": [[f.name, str(f.type)] for f in table.schema],
           "rows": table.to_pylist()}
    check_golden("training.parquet.json",
                 json.dumps(doc, indent=1, ensure_ascii=False, sort_keys=True) + "\n")


def test_training_has_both_records_and_similarities(tiny: Project) -> None:
    t = ge.training_frame(tiny).set_index("pair_id")
    p = pair_ids(tiny)[("3", "3")]
    assert t.loc[p, ["left_name", "right_name", "left_town", "right_town"]].tolist() == [
        "Jon Dahl", "Jon Dal", "Bergen", "Bergen"]
    assert t.loc[p, "left_note"] == "two\nlines; here" and t.loc[p, "right_note"] is None
    assert {"sim_name", "sim_town"} <= set(t.columns) and "sim_note" not in t.columns
    assert t.loc[p, "sim_town"] == 1.0 and 0 < t.loc[p, "sim_name"] < 1


def test_for_lm_golden_and_serialisation(tiny: Project, tmp_path: Path) -> None:
    records = ge.lm_records(tiny, test_share=0.5, seed=3)
    target = tmp_path / "lm.jsonl"
    ge.write_jsonl(records, str(target))
    text = target.read_text(encoding="utf-8")
    check_golden("for_lm.jsonl", text)
    back = [json.loads(line) for line in text.splitlines()]
    assert back == records
    assert set(back[0]) == {"pair_id", "instruction", "input", "label", "split"}
    five = next(r for r in back if r["pair_id"] == pair_ids(tiny)[("5", "5")])
    assert five["input"] == ("Record A: name: Per Moe; town: Bodø\n"
                             "Record B: name: Pål Moe; town: (missing)")
    assert five["label"] == "non-match"
    assert pd.read_json(target, lines=True)["pair_id"].tolist() == [r["pair_id"] for r in back]


# -- clusters and conflicts -------------------------------------------------------------------
def test_clusters_golden_and_sides_kept_apart(tiny: Project, tmp_path: Path) -> None:
    frame = ge.clusters_frame(tiny)
    write_frame(frame, str(tmp_path / "clusters.csv"))
    check_golden("clusters.csv", (tmp_path / "clusters.csv").read_text(encoding="utf-8"))
    of = {(s, r): c for s, r, c in frame[["side", "record_id", "cluster"]].itertuples(
        index=False)}
    assert of[("left", "1")] == of[("left", "2")] == of[("right", "1")] == of[("right", "2")]
    assert of[("left", "3")] == of[("right", "3")]  # adjudicated match
    assert of[("left", "5")] != of[("right", "5")]  # a non-match: apart
    assert ("left", "4") not in of  # only a hold: no gold label names it
    assert frame.loc[frame["conflict"], "cluster"].unique().tolist() == [of[("left", "1")]]
    everyone = ge.clusters_frame(tiny, all_records=True)
    assert len(everyone) == 10 and everyone["cluster_size"].min() == 1


def test_conflicts_enter_the_adjudication_queue(tiny: Project) -> None:
    pid = pair_ids(tiny)
    bad = pid[("1", "2")]
    assert ge.conflict_pairs(tiny) == {bad}
    [c] = ge.conflicts(tiny)
    assert c.members == (("left", "1"), ("left", "2"), ("right", "1"), ("right", "2"))
    assert c.match_pairs == tuple(sorted(pid[k] for k in [("1", "1"), ("2", "1"), ("2", "2")]))
    listing = ge.conflicts_frame(tiny)
    assert listing[["pair_id", "left_id", "right_id", "cluster_size"]].values.tolist() == [
        [bad, "1", "2", 4]]
    queue = dict(ge.adjudication_queue(tiny))
    assert queue[bad] == "cluster conflict" and queue[pid[("4", "4")]] == "hold"
    assert pid[("3", "3")] not in queue  # settled by the adjudicator

    # The adjudicator confirms the non-match: now the chain of matches is what must be wrong.
    tiny.decide(bad, "ada", "non-match", role="adjudicator")
    queue = dict(ge.adjudication_queue(tiny))
    assert bad not in queue
    assert {p for p, why in queue.items() if why == "cluster conflict"} == set(c.match_pairs)

    # The adjudicator breaks the chain: no conflict, nothing from clusters in the queue.
    tiny.decide(pid[("2", "1")], "ada", "non-match", role="adjudicator")
    tiny.decide(pid[("1", "2")], "ada", "non-match", role="adjudicator")
    assert ge.conflict_pairs(tiny) == set()
    assert "cluster conflict" not in dict(ge.adjudication_queue(tiny)).values()


def test_dedupe_clusters_have_no_side(tmp_path: Path) -> None:
    (tmp_path / "r.csv").write_text("id,name\n1,Ann\n2,Ann\n3,Ann\n4,Bo\n", encoding="utf-8")
    (tmp_path / "p.csv").write_text("left_id,right_id\n1,2\n2,3\n1,3\n", encoding="utf-8")
    path = tmp_path / "d.docket"
    Project.create(NewProject(path=path, left=tmp_path / "r.csv", id_column="id",
                              pairs_file=tmp_path / "p.csv"))
    with Project.open(path) as project:
        pid = pair_ids(project)
        key = {frozenset(k): v for k, v in pid.items()}
        project.decide(key[frozenset({"1", "2"})], "maya", "match")
        project.decide(key[frozenset({"2", "3"})], "maya", "match")
        project.decide(key[frozenset({"1", "3"})], "maya", "non-match")
        frame = ge.clusters_frame(project)
        assert list(frame.columns) == ["record_id", "cluster", "cluster_size", "conflict"]
        assert frame["cluster"].tolist() == [0, 0, 0] and frame["conflict"].all()
        assert ge.conflict_pairs(project) == {key[frozenset({"1", "3"})]}


# -- the split --------------------------------------------------------------------------------
def test_split_is_deterministic_and_near_its_share() -> None:
    ids = np.arange(1, 20_001)
    a = ge.split_of(ids, 0.2, seed=7)
    assert (a == ge.split_of(ids, 0.2, seed=7)).all()
    assert (a != ge.split_of(ids, 0.2, seed=8)).any()
    assert abs((a == "test").mean() - 0.2) < 0.01
    assert (ge.split_of(ids, 0.0) == "train").all()
    with pytest.raises(DocketError, match="test-share"):
        ge.split_of(ids, 1.0)


@settings(max_examples=60, deadline=None)
@given(st.sets(st.integers(1, 10**9), min_size=1, max_size=60),
       st.sets(st.integers(1, 10**9), max_size=60), st.integers(0, 2**31))
def test_split_of_a_pair_never_changes_when_more_labels_arrive(old: set[int], new: set[int],
                                                               seed: int) -> None:
    before = dict(zip(sorted(old), ge.split_of(sorted(old), 0.3, seed), strict=True))
    grown = sorted(old | new)
    after = dict(zip(grown, ge.split_of(grown, 0.3, seed), strict=True))
    assert all(after[p] == side for p, side in before.items())


def test_training_split_matches_split_of_and_is_stable(tiny: Project) -> None:
    first = ge.training_frame(tiny, test_share=0.5, seed=3)[["pair_id", "split"]]
    assert first["split"].tolist() == ge.split_of(first["pair_id"], 0.5, 3).tolist()
    tiny.decide(pair_ids(tiny)[("3", "4")], "maya", "non-match")  # one more label arrives
    later = ge.training_frame(tiny, test_share=0.5, seed=3).set_index("pair_id")["split"]
    assert len(later) == len(first) + 1
    assert all(later[p] == s for p, s in first.itertuples(index=False))
