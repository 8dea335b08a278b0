"""Machine raters in: long files and one file per matcher, checks, replacing, status."""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import DocketError, Project
from docket.core.matchers import catalogue
from docket.core.matchers.importing import import_matchers
from docket.core.report import status
from docket.tui.cli import main
from tests.matchers_support import SAMPLE_TRUTH, candidates, is_match, label_file


@pytest.fixture
def project(sample_project: Path) -> Project:
    with Project.open(sample_project) as p:
        yield p


def test_long_file_and_file_per_matcher_are_stored_and_listed(project: Project,
                                                              tmp_path: Path) -> None:
    frame = candidates(project)
    y = is_match(frame, SAMPLE_TRUTH)
    long = label_file(tmp_path / "long.csv", frame, {"a": y, "b": ~y})
    single = tmp_path / "rules.csv"
    pd.DataFrame({"left_id": frame.left_id[:100], "right_id": frame.right_id[:100],
                  "score": np.linspace(0, 1, 100)}).to_csv(single, index=False)
    read = import_matchers(project, [long, single], group="g")
    assert [m.name for m in read] == ["a", "b", "rules"]
    listed = {m["name"]: m for m in status(project)["matchers"]}
    assert listed["rules"]["kind"] == "score" and listed["rules"]["given"] == 100
    assert listed["rules"]["absent"] == len(frame) - 100
    assert listed["a"]["variant_group"] == "g"
    scores = catalogue.load_scores(project.connection, ["a", "rules"])
    assert np.array_equal(scores["a"] == 1.0, y)
    assert np.isnan(scores["rules"][100:]).all()


def test_a_stored_matcher_is_replaced_only_when_asked(project: Project, tmp_path: Path) -> None:
    frame = candidates(project)
    y = is_match(frame, SAMPLE_TRUTH)
    path = label_file(tmp_path / "m.csv", frame, {"lm": y})
    import_matchers(project, [path])
    with pytest.raises(DocketError, match="already stored; pass --replace"):
        import_matchers(project, [path])
    label_file(path, frame, {"lm": ~y})
    import_matchers(project, [path], replace=True)
    assert (catalogue.load_scores(project.connection, ["lm"])["lm"] == 1.0).sum() == (~y).sum()


def test_pairs_outside_the_candidates_are_counted_and_reported(project: Project,
                                                               tmp_path: Path, capsys) -> None:
    frame = candidates(project)
    lefts = sorted(set(frame.left_id))
    rights = sorted(set(frame.right_id))
    known = set(zip(frame.left_id, frame.right_id, strict=True))
    outside = [(a, b) for a in lefts[:40] for b in rights[:40] if (a, b) not in known][:3]
    rows = pd.DataFrame({"left_id": [*frame.left_id[:5], *(a for a, _ in outside)],
                         "right_id": [*frame.right_id[:5], *(b for _, b in outside)],
                         "label": ["match"] * (5 + len(outside))})
    path = tmp_path / "some.csv"
    rows.to_csv(path, index=False)
    project.close()
    assert main(["matchers", str(project.path), "import", str(path)]) == 0
    out = capsys.readouterr().out
    assert "5 candidate pairs given" in out
    assert f"{len(outside)} rows name pairs outside the candidate pairs" in out
    with Project.open(project.path, readonly=True) as p:
        assert catalogue.matchers(p.connection)[0].outside == len(outside) == 3
    rows[4:6].to_csv(path, index=False)  # one outside row: it was "1 rows name pairs"
    assert main(["matchers", str(project.path), "import", str(path), "--name", "one"]) == 0
    assert "  1 row names a pair outside the candidate pairs" in capsys.readouterr().out


def _digest(path: Path) -> str:
    con = sqlite3.connect(path)
    rows = con.execute("SELECT name FROM machine_raters").fetchall()
    con.close()
    return hashlib.sha256(repr(rows).encode()).hexdigest()


