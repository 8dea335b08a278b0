"""What docket new and status say of a label-free fit that says little: EM that ran out of
rounds, a model whose every level weighs about ×1."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from docket.core.matching import model
from docket.core.report import em_rounds, flat_note
from docket.core.storage import build
from docket.tui.cli import main
from tests.test_one_field import _titles


def test_rounds_that_ran_out_are_named_so() -> None:
    assert em_rounds(13) == "13 rounds" and em_rounds(1) == "1 round"
    assert em_rounds(model.EM_ROUNDS) == \
        f"{model.EM_ROUNDS} rounds, its limit: stopped before it settled"


def test_a_fit_stopped_at_the_limit_is_told_apart_from_one_that_settled(
        tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # a sparse table (90 % of values missing) took EM's 500 rounds and stopped still moving;
    # new and status said "fitted in 500 rounds" as of any fit
    table = pd.read_csv(_titles(tmp_path / "t.csv"))
    table["year"] = [str(2000 + i % 7) for i in range(len(table))]
    table.to_csv(tmp_path / "t2.csv", index=False)
    fit = build.fit_em

    def ran_out(*args, **kw):
        fitted = fit(*args, **kw)
        fitted.iterations = model.EM_ROUNDS
        return fitted

    monkeypatch.setattr(build, "fit_em", ran_out)
    project = tmp_path / "t2.docket"
    assert main(["new", str(project), "--left", str(tmp_path / "t2.csv"), "--id", "id"]) == 0
    assert f"fitted in {model.EM_ROUNDS} rounds, its limit: stopped before it settled" in \
        capsys.readouterr().out
    assert main(["status", str(project), "--json"]) == 0
    said = json.loads(capsys.readouterr().out)["model"]["how_fitted"]
    assert any("its limit: stopped before it settled" in line for line in said)
    monkeypatch.setattr(build, "fit_em", fit)
    assert main(["new", str(project), "--left", str(tmp_path / "t2.csv"), "--id", "id",
                 "--force"]) == 0
    assert "its limit" not in capsys.readouterr().out
    assert main(["status", str(project)]) == 0
    assert "its limit" not in capsys.readouterr().out


def test_a_model_that_tells_no_pair_apart_says_so(tmp_path: Path, capsys) -> None:
    # five copies of one record: every level weighs ×1 and the odds before the fields sit at
    # their bound, printed as "1e6 to 1" with nothing said of what it means
    table = tmp_path / "same.csv"
    table.write_text("id,name,town\n" + "".join(f"{i},Arlo Vesk,Brenn\n" for i in range(5)),
                     encoding="utf-8")
    project = tmp_path / "same.docket"
    assert main(["new", str(project), "--left", str(table), "--id", "id"]) == 0
    assert "note: no field's level moves the odds by as much as ×2" in capsys.readouterr().out
    assert main(["status", str(project)]) == 0
    assert "EM found nothing that tells matches apart" in capsys.readouterr().out


def test_the_flat_note_is_for_a_flat_unlabelled_fit_only() -> None:
    fs = {"fields": ["a", "b"], "m": [[0.5, 0.5], [0.5, 0.5]], "u": [[0.3, 0.7], [0.5, 0.5]],
          "shrink": 1.0, "labels_used": 0}
    assert flat_note(fs) is not None  # x1.67 at most
    assert flat_note({**fs, "m": [[0.7, 0.3], [0.5, 0.5]]}) is None  # x2.33
    assert flat_note({**fs, "m": [[0.7, 0.3], [0.5, 0.5]], "shrink": 0.5}) is not None
    assert flat_note({**fs, "labels_used": 3}) is None
    assert flat_note({**fs, "fields": ["a"], "m": [[0.5, 0.5]], "u": [[0.5, 0.5]]}) is None
