"""Variants, ensembles and the distillation check, against reference libraries and simulations."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from docket.core import DocketError, Project
from docket.core.matchers import catalogue
from docket.core.matchers.distillation import compare
from docket.core.matchers.ensembles import (
    MATCH,
    MISSING,
    NON_MATCH,
    majority_vote,
    pattern_dawid_skene,
    store_ensemble,
)
from docket.core.matchers.importing import import_matchers
from docket.core.matchers.side_by_side import side_by_side
from docket.core.matchers.stability import group_stability
from tests.matchers_support import (
    SAMPLE_TRUTH,
    answer_audit,
    candidates,
    flipped,
    is_match,
    label_file,
)


def test_fleiss_kappa_among_variants_matches_statsmodels() -> None:
    # Outside check: statsmodels.stats.inter_rater.fleiss_kappa on the same subjects x
    # categories table (reference library, test-only dependency).
    from statsmodels.stats.inter_rater import fleiss_kappa
    y = np.random.default_rng(3).random(2000) < 0.15
    predicted = {f"v{i}": flipped(y, 0.04 * (i + 1), i) for i in range(3)}
    got = group_stability(predicted, list(predicted))
    votes = np.sum(list(predicted.values()), axis=0)
    assert got["fleiss_kappa"] == pytest.approx(
        fleiss_kappa(np.stack([votes, 3 - votes], axis=1), method="fleiss"), abs=1e-12)
    split = (votes > 0) & (votes < 3)
    assert got["flipping_pairs"] == int(split.sum())
    assert got["pairwise"][0]["flip_share"] == pytest.approx(
        np.mean(predicted["v0"] != predicted["v1"]))


def test_dawid_skene_recovers_known_confusion_matrices() -> None:
    # Simulation with known truth (common practice for latent-class models): 20,000 pairs, 20 %
    # matches, four raters with the sensitivities and specificities below answering
    # independently given the truth; a fifth answers only half the pairs.
    rng = np.random.default_rng(11)
    n = 20_000
    y = rng.random(n) < 0.2
    sens = [0.95, 0.85, 0.7, 0.9, 0.8]
    spec = [0.98, 0.9, 0.95, 0.85, 0.97]
    cols = []
    for se, sp in zip(sens, spec, strict=True):
        says = np.where(y, rng.random(n) < se, rng.random(n) >= sp)
        cols.append(np.where(says, MATCH, NON_MATCH))
    cols[4] = np.where(rng.random(n) < 0.5, cols[4], MISSING)
    names = [f"r{i}" for i in range(5)]
    post, fit = pattern_dawid_skene(np.stack(cols, axis=1).astype(np.int8), names)
    for i, name in enumerate(names):
        assert fit["sensitivity"][name] == pytest.approx(sens[i], abs=0.03)
        assert fit["specificity"][name] == pytest.approx(spec[i], abs=0.02)
    assert fit["priors"]["match"] == pytest.approx(0.2, abs=0.01)
    # the ensemble beats every single rater on these data
    ensemble_errors = np.mean((post >= 0.5) != y)
    assert ensemble_errors < min(np.mean((c == MATCH) != y) for c in cols[:4])


def test_majority_vote_breaks_ties_towards_non_match() -> None:
    a = np.array([True, True, False, False])
    b = np.array([True, False, True, False])
    share, threshold = majority_vote([a, b])
    assert list(share >= threshold) == [True, False, False, False]
    share, threshold = majority_vote([a, b, a])
    assert list(share >= threshold) == [True, True, False, False]


def test_distillation_shares_by_teacher_class() -> None:
    teacher = np.array([True] * 10 + [False] * 90)
    student = teacher.copy()
    student[:2] = False  # two teacher matches missed
    student[50:55] = True  # five matches added
    both = np.ones(100, dtype=bool)
    both[-10:] = False  # the teacher was not run on ten pairs
    got = compare(teacher, student, both)
    assert got["pairs_both_scored"] == 90 and not got["census"]
    assert got["teacher_match"]["student_says_non_match"]["count"] == 2
    assert got["teacher_non_match"]["student_says_match"]["count"] == 5
    assert got["agreement"]["value"] == pytest.approx(83 / 90)
    low, high = got["agreement"]["low"], got["agreement"]["high"]
    # Wilson interval for 83 / 90 at 95 % (Wilson 1927), as computed by statsmodels'
    # proportion_confint(83, 90, method="wilson")
    from statsmodels.stats.proportion import proportion_confint
    assert (low, high) == pytest.approx(proportion_confint(83, 90, method="wilson"))


@pytest.fixture
def grouped(sample_project: Path, tmp_path: Path) -> Project:
    with Project.open(sample_project) as p:
        answer_audit(p, SAMPLE_TRUTH)
        frame = candidates(p)
        y = is_match(frame, SAMPLE_TRUTH)
        labels = {f"lm-{i}": flipped(y, 0.02 + 0.02 * i, i) for i in range(3)}
        labels["small"] = flipped(y, 0.06, 9)
        path = label_file(tmp_path / "m.csv", frame, labels)
        import_matchers(p, [path])
        with p.transaction() as conn:
            for i in range(3):
                catalogue.mark(conn, f"lm-{i}", group="prompts")
            catalogue.mark(conn, "lm-0", role="teacher")
            catalogue.mark(conn, "small", role="student")
        yield p


def test_ensembles_are_stored_and_judged_like_any_matcher(grouped: Project) -> None:
    members = ["lm-0", "lm-1", "lm-2"]
    store_ensemble(grouped, "vote", members, "vote")
    store_ensemble(grouped, "ds", members, "dawid-skene", with_reviewers=True)
    with pytest.raises(DocketError, match="already stored"):
        store_ensemble(grouped, "vote", members, "vote")
    with pytest.raises(DocketError, match="at least two"):
        store_ensemble(grouped, "one", ["lm-0"], "vote")
    report = side_by_side(grouped)
    names = {m["name"]: m for m in report["matchers"]}
    assert names["vote"]["kind"] == names["ds"]["kind"] == "ensemble"
    assert names["ds"]["f1"]["value"] is not None
    (group,) = report["variants"]
    assert group["group"] == "prompts" and group["members"] == members
    assert 0 < group["flip_share"] < 0.2
    d = report["distillation"]
    assert d["teacher"] == "lm-0" and d["student"] == "small" and d["census"]


def test_demo_matcher_files_are_what_their_generator_writes(sample_project_file: Path,
                                                           tmp_path: Path) -> None:
    from docket.sample import make_matchers
    counts = make_matchers.make(sample_project_file, tmp_path)  # the demo's pairs
    for name in counts:
        assert (tmp_path / name).read_bytes() == (make_matchers.HERE / name).read_bytes(), name
    copy = tmp_path / "demo.docket"
    copy.write_bytes(sample_project_file.read_bytes())
    from docket.tui.cli_matchers import apply_demo_matchers
    with Project.open(copy) as p:
        names = apply_demo_matchers(p, make_matchers.HERE)
        infos = {m.name: m for m in catalogue.matchers(p.connection)}
    assert names == ["lm-fields", "lm-json", "lm-plain", "rules", "student"]
    assert infos["lm-plain"].role == "teacher" and infos["student"].role == "student"
    assert infos["rules"].outside > 0  # pairs blocking never proposed, counted
