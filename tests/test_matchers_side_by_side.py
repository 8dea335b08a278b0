"""evaluate --matchers: figures per matcher, kappa, paired differences, coverage on DBLP-ACM."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from docket.core import Project
from docket.core.matchers.importing import import_matchers
from docket.core.matchers.judged import Judged
from docket.core.matchers.paired import paired_difference
from docket.core.matchers.side_by_side import figures, side_by_side
from docket.core.ordering import queue
from docket.core.quality.evaluate import sample_from
from docket.tui.cli import main
from tests.coverage_support import holds_nominal
from tests.matchers_support import (
    SAMPLE_TRUTH,
    answer_audit,
    candidates,
    dblp_arrays,
    flipped,
    is_match,
    label_file,
)

RUNS = 100  # the long version (bench/matchers_coverage.py) runs 300


@pytest.fixture
def judged_sample(sample_project: Path, tmp_path: Path) -> Project:
    with Project.open(sample_project) as p:
        answer_audit(p, SAMPLE_TRUTH)
        frame = candidates(p)
        y = is_match(frame, SAMPLE_TRUTH)
        path = label_file(tmp_path / "m.csv", frame, {"truth": y, "noisy": flipped(y, 0.1, 1)})
        import_matchers(p, [path])
        yield p


def _row(report: dict, name: str) -> dict:
    return next(m for m in report["matchers"] if m["name"] == name)


def test_a_matcher_equal_to_the_truth_scores_kappa_one_and_precision_recall_one(
        judged_sample: Project) -> None:
    # Definition (common practice): a rater identical to the reference agrees on every pair,
    # so Cohen's kappa is 1 and there is neither a false positive nor a missed match.
    report = side_by_side(judged_sample)
    row = _row(report, "truth")
    assert row["kappa_gold"]["kappa"] == 1.0
    assert row["precision"]["value"] == 1.0 and row["recall"]["value"] == 1.0
    assert row["f1"]["value"] == 1.0
    assert row["audit_pairs"] == report["audit"]["labelled"] == 1000
    noisy = _row(report, "noisy")
    assert noisy["kappa_gold"]["kappa"] < 1.0 and noisy["precision"]["value"] < 1.0
    f1 = next(d for d in report["differences"] if d["measure"] == "f1"
              and {d["first"], d["second"]} == {"truth", "noisy"})
    assert f1["low"] > 0 if f1["first"] == "truth" else f1["high"] < 0
    assert f1["verdict"] == "truth has the higher F1"


def test_evaluate_matchers_command_human_and_json(judged_sample: Project, capsys) -> None:
    judged_sample.close()
    path = str(judged_sample.path)
    assert main(["evaluate", path, "--matchers"]) == 0
    out = capsys.readouterr().out
    assert "matchers side by side" in out and "truth has the higher F1" in out
    assert main(["evaluate", path, "--matchers", "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    assert {m["name"] for m in report["matchers"]} == {"truth", "noisy", "(model)"}
    assert main(["evaluate", path, "--matchers", "--threshold", "0.3"]) == 2
    assert "does not go with --matchers" in capsys.readouterr().err


# -- outside check: DBLP-ACM ------------------------------------------------------------------
@pytest.fixture(scope="module")
def dblp(dblp_acm: Path, dblp_project_file: Path) -> tuple:
    """(model probability, is a true match) per DBLP-ACM candidate pair, in pair-id order."""
    return dblp_arrays(dblp_acm, dblp_project_file)


def _true(pred: np.ndarray, y: np.ndarray) -> dict[str, float]:
    tp = float((pred & y).sum())
    return {"precision": tp / pred.sum(), "recall": tp / y.sum(),
            "f1": 2 * tp / (pred.sum() + y.sum())}


def redrawn(prob: np.ndarray, y: np.ndarray, seed: int, matchers: dict[str, np.ndarray]
            ) -> Judged:
    """A fresh audit slice (what another --seed at 'docket new' draws), answered by the truth."""
    a = queue.draw_audit(prob, queue.default_audit_size(prob.size), seed)
    at = np.flatnonzero(a.selected)
    sample = sample_from(np.zeros(at.size), y[at].astype(int).tolist(), a.stratum[at],
                         a.inclusion[at], a.sizes)
    everything = np.ones(prob.size, dtype=bool)
    return Judged(list(matchers), dict.fromkeys(matchers), matchers,
                  dict.fromkeys(matchers, everything), np.arange(1, prob.size + 1), at, sample,
                  at, y[at].astype(np.int64),
                  {int(h): np.flatnonzero(a.stratum == h) for h in np.unique(a.stratum)})


@pytest.mark.outside
def test_a_flipped_truth_is_recovered_within_its_intervals(dblp: tuple, capsys) -> None:
    # Outside check: DBLP-ACM benchmark (Köpcke, Thor & Rahm, PVLDB 2010), truth from its
    # matches.csv; the matcher is that truth with 5 % of answers flipped at random, so its
    # true precision and recall over the candidate pairs are known. Nominal 95 %, judged by
    # holds_nominal.
    prob, y = dblp
    hits = {"precision": 0, "recall": 0}
    for seed in range(1, RUNS + 1):
        pred = flipped(y, 0.05, 1000 + seed)
        truth = _true(pred, y)
        row = figures(redrawn(prob, y, seed, {"lm": pred}), "lm")
        for m in hits:
            hits[m] += row[m]["low"] <= truth[m] <= row[m]["high"]
    with capsys.disabled():
        print(f"\nflipped truth on DBLP-ACM, {RUNS} runs: precision {hits['precision']}/{RUNS},"
              f" recall {hits['recall']}/{RUNS} within their 95% intervals")
    assert all(holds_nominal(k, RUNS) for k in hits.values())


@pytest.mark.outside
def test_the_paired_difference_covers_the_true_difference(dblp: tuple, capsys) -> None:
    # Outside check: DBLP-ACM as above; two matchers, the truth with 3 % and with 8 % of
    # answers flipped, so their true difference in F1, precision and recall is known.
    # Nominal 95 %, judged by holds_nominal.
    prob, y = dblp
    hits = dict.fromkeys(("precision", "recall", "f1"), 0)
    for seed in range(1, RUNS + 1):
        a, b = flipped(y, 0.03, 2000 + seed), flipped(y, 0.08, 3000 + seed)
        ta, tb = _true(a, y), _true(b, y)
        judged = redrawn(prob, y, seed, {"a": a, "b": b})
        sa, sb = judged.sample_for("a"), judged.sample_for("b")
        for m in hits:
            d = paired_difference(sa, "a", sb, "b", m)
            hits[m] += d.low <= ta[m] - tb[m] <= d.high
    with capsys.disabled():
        print(f"\npaired differences on DBLP-ACM, {RUNS} runs: "
              + ", ".join(f"{m} {k}/{RUNS}" for m, k in hits.items()))
    assert all(holds_nominal(k, RUNS) for k in hits.values())


def test_the_model_row_is_what_evaluate_reports(sample_project: Path, tmp_path: Path) -> None:
    # Part of the audit slice labelled, as in a project under way: every matcher's predicted
    # matches per stratum are counted over all candidate pairs, as evaluate counts the model's,
    # so the model's row must equal evaluate's figures at the threshold.
    from docket.core.quality.evaluate import evaluate
    with Project.open(sample_project) as p:
        audit = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs WHERE "
                                     "audit = 1 ORDER BY pair_id LIMIT 60").fetchall()
        for pid, a, b in audit:
            p.decide(pid, "oracle", "match" if (a, b) in SAMPLE_TRUTH else "non-match")
        frame = candidates(p)
        y = is_match(frame, SAMPLE_TRUTH)
        import_matchers(p, [label_file(tmp_path / "m.csv", frame, {"truth": y})])
        report = side_by_side(p)
        plain = evaluate(p)["at_threshold"]
    model = _row(report, "(model)")
    for measure in ("precision", "recall", "f1"):
        for end in ("value", "low", "high"):
            assert model[measure][end] == pytest.approx(plain[measure][end]), (measure, end)
    truth = _row(report, "truth")
    # 60 labels leave about ten in the lowest stratum's 24,000 pairs, which no label shows a
    # match in: recall's lower end allows for the matches they cannot rule out and may reach 0
    # (tests/test_unseen_matches.py); the point and the upper end stay those of a perfect rater
    assert truth["recall"]["value"] == 1.0 and truth["recall"]["high"] == 1.0
    assert truth["recall"]["low"] < 1.0 and truth["precision"]["high"] == 1.0
