"""Ids that a spreadsheet takes for formulas ('@anna', '-17', '=1+1'): every CSV export guards
them, and docket's own readers take the guarded ids back as the records' ids."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from docket.core import Project
from docket.tui.cli import main

# '@' a handle, '-' and '+' numbers written as text, '=' and tab cells a spreadsheet runs
# (OWASP "CSV Injection"); "'=x" is an id of its own that only looks guarded.
IDS = ["@anna", "-17", "+4420", "=1+1", "\tlead", "plain", "'=x"]


def _table(path: Path, town: str) -> Path:
    rows = [{"id": k, "name": f"Name {n}", "town": town} for n, k in enumerate(IDS)]
    path.write_text("".join(json.dumps(r) + "\n" for r in rows), encoding="utf-8")
    return path


@pytest.fixture
def project(tmp_path: Path) -> Path:
    left, right = _table(tmp_path / "l.jsonl", "Oslo"), _table(tmp_path / "r.jsonl", "Bergen")
    pairs = tmp_path / "pairs.csv"
    pd.DataFrame({"left_id": IDS, "right_id": IDS[1:] + IDS[:1]}).to_csv(pairs, index=False)
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--right", str(right), "--id", "id",
                 "--pairs", str(pairs)]) == 0
    with Project.open(path) as opened:
        for item in opened.next_pairs("maya", 100):
            opened.decide(item.pair_id, "maya", "match" if item.pair_id % 2 else "non-match")
    return path


def _read(path: Path) -> pd.DataFrame:
    return pd.read_csv(path, dtype=str, keep_default_na=False)


def _standing(path: Path, reviewer: str) -> dict[int, str]:
    with Project.open(path) as opened:
        return {int(p): str(lab) for p, lab in opened.connection.execute(
            "SELECT pair_id, label FROM current WHERE reviewer = ?", (reviewer,))}


def test_every_csv_export_guards_ids(project: Path, tmp_path: Path) -> None:
    # pandas 3 reads SQL text as its string dtype, and the scores export left '=1+1' bare
    for what in ("scores", "gold", "training"):
        target = tmp_path / f"{what}.csv"
        assert main(["export", str(project), "--what", what, "-o", str(target)]) == 0
        ids = set(_read(target)["left_id"])
        assert {"'@anna", "'-17", "'+4420", "'=1+1", "'\tlead", "plain", "'=x"} <= ids, what
    assert main(["export", str(project), "--what", "clusters", "-o",
                 str(tmp_path / "c.csv")]) == 0
    assert "'@anna" in set(_read(tmp_path / "c.csv")["record_id"])


def test_a_guarded_export_reads_back_as_a_label_file(project: Path, tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    gold, scores = tmp_path / "gold.csv", tmp_path / "scores.csv"
    assert main(["export", str(project), "--what", "gold", "-o", str(gold)]) == 0
    # it was refused: "pair 1 is -17 and +4420, but the row names '-17 and '+4420"
    assert main(["label", str(project), "--reviewer", "lee", "--from", str(gold)]) == 0
    assert _standing(project, "lee") == _standing(project, "maya")
    assert len(_standing(project, "lee")) == len(IDS)
    # the scores export, a label column filled in and no pair_id: ids alone name the pairs
    assert main(["export", str(project), "--what", "scores", "-o", str(scores)]) == 0
    frame = _read(scores)
    frame["label"] = "match"
    frame[["left_id", "right_id", "label"]].to_csv(tmp_path / "filled.csv", index=False)
    assert main(["label", str(project), "--reviewer", "kim", "--from",
                 str(tmp_path / "filled.csv")]) == 0
    assert set(_standing(project, "kim").values()) == {"match"}
    assert len(_standing(project, "kim")) == len(IDS)
    capsys.readouterr()
    # and as a matcher's predictions: every id names its record
    assert main(["evaluate", str(project), "--predictions", str(scores)]) == 0
    assert "names no record" not in capsys.readouterr().err


def test_an_apostrophe_that_is_part_of_an_id_stays(project: Path, tmp_path: Path) -> None:
    # "'=x" is a record's id: read as it is, not as '=x' (no such record)
    (tmp_path / "own.csv").write_text("left_id,right_id,label\n'=x,@anna,match\n",
                                      encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "ode", "--from",
                 str(tmp_path / "own.csv")]) == 0
    with Project.open(project) as opened:
        pair = opened.connection.execute(
            "SELECT pair_id FROM pairs WHERE left_id = ? AND right_id = ?",
            ("'=x", "@anna")).fetchone()[0]
    assert _standing(project, "ode") == {pair: "match"}


def test_a_guarded_export_reads_back_as_pairs_to_score_or_build(project: Path,
                                                                tmp_path: Path) -> None:
    # score --pairs and new --pairs refused it: "4 left ids not in ...: ''-17', ''@anna'..."
    scores = tmp_path / "scores.csv"
    assert main(["export", str(project), "--what", "scores", "-o", str(scores)]) == 0
    out = tmp_path / "scored"
    assert main(["score", str(project), "--pairs", str(scores), "-o", str(out)]) == 0
    scored = pd.concat(pd.read_parquet(part) for part in sorted(out.glob("*.parquet")))
    assert sorted(scored["left_id"]) == sorted(IDS)  # the records' ids, not the guarded text
    rebuilt = tmp_path / "again.docket"
    assert main(["new", str(rebuilt), "--left", str(tmp_path / "l.jsonl"), "--right",
                 str(tmp_path / "r.jsonl"), "--id", "id", "--pairs", str(scores)]) == 0
    with Project.open(rebuilt, readonly=True) as p:
        assert sorted(r for (r,) in p.connection.execute("SELECT left_id FROM pairs")) == \
            sorted(IDS)


def test_a_guarded_export_reads_back_as_a_matchers_file(project: Path, tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]
                                                        ) -> None:
    scores = tmp_path / "scores.csv"
    assert main(["export", str(project), "--what", "scores", "-o", str(scores)]) == 0
    frame = _read(scores).rename(columns={"probability": "score"})
    frame[["left_id", "right_id", "score"]].to_csv(tmp_path / "rater.csv", index=False)
    capsys.readouterr()
    assert main(["matchers", str(project), "import", str(tmp_path / "rater.csv")]) == 0
    assert f"{len(IDS)} candidate pairs given, 0 absent" in capsys.readouterr().out
