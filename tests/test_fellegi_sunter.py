"""Fellegi–Sunter weights and posterior (Fellegi & Sunter 1969: log2(m/u), log2((1-m)/(1-u)));
EM recovery."""

from __future__ import annotations

import numpy as np
import pytest

from docket.core.matching.model import FSModel, fit_em, posterior

NAMES = ["agree", "disagree", "missing"]


def two_level(fields: list[tuple[float, float]], prior: float) -> FSModel:
    return FSModel([f"f{i}" for i in range(len(fields))], [NAMES] * len(fields),
                   [[m, 1 - m] for m, _ in fields], [[u, 1 - u] for _, u in fields], prior)


@pytest.mark.parametrize(("m", "u", "agree", "disagree"), [
    (0.90, 0.01, 6.4919, -3.3074),  # log2(m/u), log2((1-m)/(1-u)) by hand [C]
    (0.95, 0.01, 6.5699, -4.3074),
    (0.90, 0.05, 4.1699, -3.2479),
    (0.98, 0.03, 5.0297, -5.5999),
    (0.90, 0.10, 3.1699, -3.1699),
])
def test_field_weights_base_two(m: float, u: float, agree: float, disagree: float) -> None:
    w = two_level([(m, u)], 0.5).weights()[0]
    assert w[0] == pytest.approx(agree, abs=1e-4)
    assert w[1] == pytest.approx(disagree, abs=1e-4)
    assert w[2] == 0.0  # missing: no evidence either way


def test_despain_bayes_example() -> None:
    # Despain, Probabilistic Record Linkage §2-2.7 [S]: λ = 0.005, m = 0.98, u = 0.03,
    # P(M | agree) printed 0.14, computed 0.1410.
    model = two_level([(0.98, 0.03)], 0.005)
    p = model.probability(np.array([[0]]))[0]
    assert p == pytest.approx(0.1410, abs=1e-4)
    assert model.probability(np.array([[1]]))[0] == pytest.approx(0.000104, abs=2e-6)


def test_three_field_example() -> None:
    # constructed example, worked by hand from the Fellegi–Sunter formulas [C, not from a
    # publication]: W = 8.0320, R = 261.73.
    model = two_level([(0.95, 0.01), (0.90, 0.05), (0.85, 0.02)], 0.5)
    pattern = np.array([[0, 0, 1]])
    w = model.pattern_weight(pattern)[0]
    assert w == pytest.approx(8.0320, abs=1e-4)
    assert 2 ** w == pytest.approx(261.73, abs=0.01)
    for lam, expected in ((0.5, 0.9962), (0.01, 0.7256), (0.001, 0.2076)):
        assert posterior(w, lam) == pytest.approx(expected, abs=1e-4)


def simulate(seed: int, n: int = 40_000) -> tuple[np.ndarray, dict]:
    """Pairs from a known two-class model with three fields of 3 levels plus missing."""
    rng = np.random.default_rng(seed)
    truth = {"prior": 0.15,
             "m": [[0.85, 0.10, 0.05], [0.70, 0.20, 0.10], [0.90, 0.07, 0.03]],
             "u": [[0.05, 0.15, 0.80], [0.10, 0.30, 0.60], [0.02, 0.08, 0.90]]}
    is_match = rng.random(n) < truth["prior"]
    cols = []
    for m, u in zip(truth["m"], truth["u"], strict=True):
        lv = np.where(is_match, rng.choice(3, n, p=m), rng.choice(3, n, p=u))
        lv[rng.random(n) < 0.05] = 3  # missing at random, its own level
        cols.append(lv)
    return np.stack(cols, axis=1), truth


def test_em_recovers_known_parameters() -> None:
    # Common practice: EM on a simulated two-class mixture should recover its parameters.
    levels, truth = simulate(seed=7)
    pats, counts = np.unique(levels, axis=0, return_counts=True)
    model = fit_em(pats, counts, [["a", "b", "c", "missing"]] * 3, ["x", "y", "z"])
    assert model.prior == pytest.approx(truth["prior"], abs=0.03)
    for got, want in zip(model.m, truth["m"], strict=True):
        assert np.allclose(got, want, atol=0.03)
    for got, want in zip(model.u, truth["u"], strict=True):
        assert np.allclose(got, want, atol=0.03)


def test_refit_is_deterministic_and_counts_the_labels_it_used() -> None:
    levels, _ = simulate(seed=3, n=5000)
    pats, counts = np.unique(levels, axis=0, return_counts=True)
    names = [["a", "b", "c", "missing"]] * 3
    lab_m = np.zeros(len(pats))
    lab_m[0] = min(3, counts[0])
    one = fit_em(pats, counts, names, ["x", "y", "z"], lab_m)
    two = fit_em(pats, counts, names, ["x", "y", "z"], lab_m)
    assert one.to_dict() == two.to_dict()
    assert one.labels_used == int(lab_m.sum())
