"""The three reports are typed results: the facade returns one object per report, and the text,
the JSON and the screen are all drawn from it. The JSON keeps the keys and their order that the
report's maker gives (so ``--json`` output did not change with the type)."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.quality.evaluate import evaluate
from docket.core.report import status
from docket.core.results import AgreementReport, Evaluation, StatusReport
from docket.core.reviewing.team import agreement_report
from docket.tui import cli
from docket.tui.agreement_lines import agreement_lines
from docket.tui.evaluation_text import evaluation_lines
from docket.tui.status_text import status_lines
from docket.tui.terminal import json_text
from tests.conftest import SAMPLE
from tests.quality import load_truth

TRUTH = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")


@pytest.fixture(scope="module")
def labelled(sample_project_file: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    # two reviewers on the overlap pairs and one on the whole audit slice, answered from the
    # sample's truth: enough for every report to have figures
    path = tmp_path_factory.mktemp("results") / "sample.docket"
    shutil.copy(sample_project_file, path)
    with Project.open(path) as project:
        rows = project.connection.execute(
            "SELECT pair_id, left_id, right_id, audit FROM pairs WHERE audit = 1 OR overlap = 1"
        ).fetchall()
        for pid, a, b, audit in rows:
            label = "match" if (a, b) in TRUTH else "non-match"
            project.decide(pid, "maya", label)
            if not audit:
                project.decide(pid, "ravi", "hold" if pid % 7 == 0 else label)
    return path


def _same_order(typed: object, made: dict) -> None:
    d = typed.to_dict()  # type: ignore[attr-defined]
    assert list(d) == list(made) and d == made


def test_each_report_is_one_object_drawn_as_text_and_json(labelled: Path, capsys) -> None:
    # the object keeps the maker's keys in their order; --json prints exactly the maker's dict;
    # the text is the lines function of the same object
    with Project.open(labelled, readonly=True) as project:
        name = project.meta.get("name") or project.path.stem
        made = {"status": status(project), "evaluate": evaluate(project),
                "agreement": agreement_report(project)}
        typed = {"status": project.status(), "evaluate": project.evaluate(),
                 "agreement": project.agreement()}
    assert isinstance(typed["status"], StatusReport)
    assert isinstance(typed["evaluate"], Evaluation) and not typed["evaluate"].judges_a_file
    assert isinstance(typed["agreement"], AgreementReport)
    text = {"status": status_lines(typed["status"]),
            "evaluate": evaluation_lines(typed["evaluate"], name),
            "agreement": agreement_lines(typed["agreement"])}
    for command, report in typed.items():
        _same_order(report, made[command])
        assert cli.main([command, str(labelled), "--json"]) == 0
        assert capsys.readouterr().out == json_text(made[command]) + "\n"
        assert cli.main([command, str(labelled)]) == 0
        assert capsys.readouterr().out == "\n".join(text[command]) + "\n"


def test_unknown_sections_are_kept_in_order() -> None:
    # a section a newer estimator adds is neither dropped nor moved
    base = {k: None for k in ("project", "mode", "confidence", "threshold", "audit",
                              "estimates", "at_threshold", "naive", "naive_at_threshold",
                              "best_f1", "suggested", "scope", "methods", "gold_labels",
                              "sampling")}
    made = {**base, "predictions": {"file": "x"}, "machine_rater": {"n": 1},
            "model": {"ranker": "predictions"}, "second_sample": {"n": 3}}
    typed = Evaluation.from_dict(made)
    assert typed.judges_a_file and typed.more == {"second_sample": {"n": 3}}
    _same_order(typed, made)
