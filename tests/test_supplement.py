"""A supplement: a second audit sample stratified on a matcher's own score.

The coverage check is by simulation on an invented population whose truth is known (common
practice: a 95 % interval should hold the truth in about 95 % of repeated samples, loosened for
the few runs a test can afford); the figures it is checked against are counted from that truth,
never from the estimator.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import DocketError, Project
from docket.core.exports.gold_export import gold_frame
from docket.core.ordering import queue
from docket.core.quality.audit_sample import AuditSample
from docket.core.quality.estimates import MEASURES, threshold_table
from docket.core.quality.evaluate import evaluate_predictions
from docket.core.quality.machine_rater import machine_rater
from docket.core.quality.supplement import draw_supplement, stored
from docket.core.quality.union_design import UnionDesign, groups, union_inclusion, union_sample
from docket.core.reviewing.gold import gold_labels
from docket.tui.cli import main

from .coverage_support import synthetic
from .coverage_support_union import union_run

RUNS = 12


def _slice_width(truth: np.ndarray, score: np.ndarray, strata_on: np.ndarray, seed: int
                 ) -> float:
    drawn = queue.draw_audit(strata_on, queue.default_audit_size(truth.size), seed)
    at = np.flatnonzero(drawn.selected)
    sizes = {h: v[0] for h, v in drawn.sizes.items()}
    sample = AuditSample(score[at], truth[at].astype(int), drawn.stratum[at],
                         drawn.inclusion[at], sizes, {h: v[1] for h, v in drawn.sizes.items()},
                         population={h: score[drawn.stratum == h] for h in sizes})
    e = threshold_table(sample, (0.5,))[0]
    return e.precision.high - e.precision.low


def test_the_slice_and_a_supplement_together_cover_and_are_narrower() -> None:
    # The outside matcher's stray high scores sit on pairs the model rules out: the model's
    # audit slice sees few of them, a sample stratified on the matcher's own score many; the
    # matches the matcher scores low sit where the model is sure, which the slice sees.
    pop = synthetic(10_000, seed=3)
    score = pop.matchers["outside"]
    hits: dict[tuple[float, str], int] = {}
    widths: dict[str, list[float]] = {"slice": [], "together": []}
    for seed in range(RUNS):
        found = union_run(pop.truth, pop.strata_score, score, seed, (0.5, 0.9))
        for key, (held, _) in found.items():
            hits[key] = hits.get(key, 0) + int(held)
        widths["together"].append(found[(0.5, "precision")][1])
        widths["slice"].append(_slice_width(pop.truth, score, pop.strata_score, seed))
    assert len(hits) == 2 * len(MEASURES) and all(k >= 11 for k in hits.values()), hits
    assert np.median(widths["together"]) < 0.6 * np.median(widths["slice"]), widths


def test_post_strata_merge_small_cells_within_an_audit_stratum() -> None:
    # audit stratum 0 holds cells (0, 0) with 3 labels, (0, 1) with 2 and (0, 2) with none
    # (a tail: it joins the group before it); stratum 1 one cell, wholly labelled by one pair
    h = np.array([0] * 9 + [1])
    g = np.array([0, 0, 0, 1, 1, 1, 2, 2, 2, 0])
    label = np.array([1, 0, 1, 0, 1, np.nan, np.nan, np.nan, np.nan, 1])
    drawn = ~np.isnan(label)
    design = UnionDesign(np.linspace(0, 1, 10), label, np.zeros(10, bool), h, g, drawn,
                         np.zeros(10, bool))
    assert groups(design).tolist() == ["0:0"] * 3 + ["0:1-2"] * 6 + ["1:0"]
    sample, cells = union_sample(design)
    assert cells == {"0:0": (3, 3), "0:1-2": (6, 2), "1:0": (1, 1)}
    assert sample.n_labelled == 6
    # the chance of being in either of two independent samples
    assert union_inclusion(np.array([0.1, 0.5]), np.array([0.2, 0.0])) == pytest.approx(
        [0.28, 0.5])


def _matcher_file(project: Project, folder: Path) -> Path:
    """An invented matcher: a score from a hash of the pair's ids, higher for true matches."""
    frame = pd.read_sql_query("SELECT left_id, right_id FROM pairs", project.connection)
    digest = [int(hashlib.sha256(f"{a}|{b}".encode()).hexdigest()[:8], 16) / 2 ** 32
              for a, b in zip(frame.left_id, frame.right_id, strict=True)]
    frame["score"] = np.round(np.asarray(digest), 4)
    path = folder / "matcher.csv"
    frame.to_csv(path, index=False)
    return path


