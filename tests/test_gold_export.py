"""Gold-label exports: read back in every format, golden files, clusters, conflicts.

Golden files live in tests/golden/ (see ``tests/gold_fixtures.py`` to rewrite them).
"""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pyarrow.csv as pacsv
import pyarrow.json as pajson
import pyarrow.parquet as pq
import pytest

from docket.core import NewProject, Project
from docket.core.exports import gold_export as ge
from docket.core.exports.exporting import write_frame
from tests.gold_fixtures import check_golden, pair_ids, plain


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
    # how each label was reached travels with it
    three = gold.loc[pid[("3", "3")]]
    assert (three["adjudicator"], three["reason"], three["why_adjudicated"]) == (
        "ada", "one letter dropped from the surname", "disagreement")
    assert [(r["reviewer"], r["label"], r["note"]) for r in json.loads(three["reviews"])] == [
        ("maya", "match", "surname misspelt; same town"), ("ola", "non-match", "")]
    assert gold.loc[pid[("1", "1")], ["adjudicator", "reason", "why_adjudicated"]].isna().all()
    # inclusion probability only where it is known: the audit slice
    audit = gold[gold["audit"]]
    assert audit["inclusion_probability"].between(0, 1, inclusive="right").all()
    assert gold.loc[~gold["audit"], "inclusion_probability"].isna().all()
    assert gold.loc[~gold["audit"], "audit_stratum"].isna().all()
    assert gold.loc[~gold["audit"], "audit_weight"].isna().all()


def test_audit_weights_rebuild_each_stratum(tiny: Project) -> None:
    # common practice (stratified sampling): each labelled pair of stratum h stands for
    # N_h / m_h candidate pairs, so a stratum's weights add up to its N_h pairs, whatever
    # share of its drawn pairs is labelled yet; the draw probability n_h / N_h is kept beside it
    gold = ge.gold_frame(tiny)
    audit = gold[gold["audit"]]
    strata = {int(h): v for h, v in tiny.meta["audit_strata"].items()}
    assert len(audit) > 0
    for h, rows in audit.groupby("audit_stratum"):
        size, drawn = strata[int(h)]
        assert rows["audit_weight"].sum() == pytest.approx(size)
        assert rows["inclusion_probability"].to_numpy() == pytest.approx(drawn / size)
        assert rows["audit_weight"].iloc[0] >= 1 / rows["inclusion_probability"].iloc[0] - 1e-9


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


@pytest.mark.parametrize("fmt", ["csv", "parquet", "jsonl"])
def test_gold_export_round_trips_with_how_each_label_was_reached(tiny: Project, tmp_path: Path,
                                                                 fmt: str) -> None:
    frame = ge.gold_frame(tiny)
    target = tmp_path / f"gold.{fmt}"
    write_frame(frame, str(target))
    text = {c: str for c in frame.columns if frame[c].dtype == object}
    if fmt == "csv":
        back = pd.read_csv(target, dtype=text, keep_default_na=False, na_values=[""])
    elif fmt == "parquet":
        back = pd.read_parquet(target)
    else:
        # read without pandas' type guessing (it turns columns named *_at into datetimes): the
        # file holds the exact ISO 8601 text, which is what is checked here
        back = pd.DataFrame([json.loads(line) for line in target.read_text().splitlines()])
    for column in frame.columns:  # every value, the reviews' JSON and the reasons included
        want = [None if pd.isna(v) else v for v in frame[column]]
        got = [None if pd.isna(v) else v for v in back[column]]
        if column in ("audit_stratum", "inclusion_probability", "audit_weight"):  # numbers
            assert [None if v is None else float(v) for v in got] == pytest.approx(
                [None if v is None else float(v) for v in want])
        else:
            assert [str(v) if v is not None else None for v in got] == \
                [str(v) if v is not None else None for v in want], column
    reviews = [json.loads(r) for r in back["reviews"]]
    assert all({"reviewer", "label", "note", "decided_at"} == set(x) for r in reviews for x in r)


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




