"""``docket score`` and the model file: every pair scored back with the project's model."""

from __future__ import annotations

import importlib.util
import json
from pathlib import Path

import pandas as pd
import pytest

from docket.core import Project
from docket.tui.cli import main
from tests.conftest import SAMPLE, sample_spec
from tests.quality import answer_in_queue_order, load_truth
from tests.test_bad_input import assert_one_line_error, run


def _project_scores(path: Path) -> pd.DataFrame:
    with Project.open(path) as p:
        return pd.read_sql_query(
            "SELECT p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
            "USING (pattern_id)", p.connection)


def _scored(folder: Path) -> pd.DataFrame:
    parts = sorted(folder.glob("*.parquet"))
    assert parts
    return pd.concat([pd.read_parquet(p) for p in parts], ignore_index=True)


def _same(scored: pd.DataFrame, expected: pd.DataFrame) -> None:
    both = expected.merge(scored, on=["left_id", "right_id"], suffixes=("", "_scored"))
    assert len(both) == len(expected)
    assert (both["probability"] - both["probability_scored"]).abs().max() < 1e-12
    assert set(scored.columns) >= {"log_odds", "predicted"}


@pytest.fixture
def refitted(sample_project: Path) -> Path:
    truth = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")
    with Project.open(sample_project) as p:
        answer_in_queue_order(p, truth, 60)  # so the model is the refitted one, not EM's
    return sample_project


def test_score_reproduces_the_projects_probabilities(refitted: Path, tmp_path: Path,
                                                     capsys) -> None:
    expected = _project_scores(refitted)
    pairs = tmp_path / "pairs.parquet"
    expected[["left_id", "right_id"]].to_parquet(pairs, index=False)
    assert main(["score", str(refitted), "--pairs", str(pairs), "-o",
                 str(tmp_path / "out")]) == 0
    _same(_scored(tmp_path / "out"), expected)

    model = tmp_path / "model.json"
    assert main(["export", str(refitted), "--what", "model", "-o", str(model)]) == 0
    assert json.loads(model.read_text())["format"] == "docket-model"
    assert model.stat().st_size < 200_000
    assert main(["score", str(refitted), "--model", str(model), "--pairs", str(pairs), "-o",
                 str(tmp_path / "out2")]) == 0
    _same(_scored(tmp_path / "out2"), expected)


def test_scoring_all_pairs_of_a_sampled_project(sample_project_file: Path,
                                                tmp_path: Path) -> None:
    small = tmp_path / "small.docket"
    Project.create(sample_spec(small, sample_above=3000))
    everything = _project_scores(sample_project_file)
    pairs = tmp_path / "pairs"
    pairs.mkdir()
    for i in range(3):
        everything.iloc[i::3][["left_id", "right_id"]].to_parquet(pairs / f"p{i}.parquet")
    assert main(["score", str(small), "--pairs", str(pairs), "-o", str(tmp_path / "out"),
                 "--left", str(SAMPLE / "practice_north.csv"), "--right",
                 str(SAMPLE / "practice_south.csv")]) == 0
    scored = _scored(tmp_path / "out")
    assert len(scored) == len(everything)
    _same(scored, _project_scores(small))  # the kept pairs score as the project has them


@pytest.mark.skipif(importlib.util.find_spec("distributed") is None,
                    reason="the optional extra docket[dask] is not installed")
def test_score_on_dask_matches_in_process(sample_project_file: Path, tmp_path: Path,
                                          dask_scheduler: str) -> None:
    expected = _project_scores(sample_project_file)
    pairs = tmp_path / "pairs.csv"
    expected[["left_id", "right_id"]].to_csv(pairs, index=False)
    assert main(["score", str(sample_project_file), "--pairs", str(pairs), "-o",
                 str(tmp_path / "out"), "--engine", "dask", "--scheduler", dask_scheduler]) == 0
    _same(_scored(tmp_path / "out"), expected)


def test_score_refuses_an_existing_output(sample_project_file: Path, tmp_path: Path,
                                          capsys) -> None:
    (tmp_path / "out").mkdir()
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\nN-00001,S-00001\n", encoding="utf-8")
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs), "-o",
                    str(tmp_path / "out"))
    assert_one_line_error(code, err, "already exists")
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs), "-o",
                    str(tmp_path / "new"), "--model", str(pairs))
    assert_one_line_error(code, err, "model")
    assert not (tmp_path / "new").exists()
    # written inside the folder of pairs, its parts were read as pairs the next time
    folder = tmp_path / "parts"
    folder.mkdir()
    pd.DataFrame({"left_id": ["N-00001"], "right_id": ["S-10001"]}).to_parquet(
        folder / "part-0.parquet", index=False)
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(folder), "-o",
                    str(folder / "scored"))
    assert_one_line_error(code, err, "scored: inside the folder of pairs")
    assert [p.name for p in folder.iterdir()] == ["part-0.parquet"]