def test_draw_store_review_and_evaluate(sample_project: Path, tmp_path: Path, capsys) -> None:
    with Project.open(sample_project) as project:
        path = _matcher_file(project, tmp_path)
    assert main(["supplement", str(sample_project), "--predictions", str(path), "--size",
                 "120", "--json"]) == 0
    made = json.loads(capsys.readouterr().out)
    with Project.open(sample_project) as project:
        rows = project.connection.execute(
            "SELECT s.pair_id, s.stratum, s.inclusion, p.audit FROM supplement_pairs s "
            "JOIN pairs p ON p.pair_id = s.pair_id").fetchall()
        assert len(rows) == made["size"] == 120
        for _, h, pi, _ in rows:  # inclusion probability = n_h / N_h of its stratum
            big, n = made["strata"][str(h)]
            assert pi == pytest.approx(n / big)
        assert sum(n for _, n in made["strata"].values()) == 120
        # its pairs come in the audit share of the queue, marked as audit pairs (one may also
        # come up in the model's order: its label counts all the same)
        wanted = {r[0] for r in rows}
        served, as_audit = set(), 0
        for _ in range(60):
            item = project.next_pairs("maya", 1)[0]
            if item.pair_id in wanted:
                served.add(item.pair_id)
                as_audit += item.reason == "audit"
            project.decide(item.pair_id, "maya", "non-match")
        assert as_audit >= 5
        with pytest.raises(DocketError, match="drawn on these scores already"):
            draw_supplement(project, path)
        audit = {r[0] for r in project.connection.execute(
            "SELECT pair_id FROM pairs WHERE audit = 1")}
        decided = {g.pair_id for g in gold_labels(project.connection)}
        report = evaluate_predictions(project, path, supplement=True)
        assert report["audit"]["labelled"] == len(decided & (audit | wanted))
        assert report["audit"]["drawn"] == len(audit | wanted)
        assert "audit slice and the supplement" in report["audit"]["sample"]
        assert report["at_threshold"]["recall"]["value"] is None  # every label a non-match
        assert list(stored(project)) == [made["fingerprint"]]
        # the gold export carries each supplement pair's design beside the audit slice's: a
        # stratum's weights add up to its N_g pairs (common practice, as for the slice)
        gold = gold_frame(project)
        entries = [(pid, e) for pid, v in zip(gold.pair_id, gold.supplements, strict=True)
                   if isinstance(v, str) for e in json.loads(v)]
        assert {pid for pid, _ in entries} == decided & wanted
        pi_a = dict(project.connection.execute("SELECT pair_id, inclusion FROM pairs"))
        weights: dict[int, float] = {}
        for pid, e in entries:
            big, n = made["strata"][str(e["stratum"])]
            assert e["supplement"] == made["fingerprint"]
            assert e["inclusion_probability"] == pytest.approx(n / big)
            assert e["union_inclusion_probability"] == pytest.approx(
                1 - (1 - pi_a[pid]) * (1 - n / big))
            weights[e["stratum"]] = weights.get(e["stratum"], 0.0) + e["weight"]
        for g, total in weights.items():
            assert total == pytest.approx(made["strata"][str(g)][0])
    assert main(["evaluate", str(sample_project), "--predictions", str(path),
                 "--supplement"]) == 0
    assert "quality from the audit slice and the supplement drawn on" in capsys.readouterr().out


def test_bad_supplement_requests_fail_with_one_line_and_change_nothing(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    with Project.open(sample_project) as project:
        path = _matcher_file(project, tmp_path)
    before = sample_project.read_bytes()
    wide = tmp_path / "wide.csv"
    pd.read_csv(path).assign(score=lambda f: f.score * 10).to_csv(wide, index=False)
    empty = tmp_path / "empty.csv"  # was drawn on: every pair in one stratum, as absent
    empty.write_text("left_id,right_id,score\n", encoding="utf-8")
    cases = [(["supplement", str(sample_project), "--predictions", str(empty)],
              "a header and no rows"),
             (["evaluate", str(sample_project), "--predictions", str(empty)],
              "a header and no rows"),
             (["supplement", str(sample_project), "--predictions", str(wide)], "outside 0…1"),
             (["supplement", str(sample_project), "--predictions", str(path), "--size", "0"],
              "--size 0"),
             (["evaluate", str(sample_project), "--predictions", str(path), "--supplement"],
              "no supplement was drawn"),
             (["evaluate", str(sample_project), "--supplement"], "go with --predictions")]
    for argv, message in cases:
        assert main(argv) == 2
        err = capsys.readouterr().err.strip()
        assert message in err and "\n" not in err and "Traceback" not in err, err
    assert sample_project.read_bytes() == before


def test_machine_rater_kappa_from_a_handful_of_audit_pairs_is_too_few_to_say(
        sample_project: Path) -> None:
    with Project.open(sample_project) as project:
        audit = [r[0] for r in project.connection.execute(
            "SELECT pair_id FROM pairs WHERE audit = 1 ORDER BY pair_id LIMIT 3")]
        for pid in audit:
            project.decide(pid, "maya", "match")
        every = pd.read_sql_query("SELECT pair_id FROM pairs", project.connection)["pair_id"]
        m = machine_rater(project, pd.Series(True, index=every))
    assert m["n"] <= 3 and m["kappa"] is None and m["ci_low"] is None
    assert m["band"] == "too few pairs to say"
