"""A review screen kept open while another command refits the model (a label file, a merge,
another reviewer's screen): the next pair's factors are the new model's, beside its new
probability, and the counts follow the file.

Seen in a terminal on the sample: after `docket label` refit the model, the open screen showed
'probability 0.209' beside 'odds 1 to 1e50' (the old model's factors) and '40 decided' while
the reviewer had 238 standing labels."""

from __future__ import annotations

import csv
import math
from pathlib import Path

from docket.core import Project
from tests.fixtures_review import SAMPLE, SIZE, pilot_test, press, review, rows, settle


def _label_file(project: Path, folder: Path, skip: set[int]) -> Path:
    """Forty labels from the sample's truth on pairs not in the audit slice and not overlap
    (so each closes and reaches the fit): twenty matches, twenty non-matches."""
    with open(SAMPLE / "truth.csv", encoding="utf-8") as fh:
        truth = {tuple(r) for r in csv.reader(fh)}
    found: dict[str, list[tuple[str, str, str]]] = {"match": [], "non-match": []}
    for pid, left, right in rows(project, "SELECT pair_id, left_id, right_id FROM pairs "
                                          "WHERE audit = 0 AND overlap = 0 ORDER BY pair_id"):
        label = "match" if (left, right) in truth else "non-match"
        if pid not in skip and len(found[label]) < 20:
            found[label].append((left, right, label))
    path = folder / "more.csv"
    with open(path, "w", newline="", encoding="utf-8") as fh:
        out = csv.writer(fh)
        out.writerow(["left_id", "right_id", "label"])
        out.writerows(found["match"] + found["non-match"])
    return path


def _odds_agree(card) -> bool:
    """The probability shown is the logistic of the log-odds the factors add up to."""
    return math.isclose(1 / (1 + math.exp(-card.log_odds)), card.probability, abs_tol=1e-6)


@pilot_test
async def test_a_refit_by_another_command_reaches_the_open_screen(review_sample, review_app,
                                                                  tmp_path):
    app = review_app(review_sample, refit_every=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        screen = review(app)
        assert _odds_agree(screen.card) and screen.decided == 0
        first = screen.card.pair_id
        labels = _label_file(review_sample, tmp_path, {first})
        other = Project.open(review_sample)  # as `docket label` would, beside the screen
        try:
            recorded, refit = other.label_from(labels, "maya")
        finally:
            other.close()
        assert recorded == 40 and refit is not None
        await press(pilot, "d")
        await settle(pilot)
        screen = review(app)
        # before: the old model's factors beside the new probability
        assert _odds_agree(screen.card)
        assert screen.model_note.startswith("model refit: 40 labels")
        assert screen.decided == 41  # the file's forty and the one made here