def test_a_conflicts_export_with_none_says_so_in_its_one_line(sample_project: Path,
                                                               tiny: Project, tmp_path: Path,
                                                               capsys) -> None:
    from docket.tui import cli
    out = tmp_path / "c.csv"
    assert cli.main(["export", str(sample_project), "--what", "conflicts", "-o", str(out)]) == 0
    assert capsys.readouterr().err.strip() == (
        f"wrote 0 rows to {out}: no conflicts, no gold non-match falls inside a cluster")
    assert out.read_text(encoding="utf-8").splitlines() == [
        "cluster,pair_id,left_id,right_id,cluster_size,match_pairs"]  # the columns still
    assert cli.main(["export", str(tiny.path), "--what", "conflicts", "-o", str(out)]) == 0
    assert capsys.readouterr().err.strip() == f"wrote 1 row to {out}"


def test_an_export_of_no_rows_as_json_lines_holds_no_line(sample_project: Path, tmp_path: Path,
                                                           capsys) -> None:
    # pandas wrote one empty line, which json.loads (and so any JSON-lines reader) refuses
    from docket.tui import cli
    out = tmp_path / "c.jsonl"
    assert cli.main(["export", str(sample_project), "--what", "conflicts", "-o", str(out)]) == 0
    assert out.read_bytes() == b""
    capsys.readouterr()
    assert cli.main(["export", str(sample_project), "--what", "gold", "--format", "jsonl",
                     "-o", "-"]) == 0
    assert capsys.readouterr().out == ""
    one = pd.DataFrame({"a": ["x"]})
    write_frame(one, str(out))
    assert [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()] == [
        {"a": "x"}]
    assert out.read_text(encoding="utf-8").endswith("\n")



@pytest.mark.parametrize("what", ["gold", "training", "clusters", "conflicts"])
def test_parquet_exports_keep_their_types_with_no_value_in_a_column(
        tiny_file: Path, tiny: Project, tmp_path: Path, what: str) -> None:
    # A column with no value (no adjudication yet; no rows at all) was Arrow's null type, and
    # such a file could not be read beside a later one holding values: "Unsupported cast
    # from string to null". The same project before any decision, then with tiny's.
    import pyarrow.dataset as ds
    source = tiny_file.parent
    undecided = tmp_path / "undecided.docket"
    Project.create(NewProject(path=undecided, left=source / "left.csv",
                              right=source / "right.csv", id_column="id",
                              pairs_file=source / "pairs.csv", audit=4,
                              kinds={"name": "name", "town": "name", "note": "skip"}))
    make = {"gold": ge.gold_frame, "training": ge.training_frame,
            "clusters": ge.clusters_frame, "conflicts": ge.conflicts_frame}[what]
    folder = tmp_path / what
    folder.mkdir()
    with Project.open(undecided) as empty:
        write_frame(make(empty), str(folder / "a_empty.parquet"))
    write_frame(make(tiny), str(folder / "b_later.parquet"))
    first, later = (pq.read_schema(folder / n) for n in ("a_empty.parquet", "b_later.parquet"))
    assert [(f.name, str(f.type)) for f in first] == [(f.name, str(f.type)) for f in later]
    assert "null" not in {str(f.type) for f in first}
    assert ds.dataset(folder).to_table().num_rows == len(make(tiny))


def test_the_queue_reads_the_gold_labels_once_and_finds_what_two_reads_found(
        tiny: Project, monkeypatch: pytest.MonkeyPatch) -> None:
    # it built every gold label twice (1.3 s of 3.1 at 28,000 gold labels)
    twice = {p for c in ge.conflicts(tiny) for p in c.non_match_pairs}
    listing = ge.conflicts_frame(tiny)
    real, calls = ge.gold_frame, []
    monkeypatch.setattr(ge, "gold_frame", lambda project: calls.append(1) or real(project))
    assert ge.conflict_queue_pairs(tiny) == twice and len(calls) == 1
    pd.testing.assert_frame_equal(ge.conflicts_frame(tiny), listing)
    assert len(calls) == 2


def test_clusters_and_conflicts_from_one_reading_are_each_as_read_alone(tiny: Project) -> None:
    frame, found = tiny.clusters_and_conflicts()
    pd.testing.assert_frame_equal(frame, ge.clusters_frame(tiny))
    assert found == ge.conflicts(tiny) and found