@pytest.mark.parametrize(("edit", "expected"), [
    (lambda f: f.assign(left_id=f.left_id.where(f.index != 3, "NOPE-1")),
     "row 5: left_id 'NOPE-1' names no record"),
    (lambda f: f.assign(label=f.label.where(f.index != 2, "maybe")),
     "row 4: label 'maybe' is not match or non-match (or 1 / 0)"),
    (lambda f: f.drop(columns="label").assign(score=[0.5] * 6 + [1.5] + [0.1] * (len(f) - 7)),
     "row 8: score 1.5 lies outside 0 to 1"),
    (lambda f: f.drop(columns="label").assign(score=["x"] + [0.1] * (len(f) - 1)),
     "row 2: score 'x' is not a number"),
    (lambda f: pd.concat([f, f.iloc[[4]]], ignore_index=True),
     "already gave this pair on row 6"),
    (lambda f: f.iloc[:0], "a header and no rows"),
    (lambda f: f.assign(matcher="lm\x1b[31m"), "control characters"),
])
def test_bad_rows_fail_with_one_line_and_store_nothing(sample_project: Path, tmp_path: Path,
                                                       capsys, edit, expected) -> None:
    with Project.open(sample_project) as p:
        frame = candidates(p).head(50)
    good = label_file(tmp_path / "good.csv", frame, {"ok": np.ones(50, dtype=bool)})
    bad = tmp_path / "bad.csv"
    edit(pd.read_csv(good, dtype=str)).to_csv(bad, index=False)
    before = _digest(sample_project)
    assert main(["matchers", str(sample_project), "import", str(good), str(bad)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and str(bad) in err and expected in err, err
    assert _digest(sample_project) == before  # the good file was not stored either


def test_mark_and_remove(project: Project, tmp_path: Path) -> None:
    frame = candidates(project)
    y = is_match(frame, SAMPLE_TRUTH)
    import_matchers(project, [label_file(tmp_path / "m.csv", frame, {"t": y, "s": y, "u": y})])
    with project.transaction() as conn:
        catalogue.mark(conn, "t", role="teacher")
        catalogue.mark(conn, "u", role="teacher")  # one teacher at a time
        catalogue.mark(conn, "s", role="student", threshold=0.7)
    roles = {m.name: (m.role, m.threshold) for m in catalogue.matchers(project.connection)}
    assert roles == {"s": ("student", 0.7), "t": (None, 0.5), "u": ("teacher", 0.5)}
    with project.transaction() as conn:
        catalogue.remove(conn, ["t"])
    with pytest.raises(DocketError, match="no matcher named 'nope'"):
        catalogue.load_scores(project.connection, ["nope"])
    # a group name holding an escape sequence was kept, and acted on every listing
    for group in ("v\x1b[2J", "g" * 61):
        with pytest.raises(DocketError, match=r"--group .*: use 1 to 60 characters"), \
                project.transaction() as conn:
            catalogue.mark(conn, "s", group=group)


def test_an_option_between_the_action_and_the_file_is_understood(project: Project,
                                                                 tmp_path: Path) -> None:
    # argparse fills FILE|NAME before the first option: the file after --name was "unrecognized"
    frame = candidates(project).head(20)
    path = tmp_path / "one.csv"
    pd.DataFrame({"left_id": frame.left_id, "right_id": frame.right_id,
                  "label": "match"}).to_csv(path, index=False)
    project.close()
    assert main(["matchers", str(project.path), "import", "--name", "[b]lm[/b]", str(path)]) == 0
    with Project.open(project.path, readonly=True) as p:
        assert [m.name for m in catalogue.matchers(p.connection)] == ["[b]lm[/b]"]


def test_column_names_in_another_case_are_read(project: Project, tmp_path: Path) -> None:
    # a spreadsheet's 'Left_ID,Right_ID,Matcher,Score' was refused as lacking left_id
    frame = candidates(project)[:50]
    path = tmp_path / "upper.csv"
    pd.DataFrame({"Left_ID": frame.left_id, "RIGHT_ID": frame.right_id, " Matcher": "m",
                  "Score": np.linspace(0, 1, 50)}).to_csv(path, index=False)
    (read,) = import_matchers(project, [path])
    assert read.name == "m"
    scores = catalogue.load_scores(project.connection, ["m"])["m"]
    assert np.count_nonzero(~np.isnan(scores)) == 50


def test_a_label_column_reads_the_words_evaluate_reads(project: Project, tmp_path: Path) -> None:
    # 'nonmatch', 'no-match' and 1 / 0 were refused here ("label 'nonmatch' is not match or
    # non-match") while 'evaluate --predictions' and 'label' read the same file
    from docket.core.quality.predictions_file import read_predictions
    frame = candidates(project)[:8]
    words = ["match", "nonmatch", "1", "0", "Yes", "no-match", "TRUE", "non_match"]
    path = tmp_path / "words.csv"
    pd.DataFrame({"left_id": frame.left_id, "right_id": frame.right_id,
                  "label": words}).to_csv(path, index=False)
    (stored,) = import_matchers(project, [path])
    scores = catalogue.load_scores(project.connection, [stored.name])[stored.name]
    at = np.searchsorted(catalogue.pair_ids(project.connection), frame.pair_id.to_numpy())
    meant = [1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 1.0, 0.0]
    assert scores[at].tolist() == meant
    assert read_predictions(project, path)[0].loc[frame.pair_id].tolist() == meant  # read there


def test_the_scores_export_is_read_as_a_matcher(project: Project, tmp_path: Path,
                                                capsys) -> None:
    # its probability and predicted columns, read by 'evaluate --predictions', were refused
    # here: "needs one column named score (0 to 1) or label (match / non-match), not neither"
    path = tmp_path / "scores.csv"
    assert main(["export", str(project.path), "--what", "scores", "-o", str(path)]) == 0
    (stored,) = import_matchers(project, [path])
    assert stored.kind == "score"
    exported = pd.read_csv(path).sort_values("pair_id")
    scores = catalogue.load_scores(project.connection, [stored.name])[stored.name]
    assert np.allclose(scores, exported["probability"].to_numpy())
    only = tmp_path / "predicted.csv"
    exported[["left_id", "right_id", "predicted"]].to_csv(only, index=False)
    (labels,) = import_matchers(project, [only])
    assert labels.kind == "label"
    neither = tmp_path / "neither.csv"
    exported[["left_id", "right_id"]].to_csv(neither, index=False)
    with pytest.raises(DocketError, match=r"or label \(match / non-match\), and has neither$"):
        import_matchers(project, [neither])