def test_score_tables_that_do_not_fit_the_project_say_what_to_do(
        sample_project_file: Path, tmp_path: Path, capsys) -> None:
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\nN-00001,S-00001\n", encoding="utf-8")
    other = tmp_path / "other.csv"
    other.write_text("key,owner\nN-00001,Ana\n", encoding="utf-8")
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs), "-o",
                    str(tmp_path / "a"), "--left", str(other))  # said "pass ... --id", no such
    assert_one_line_error(code, err, "no column 'client_id'", "have their ids in 'client_id'; "
                          "give --left a table with that column")
    records = tmp_path / "r.csv"
    records.write_text("id,name\n1,Ana Berg\n2,Ana Berg\n3,Bo Lind\n", encoding="utf-8")
    one = tmp_path / "one.docket"
    assert main(["new", str(one), "--left", str(records), "--block", "*"]) == 0
    pairs.write_text("left_id,right_id\n1,2\n", encoding="utf-8")
    code, err = run(capsys, "score", str(one), "--pairs", str(pairs), "-o", str(tmp_path / "b"),
                    "--right", str(records))  # was ignored, unsaid
    assert_one_line_error(code, err, "one.docket deduplicates one table; give its records "
                          "with --left alone")
    code, err = run(capsys, "score", str(one), "--pairs", str(pairs), "-o", str(tmp_path / "c"),
                    "--workers", "3")  # without --engine dask it was ignored, unsaid
    assert_one_line_error(code, err, "--workers 3: workers of a local Dask cluster; add "
                          "--engine dask")
    assert not any((tmp_path / n).exists() for n in "abc")


def test_score_into_a_folder_it_cannot_write_is_one_line(sample_project_file: Path,
                                                          tmp_path: Path, capsys,
                                                          monkeypatch: pytest.MonkeyPatch
                                                          ) -> None:
    # a read-only folder ended in a traceback (PermissionError from making the parts' folder);
    # a file in the folder's place fails the same way whoever runs it, root included
    with Project.open(sample_project_file, readonly=True) as p:
        a, b = p.connection.execute("SELECT left_id, right_id FROM pairs LIMIT 1").fetchone()
    pairs = tmp_path / "pairs.csv"
    pairs.write_text(f"left_id,right_id\n{a},{b}\n", encoding="utf-8")
    (tmp_path / "file").write_text("", encoding="utf-8")
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs), "-o",
                    str(tmp_path / "file" / "out"))
    assert_one_line_error(code, err, f"{tmp_path / 'file' / 'out'}: cannot write the scored "
                          "parts", "nothing was written")

    def full(*_a: object, **_k: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(pd.DataFrame, "to_parquet", full)  # the disk fills while writing
    code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs), "-o",
                    str(tmp_path / "out"))
    assert_one_line_error(code, err, "disk full while writing the scored parts",
                          "nothing was written")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["file", "pairs.csv"]


def _edited(model: dict, change) -> dict:
    copy = json.loads(json.dumps(model))
    change(copy)
    return copy


def test_a_damaged_or_foreign_model_file_gets_one_line(sample_project_file: Path,
                                                       tmp_path: Path, capsys) -> None:
    model = tmp_path / "model.json"
    assert main(["export", str(sample_project_file), "--what", "model", "-o", str(model)]) == 0
    good = json.loads(model.read_text())
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\nN-00001,S-00001\n", encoding="utf-8")
    edits = {
        "2 fields but log-odds for 9": lambda m: m.update(fields=m["fields"][:2]),
        "unknown kind 'banana'": lambda m: m["fields"][0].update(kind="banana"),
        "log-odds for": lambda m: m["log_odds"]["parts"][0].pop(),
        "not a finite number": lambda m: m["log_odds"].update(base=float("nan")),
        "between 0 and 1": lambda m: m.update(threshold=1.5),
        # a model of other tables: a column these records do not have
        "no column 'owner_x'": lambda m: m["fields"][0].update(left_column="owner_x"),
    }
    capsys.readouterr()
    for i, (needle, change) in enumerate(edits.items()):
        bad = tmp_path / f"bad{i}.json"
        bad.write_text(json.dumps(_edited(good, change)), encoding="utf-8")
        code, err = run(capsys, "score", str(sample_project_file), "--pairs", str(pairs),
                        "-o", str(tmp_path / f"out{i}"), "--model", str(bad))
        assert_one_line_error(code, err, needle)
        assert not (tmp_path / f"out{i}").exists()


def test_a_project_from_before_numbers_had_four_levels_is_refused(tmp_path: Path,
                                                                  capsys) -> None:
    # A project built when a number had three levels (exact, near, different) and missing: its
    # weights, read by today's levels, would give 'different' the weight of 'roughly' and
    # 'missing' that of 'different'. Simulated by taking the 'roughly' weight out.
    import sqlite3

    records = tmp_path / "r.csv"
    records.write_text("id,name,price\n1,Ana Berg,10.5\n2,Ana Berg,10.5\n3,Bo Lind,99.5\n",
                       encoding="utf-8")
    one = tmp_path / "one.docket"
    assert main(["new", str(one), "--left", str(records), "--block", "*"]) == 0
    with sqlite3.connect(one) as conn:
        explain = json.loads(conn.execute("SELECT value FROM meta WHERE key = 'explain'"
                                          ).fetchone()[0])
        del explain["parts"][1][2]
        conn.execute("UPDATE meta SET value = ? WHERE key = 'explain'", (json.dumps(explain),))
    conn.close()
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\n1,2\n", encoding="utf-8")
    code, err = run(capsys, "score", str(one), "--pairs", str(pairs), "-o", str(tmp_path / "o"))
    assert_one_line_error(code, err, "built by an older docket", "'price' (number) has 4 "
                          "log-odds for 5 levels", "build it again")
    code, err = run(capsys, "export", str(one), "--what", "model", "-o", str(tmp_path / "m"))
    assert_one_line_error(code, err, "built by an older docket")
    assert not (tmp_path / "o").exists() and not (tmp_path / "m").exists()
