"""One factor that shrinks the summed field weights, because fields are seldom independent.

Fellegi–Sunter adds one weight per field as if the fields agreed independently of each other.
Among non-matches they do not: two papers by one author team share authors, venue and year,
two pets of one household share owner, street and phone. Summed, such agreements count the
same evidence several times, so related non-matches reach high probabilities. EM over the
candidate pairs (u measured there too) sees the candidates' own mix and does not make that
mistake as badly, but its weights are those of the blocked population (agreement on a blocked
field can even weigh against a match). So the weights keep coming from random pairs, and one
factor in (0, 1] with a new base log-odds is fitted so that the summed log-odds best predict
EM's own share of matches in each pattern (weighted cross-entropy over the candidates). A
positive factor keeps every field's levels in order and every sign, and the explanation still
adds up: each field's part is its weight times the factor.
"""

from __future__ import annotations

import numpy as np

from .logistic import cross_entropy

FLOOR = 0.05  # a factor near zero would say the fields tell nothing at all


def fit_shrink(field_log_odds: np.ndarray, base: float, target: np.ndarray,
               counts: np.ndarray) -> tuple[float, float]:
    """(factor, new base) minimising the count-weighted cross-entropy of ``target`` (each
    pattern's share of matches) against logistic(base' + factor * ``field_log_odds``)."""
    x = np.asarray(field_log_odds, dtype=float)
    t = np.clip(np.asarray(target, dtype=float), 0.0, 1.0)
    w = np.asarray(counts, dtype=float)
    if len(x) < 2 or np.ptp(x) == 0 or w.sum() <= 0:
        return 1.0, base
    from scipy.optimize import minimize  # only fitting needs it

    def loss(theta: np.ndarray) -> tuple[float, np.ndarray]:
        value, r = cross_entropy(theta[0] + theta[1] * x, t, w)
        return value, np.array([r.sum(), (r * x).sum()])

    fit = minimize(loss, np.array([base, 1.0]), jac=True, method="L-BFGS-B",
                   bounds=[(None, None), (FLOOR, 1.0)])
    return float(fit.x[1]), float(fit.x[0])
