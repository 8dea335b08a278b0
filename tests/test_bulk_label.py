"""Bulk labels: written in short batches, and all or nothing all the same."""

from __future__ import annotations

import shutil
import sqlite3
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.core.reviewing import bulk
from docket.core.reviewing.bulk import BulkRow, apply_rows
from docket.core.reviewing.team import list_reviewers
from docket.core.storage import file_health
from docket.tui.cli import main


def _standing(p: Project) -> dict[tuple[int, str], str]:
    return {(pid, who): lab for pid, who, lab in p.connection.execute(
        "SELECT pair_id, reviewer, label FROM current")}


def test_a_failed_label_registers_no_one(sample_project: Path, tmp_path: Path, capsys) -> None:
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n2,banana\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "newbie", "--from", str(rows)]) == 2
    assert "banana" in capsys.readouterr().err
    with Project.open(sample_project) as p:
        assert list_reviewers(p) == [] and p.decisions() == []


@pytest.mark.parametrize("body, needles", [
    ("1,match\n2,non-match\n1,non-match\n", ["rows 2 and 4 label pair 1 match and non-match"]),
    ("", ["a header and no rows"]),
    ("1,\n", ["row 2 has no label"]),
    # the scores export with a few labels filled in was refused at its first empty one alone
    ("1,\n2,match\n3,\n4, \n5,\n", ["4 rows have no label: rows 2, 4, 5… (counting the "
                                     "header as row 1); give match, non-match or hold, or "
                                     "leave those rows out"]),
    ("1,match\n ,match\n", ["row 3 has no pair_id;"]),  # was "pair_id None must be a whole..."
    ("1e23,match\n", ["1 unknown pair id: 1e23;"]),
])
def test_a_label_file_that_says_nothing_clear_writes_nothing(
        body: str, needles: list[str], sample_project: Path, tmp_path: Path, capsys) -> None:
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n" + body, encoding="utf-8")
    before = sample_project.read_bytes()
    assert main(["label", str(sample_project), "--reviewer", "newbie", "--from", str(rows)]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and all(n in err for n in needles), err
    assert sample_project.read_bytes() == before


@pytest.mark.parametrize("command, name, body, needle", [
    ("label", "labels.jsonl", '{"pair_id": 1, "label": "match"}\n'
     '{"pair_id": 2, "label": "yes"}\n', "record 2: label 'yes'"),
    ("label", "labels.jsonl", '{"pair_id": 1, "label": "match"}\n'
     '{"pair_id": 1, "label": "non-match"}\n', "records 1 and 2 label pair 1"),
    # was "not a candidate pair of this project: record 1 (None, S-10001)"
    ("label", "labels.jsonl", '{"left_id": null, "right_id": "S-10001", "label": "match"}\n',
     "record 1 has no left_id;"),
    ("evaluate", "scores.jsonl", '{"left_id": "N-00001", "right_id": "S-10001", "score": 0.5}\n'
     '{"left_id": "N-00002", "right_id": "S-10002", "score": "x"}\n', "record 2 has 'x'"),
])
def test_a_json_lines_file_names_its_lines_as_they_are_counted(
        command: str, name: str, body: str, needle: str, sample_project: Path, tmp_path: Path,
        capsys) -> None:
    # a JSON-lines file has no header, yet its second line was named "row 3", as in a CSV
    rows = tmp_path / name
    rows.write_text(body, encoding="utf-8")
    args = ["--reviewer", "newbie", "--from"] if command == "label" else ["--predictions"]
    assert main([command, str(sample_project), *args, str(rows)]) == 2
    assert needle in capsys.readouterr().err


def test_rows_go_in_batches_each_its_own_transaction(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        ids = [i.pair_id for i in p.next_pairs("ana", 7)]
        rows = [BulkRow(pid, "match" if k % 2 else "non-match", "") for k, pid in enumerate(ids)]
        statements: list[str] = []
        p.connection.set_trace_callback(statements.append)
        assert apply_rows(p, "ana", rows, batch=3, seconds=float('inf'), pause=0) == 7
        p.connection.set_trace_callback(None)
        assert statements.count("COMMIT") == 3  # 3 + 3 + 1 rows
        assert {pid for (pid, who) in _standing(p) if who == "ana"} == set(ids)


def test_a_batch_that_fails_takes_back_the_ones_before(sample_project: Path, monkeypatch) -> None:
    with Project.open(sample_project) as p:
        ids = [i.pair_id for i in p.next_pairs("ana", 6)]
        p.decide(ids[0], "ben", "match")  # someone else's label stays whatever happens
        p.decide(ids[1], "ana", "hold")  # ana's own earlier label comes back
        want = _standing(p)
        calls = {"n": 0}
        real = bulk.claims.release_many

        def full_disk(conn: sqlite3.Connection, reviewer: str, pair_ids: list[int]) -> None:
            calls["n"] += 1
            if calls["n"] == 3:  # in the third batch of two
                raise sqlite3.OperationalError("database or disk is full")
            real(conn, reviewer, pair_ids)

        monkeypatch.setattr(bulk.claims, "release_many", full_disk)
        rows = [BulkRow(pid, "non-match", "bulk") for pid in ids]
        with pytest.raises(DocketError, match="disk full"):
            apply_rows(p, "ana", rows, batch=2, seconds=float('inf'), pause=0)
        assert _standing(p) == want
        assert p.connection.execute("SELECT standing FROM reviewers WHERE name = 'ana'"
                                    ).fetchone() == (1,)
        with pytest.raises(DocketError, match="disk full"):
            calls["n"] = 0
            apply_rows(p, "cleo", rows, batch=2, seconds=float('inf'), pause=0)
        # The log shows cleo's run and its retraction; no label of hers stands.
        assert {r["name"]: r["labels"] for r in list_reviewers(p)}["cleo"] == 0


def test_a_label_file_headed_in_another_case_is_read(sample_project: Path, tmp_path: Path,
                                                     capsys) -> None:
    rows = tmp_path / "labels.csv"
    rows.write_text("Pair_ID, Label ,NOTE\n1,Match,same phone\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    with Project.open(sample_project) as p:
        (d,) = p.decisions()
    assert (d.pair_id, d.label, d.note) == (1, "match", "same phone")


def test_ctrl_c_in_the_refit_after_label_says_the_decisions_stand(
        sample_project: Path, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # "interrupted; nothing was half-written" came after every decision was committed
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n2,non-match\n", encoding="utf-8")

    def cut(_self: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(Project, "refit", cut)
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 130
    assert capsys.readouterr().err.strip() == (
        "docket: interrupted; the 2 decisions for maya are recorded; the refit was cut short, "
        "so the model stays as it was until the next one (a review or label refits it)")
    with Project.open(sample_project) as p:
        assert sorted((d.pair_id, d.label) for d in p.decisions()) == [
            (1, "match"), (2, "non-match")]


def test_a_refit_that_read_its_labels_first_never_overwrites_a_later_one(
        sample_project: Path, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # Two label commands at once: the one that read its labels first finished its fit last
    # and wrote a model of fewer labels over the other's, saying nothing.
    import docket.core.project as facade
    from docket.core.storage import refit as refitting
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n2,non-match\n", encoding="utf-8")
    later = [(pid, "match" if pid % 3 else "non-match") for pid in range(3, 40)]

    def meanwhile(conn: sqlite3.Connection, labels: dict[int, int], mark: int) -> object:
        monkeypatch.setattr(facade, "refit", refitting.refit)  # only this call interleaves
        with Project.open(sample_project) as other:  # another process, while this one fits
            for pid, label in later:
                other.decide(pid, "ola", label)
            other.refit()
            theirs = other.meta["ranker_note"]
        result = refitting.refit(conn, labels, mark)
        with Project.open(sample_project) as after:
            assert after.meta["ranker_note"] == theirs  # the model of more labels stands
        return result

    monkeypatch.setattr(facade, "refit", meanwhile)
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    assert capsys.readouterr().out.strip() == (
        "recorded 2 decisions for maya; refit: not written, as another process had meanwhile "
        "refit the model on later decisions; that model stands")
    with Project.open(sample_project) as p:  # the next refit is written
        assert not p.refit().superseded


def test_pair_ids_that_name_other_pairs_than_the_ids_beside_them_are_refused(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # pair ids belong to one build: from another copy they named other pairs, and the record
    # ids beside them were ignored, so the labels went to the wrong pairs
    with Project.open(sample_project) as p:
        (a1, b1), (a2, b2) = (p.connection.execute(
            "SELECT left_id, right_id FROM pairs WHERE pair_id = ?", (k,)).fetchone()
            for k in (1, 2))
    rows = tmp_path / "labels.csv"
    rows.write_text(f"pair_id,left_id,right_id,label\n1,{a1},{b1},match\n"
                    f"2,{a1},{b1},non-match\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    assert capsys.readouterr().err.strip() == (
        f"docket: {rows}: row 3: pair 2 is {a2} and {b2}, but the row names {a1} and {b1}; give "
        "the pair ids of this project (docket next or the scores export), or leave the "
        "pair_id column out; nothing was written")
    with Project.open(sample_project) as p:
        assert p.decisions() == []
    rows.write_text(f"pair_id,left_id,right_id,label\n2,{a2},{b2},match\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0


def test_a_json_label_row_with_a_key_twice_is_refused(sample_project: Path, tmp_path: Path,
                                                      capsys) -> None:
    # the reader kept the last 'label' silently, where a CSV header with a column twice is
    # refused
    rows = tmp_path / "labels.jsonl"
    rows.write_text('{"pair_id": 1, "label": "match"}\n'
                    '{"pair_id": 2, "label": "match", "label": "non-match"}\n', encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    assert capsys.readouterr().err.strip() == (
        f"docket: {rows}: line 2 gives the key 'label' twice, and which one is meant cannot be "
        "told; give each key once")
    with Project.open(sample_project) as p:
        assert p.decisions() == []


def test_label_says_which_labels_the_refit_set_aside(sample_project: Path, tmp_path: Path,
                                                     capsys) -> None:
    # It said '(audit pairs, judged apart, and pairs still waiting for another reviewer)',
    # yet counted only the pairs still open for another reviewer; audit pairs are fitted on.
    with Project.open(sample_project) as p:
        overlap = [r[0] for r in p.connection.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 1 ORDER BY pair_id LIMIT 3")]
        audit = [r[0] for r in p.connection.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 0 AND audit = 1 ORDER BY pair_id LIMIT 2")]
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n" + "".join(f"{i},non-match\n" for i in overlap + audit),
                    encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    out = capsys.readouterr().out
    assert "2 labelled pairs used; 3 set aside until another reviewer has labelled them" in out
    assert "audit" not in out


def test_a_label_file_the_disk_has_no_room_for_is_refused_before_writing(
        sample_project: Path, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # a disk that filled half way left 849 labels written that could not be taken back
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label,note\n1,match,same phone\n2,non-match,\n3,hold,\n",
                    encoding="utf-8")
    monkeypatch.setattr(file_health.shutil, "disk_usage",
                        lambda _p: shutil._ntuple_diskusage(10**9, 10**9 - 5_000, 5_000))
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"docket: {sample_project}: disk full: recording 3 decisions needs "
                          "about 4.") and err.endswith(
        " MB and 0.0 MB are free; free some space and try again; nothing was written\n")
    with Project.open(sample_project) as p:
        assert _standing(p) == {}


def test_labels_that_a_full_disk_keeps_from_taking_back_are_said_to_stand(
        sample_project: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # the taking back needs room as well; "nothing was saved" was said of labels that stood
    with Project.open(sample_project) as p:
        ids = [i.pair_id for i in p.next_pairs("ana", 6)]
        calls = {"n": 0}
        real = bulk.log.append_many

        def append(conn: sqlite3.Connection, *args: object) -> object:
            calls["n"] += 1
            if calls["n"] >= 3:  # the third batch of two, and the retraction after it
                raise sqlite3.OperationalError("database or disk is full")
            return real(conn, *args)  # type: ignore[arg-type]

        monkeypatch.setattr(bulk.log, "append_many", append)
        rows = [BulkRow(pid, "match", "") for pid in ids]
        with pytest.raises(DocketError) as caught:
            apply_rows(p, "ana", rows, batch=2, seconds=float('inf'), pause=0)
        assert str(caught.value) == (
            f"{p.path}: 4 decisions of the 6 for ana were recorded and could not be taken back, "
            "as the disk is full: they stand; free some space, then run the same docket label "
            "again to record the rest (rows recorded already are not recorded again)")
        assert len(_standing(p)) == 4


def test_a_full_disk_in_the_refit_after_label_says_the_decisions_stand(
        sample_project: Path, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # 'disk full; nothing was saved' was said after every decision had been committed
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n2,non-match\n", encoding="utf-8")

    def full(self: Project) -> None:  # as a transaction reports it
        cause = sqlite3.OperationalError("database or disk is full")
        raise file_health.ProjectFileError(file_health.explain(cause, self.path)) from cause

    monkeypatch.setattr(Project, "refit", full)
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    assert capsys.readouterr().err == (
        f"docket: {sample_project}: the 2 decisions for maya are recorded; the refit could not "
        "be written (the disk is full; free some space), so the model stays as it was until "
        "the next one (a review or label refits it)\n")
    with Project.open(sample_project) as p:
        assert sorted((d.pair_id, d.label) for d in p.decisions()) == [
            (1, "match"), (2, "non-match")]
