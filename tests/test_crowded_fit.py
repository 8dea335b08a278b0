"""A label-free fit that predicts many matches per record is named so by new and status: on a
supplier table whose copies all keep their town, EM took the town for what makes a match
(5,156 predicted matches among 1,491 records, F1 0.09) and nothing said so."""

from __future__ import annotations

import csv
import json
import random
from pathlib import Path

import numpy as np

from docket.core.matching.decision_rule import CROWDED, crowding
from docket.core.report import crowded_note
from docket.tui.cli import main

SYL = ["tor", "ven", "ka", "lum", "bri", "sor", "dal", "mek", "fin", "rav", "pol", "qua"]


def _towns(path: Path, seed: int = 14) -> Path:
    """Firms named from a few syllables, eight or so to a town; a quarter copied, with a typo
    in the name half the time and always the same town (invented, seeded)."""
    rng = random.Random(seed)

    def word(n: int) -> str:
        return "".join(rng.choice(SYL) for _ in range(n)).capitalize()

    rows = []
    for i in range(600):
        name, town = f"{word(2)} {word(1)} Ltd", word(2)
        rows.append([f"S{i:05d}", name, town])
        if rng.random() < 0.25:
            j = rng.randrange(1, len(name) - 1)
            rows.append([f"S{9000 + i:05d}", name if rng.random() < 0.5 else
                         name[:j] + name[j + 1:], town])
    with path.open("w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["supplier_id", "name", "town"])
        w.writerows(rows)
    return path


def test_predicted_matches_per_record() -> None:
    # dedupe: record 0 is in three predicted pairs, 1, 2 and 3 in one each: 6 / 4 = 1.5
    li, ri = np.array([0, 0, 0, 4]), np.array([1, 2, 3, 5])
    yes = np.array([True, True, True, False])
    assert crowding(li, ri, yes, link=False).per_record == 1.5
    # link: the left side's record 0 has three, the right side's one each: the larger, 3
    assert crowding(li, ri, yes, link=True).per_record == 3.0
    assert crowding(li, ri, np.zeros(4, dtype=bool), link=True).predicted == 0


def test_note_only_when_crowded_and_unlabelled() -> None:
    fs = {"fields": ["name", "town"], "m": [[0.9, 0.1], [0.9, 0.1]],
          "u": [[0.1, 0.9], [0.001, 0.999]]}
    crowded = {"predicted": 5156, "per_record": CROWDED + 5.5}
    note = crowded_note(crowded, fs, 0)
    assert note is not None and "5,156 matches, 8.5 for each record" in note
    assert "weighs town most" in note  # ×900 at its top level against name's ×9
    assert crowded_note(crowded, fs, 1) is None
    assert crowded_note({"predicted": 10, "per_record": 1.1}, fs, 0) is None
    assert crowded_note(None, fs, 0) is None


def test_new_and_status_name_a_crowded_fit(tmp_path: Path, capsys) -> None:
    table = _towns(tmp_path / "firms.csv")
    project = tmp_path / "f.docket"
    assert main(["new", str(project), "--left", str(table), "--id", "supplier_id"]) == 0
    said = capsys.readouterr().out
    assert "for each record that has one" in said and "label pairs and refit" in said
    assert main(["status", str(project)]) == 0
    assert "caution: with no labels the model predicts" in capsys.readouterr().out
    assert main(["status", str(project), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["model"]["crowded"]


def test_the_sample_is_not_crowded(sample_project: Path, capsys) -> None:
    assert main(["status", str(sample_project), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["model"]["crowded"] is None
