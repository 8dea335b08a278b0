"""Paired differences of two matchers: the census, identical matchers, unseen domains."""

from __future__ import annotations

import numpy as np
import pytest

from docket.core.matchers.paired import paired_difference
from docket.core.quality.audit_sample import AuditSample


def scored(label: list[int], stratum: list[int], sizes: dict[int, int], pred_labelled: list[int],
           population: dict[int, list[int]]) -> AuditSample:
    """A sample scored 1.0 / 0.0 by one matcher; ``population`` its predictions per stratum."""
    drawn = {h: stratum.count(h) for h in sizes}
    pi = [drawn[h] / sizes[h] for h in stratum]
    return AuditSample(np.array(pred_labelled, dtype=float), label, stratum, pi, sizes, drawn,
                       population={h: np.array(v, dtype=float) for h, v in population.items()})


def _plain(pred: np.ndarray, y: np.ndarray) -> dict[str, float]:
    tp = float((pred & y).sum())
    return {"precision": tp / pred.sum(), "recall": tp / y.sum(),
            "f1": 2 * tp / (pred.sum() + y.sum())}


def test_a_census_gives_the_true_difference_with_no_spread() -> None:
    # Definition (common practice): when every candidate pair is labelled there is no sampling
    # error, so the estimate is the plain difference of the two matchers' figures, exactly.
    rng = np.random.default_rng(7)
    stratum = np.repeat([0, 1, 2], [40, 25, 35])
    y = rng.random(stratum.size) < np.array([0.05, 0.4, 0.9])[stratum]
    a, b = y ^ (rng.random(y.size) < 0.1), y ^ (rng.random(y.size) < 0.2)
    sizes = {0: 40, 1: 25, 2: 35}

    def sample(pred: np.ndarray) -> AuditSample:
        return scored(y.astype(int).tolist(), stratum.tolist(), sizes, pred.astype(int).tolist(),
                      {h: pred[stratum == h].astype(int).tolist() for h in sizes})

    for measure in ("precision", "recall", "f1"):
        d = paired_difference(sample(a), "a", sample(b), "b", measure)
        truth = _plain(a, y)[measure] - _plain(b, y)[measure]
        assert d.difference == pytest.approx(truth)
        assert d.low == pytest.approx(truth) and d.high == pytest.approx(truth)


def test_matchers_that_predict_alike_show_no_difference() -> None:
    label, stratum = [1, 0, 0, 1, 1, 0], [0, 0, 0, 1, 1, 1]
    sizes = {0: 10, 1: 8}
    one = scored(label, stratum, sizes, [1, 1, 0, 1, 0, 0], {0: [1, 1] + [0] * 8,
                                                             1: [1, 0] + [0] * 6})
    d = paired_difference(one, "a", one, "b", "f1")
    assert (d.difference, d.low, d.high) == (0.0, 0.0, 0.0)
    assert d.verdict == "no difference in F1 shown at 95%"


def test_predicted_matches_in_a_stratum_with_none_labelled_widen_the_interval() -> None:
    # Worked by hand from the definitions: stratum 1 holds three predicted matches of A, none
    # of them labelled. A's precision is then between 4/7 (all three wrong: 4 true of its 7
    # predicted matches) and 7/7; B's is 2/2. The interval must reach 4/7 - 1 = -3/7.
    label, stratum = [1, 1, 0, 0, 0, 0, 0, 0, 0, 0], [0] * 5 + [1] * 5
    sizes = {0: 10, 1: 10}
    seen = [1, 1, 0, 0, 0]
    a = scored(label, stratum, sizes, seen + [0] * 5,
               {0: [*seen, 1, 1, 0, 0, 0], 1: [0] * 5 + [1, 1, 1, 0, 0]})
    b = scored(label, stratum, sizes, seen + [0] * 5, {0: seen + [0] * 5, 1: [0] * 10})
    d = paired_difference(a, "a", b, "b", "precision")
    assert d.difference == pytest.approx(0.0)
    assert d.low <= -3 / 7 and d.high >= 0.0
    assert d.verdict == "no difference in precision shown at 95%"


def test_a_sample_without_every_pairs_predictions_is_refused() -> None:
    plain = AuditSample([1.0, 0.0], [1, 0], [0, 0], [0.2, 0.2], {0: 10}, {0: 2})
    with pytest.raises(ValueError, match="population"):
        paired_difference(plain, "a", plain, "b", "recall")
