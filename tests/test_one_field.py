"""A table compared on one field only: docket says its label-free model is no estimate yet."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd

from docket.tui.cli import main

WORDS = ["river", "stone", "lantern", "meadow", "copper", "harbour", "willow", "ember",
         "falcon", "orchard", "summit", "thistle"]


def _titles(path: Path, seed: int = 5) -> Path:
    # Invented titles, every fourth one copied with a typo.
    rng = np.random.default_rng(seed)
    titles = [" ".join(rng.choice(WORDS, 4)) for _ in range(80)]
    titles += [t.replace("e", "a", 1) for t in titles[::4]]
    pd.DataFrame({"id": [f"t{i}" for i in range(len(titles))], "title": titles}).to_csv(
        path, index=False)
    return path


def test_one_field_build_and_status_say_the_probabilities_are_no_estimate(
        tmp_path: Path, capsys) -> None:
    # Two classes mixed over the levels of one field are not identifiable (common practice):
    # many splits fit the counts equally well.
    project = str(tmp_path / "t.docket")
    assert main(["new", project, "--left", str(_titles(tmp_path / "t.csv")),
                 "--id", "id"]) == 0
    assert "only one field is compared" in capsys.readouterr().out
    assert main(["status", project]) == 0
    assert "only one field is compared" in capsys.readouterr().out
    assert main(["status", project, "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    assert any("only one field" in line for line in report["model"]["how_fitted"])


def test_two_fields_say_nothing_of_it(tmp_path: Path, capsys) -> None:
    table = pd.read_csv(_titles(tmp_path / "t.csv"))
    table["year"] = [str(2000 + i % 7) for i in range(len(table))]
    table.to_csv(tmp_path / "t2.csv", index=False)
    project = str(tmp_path / "t2.docket")
    assert main(["new", project, "--left", str(tmp_path / "t2.csv"), "--id", "id"]) == 0
    assert main(["status", project]) == 0
    assert "only one field" not in capsys.readouterr().out
