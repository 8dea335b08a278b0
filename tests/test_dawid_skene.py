"""Dawid–Skene EM: recovery of known reviewer error rates from seeded simulations.

General crowd-labelling libraries fit this model too, but none is a dependency here; the checks
are against the known truth of seeded simulations (the error rates the labels were drawn with).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from docket.core.reviewing.dawid_skene import dawid_skene

CATEGORIES = ["match", "non-match"]
# reviewer: (sensitivity, specificity), with "match" as the positive class
TRUTH = {
    "r1": (0.95, 0.90),
    "r2": (0.85, 0.95),
    "r3": (0.70, 0.80),
    "r4": (0.80, 0.85),
    "r5": (0.90, 0.75),
}


def simulate(
    seed: int, n_units: int, prevalence: float = 0.3, per_unit: int = 3
) -> tuple[np.ndarray, list[tuple[int, str, str]]]:
    """True classes and (unit, reviewer, label) triples; each unit gets ``per_unit`` reviewers."""
    rng = np.random.default_rng(seed)
    names = list(TRUTH)
    sens = np.array([TRUTH[r][0] for r in names])
    spec = np.array([TRUTH[r][1] for r in names])
    is_match = rng.random(n_units) < prevalence
    chosen = np.argsort(rng.random((n_units, len(names))), axis=1)[:, :per_unit]
    draw = rng.random(chosen.shape)
    says_match = np.where(is_match[:, None], draw < sens[chosen], draw >= spec[chosen])
    ratings = [
        (unit, names[chosen[unit, j]], "match" if says_match[unit, j] else "non-match")
        for unit in range(n_units)
        for j in range(per_unit)
    ]
    return is_match, ratings


def _rates(fit_sens: dict[str, float] | None, fit_spec: dict[str, float] | None) -> np.ndarray:
    assert fit_sens is not None and fit_spec is not None
    return np.array([fit_sens[r] for r in TRUTH] + [fit_spec[r] for r in TRUTH])


TRUE_RATES = np.array([s for s, _ in TRUTH.values()] + [p for _, p in TRUTH.values()])


def test_recovers_known_rates_at_2000_units() -> None:
    # One run of 2,000 units (each seen by 3 of the 5 reviewers) pins a sensitivity down only
    # to an SD of about 0.02-0.03, so a single run misses +/-0.05 somewhere for about 3 seeds
    # in 10. Averaging 8 independent runs checks that the estimates centre on the truth; each
    # run must still land within +/-0.12 of it.
    runs = []
    for seed in range(8):
        is_match, ratings = simulate(seed, n_units=2000)
        fit = dawid_skene(ratings, CATEGORIES)
        assert fit.converged
        assert fit.priors["match"] == pytest.approx(is_match.mean(), abs=0.05)
        runs.append(_rates(fit.sensitivity, fit.specificity))
    estimates = np.array(runs)
    assert np.all(np.abs(estimates - TRUE_RATES) <= 0.12)
    assert np.all(np.abs(estimates.mean(axis=0) - TRUE_RATES) <= 0.04)


def test_recovers_every_rate_within_005_in_one_larger_run() -> None:
    is_match, ratings = simulate(seed=7, n_units=20000)
    fit = dawid_skene(ratings, CATEGORIES)
    assert np.all(np.abs(_rates(fit.sensitivity, fit.specificity) - TRUE_RATES) <= 0.05)
    assert fit.priors["match"] == pytest.approx(is_match.mean(), abs=0.02)


def test_posterior_labels_beat_majority_vote() -> None:
    is_match, ratings = simulate(seed=3, n_units=2000)
    fit = dawid_skene(ratings, CATEGORIES)
    votes = np.zeros(len(is_match))
    for unit, _, label in ratings:
        votes[unit] += label == "match"
    majority = votes >= 2  # three reviewers per unit: no ties
    posterior = np.array([fit.labels[u] == "match" for u in range(len(is_match))])
    assert np.mean(posterior == is_match) >= np.mean(majority == is_match)


def test_result_is_coherent_and_deterministic() -> None:
    _, ratings = simulate(seed=5, n_units=300)
    fit = dawid_skene(ratings, CATEGORIES)
    again = dawid_skene(ratings, CATEGORIES)
    assert fit == again
    assert sum(fit.priors.values()) == pytest.approx(1.0)
    for matrix in fit.confusion.values():
        assert np.allclose(np.sum(matrix, axis=1), 1.0)
    for unit, probs in fit.posteriors.items():
        assert sum(probs.values()) == pytest.approx(1.0)
        assert fit.labels[unit] == max(CATEGORIES, key=lambda c: probs[c])
    assert fit.sensitivity is not None
    assert fit.sensitivity["r1"] == fit.confusion["r1"][0][0]  # match listed first
    text = json.dumps(fit.to_dict(), allow_nan=False)
    assert json.loads(text)["labels"]["0"] == fit.labels[0]


def test_positive_class_sets_the_direction() -> None:
    _, ratings = simulate(seed=5, n_units=300)
    as_match = dawid_skene(ratings, CATEGORIES)
    as_non = dawid_skene(ratings, CATEGORIES, positive="non-match")
    assert as_match.sensitivity is not None and as_non.specificity is not None
    assert as_non.specificity["r3"] == pytest.approx(as_match.sensitivity["r3"])


def test_three_categories_have_no_sensitivity() -> None:
    ratings = [
        (u, r, label)
        for u, label in enumerate(["match", "non-match", "hold"] * 4)
        for r in ("a", "b", "c")
    ]
    fit = dawid_skene(ratings, ["match", "non-match", "hold"])
    assert fit.sensitivity is None and fit.specificity is None and fit.positive is None
    assert all(fit.labels[u] == label for u, _, label in ratings)
    assert all(len(m) == 3 and len(m[0]) == 3 for m in fit.confusion.values())


def test_unanimous_reviewers_are_near_perfect() -> None:
    ratings = [(u, r, "match" if u % 3 == 0 else "non-match") for u in range(60) for r in "ab"]
    fit = dawid_skene(ratings, CATEGORIES)
    assert fit.sensitivity is not None and fit.specificity is not None
    assert min(fit.sensitivity.values()) > 0.99 and min(fit.specificity.values()) > 0.99
    assert fit.priors["match"] == pytest.approx(1 / 3, abs=1e-3)
    assert math.isfinite(fit.log_likelihood)


def test_bad_input_is_rejected() -> None:
    with pytest.raises(ValueError, match="not one of"):
        dawid_skene([(1, "a", "maybe")], CATEGORIES)
    with pytest.raises(ValueError, match="positive"):
        dawid_skene([(1, "a", "yes")], ["yes", "no"])
    with pytest.raises(ValueError, match="no ratings"):
        dawid_skene([], CATEGORIES)
    with pytest.raises(ValueError, match="two distinct"):
        dawid_skene([(1, "a", "match")], ["match"])
