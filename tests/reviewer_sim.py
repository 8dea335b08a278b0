"""Simulated reviewers of known error rates, for the coverage checks of the agreement figures
(shared by the suite and bench/)."""

from __future__ import annotations

import numpy as np

from docket.core.reviewing.agreement import cohen_kappa

# reviewer: (sensitivity, specificity), invented
RATES = {"ana": (0.95, 0.97), "ben": (0.88, 0.93), "caz": (0.80, 0.90)}


def two_raters(rng: np.random.Generator, n: int, prevalence: float, kappa: float) -> np.ndarray:
    """A 2 x 2 table from the common-correlation model (Donner & Eliasziw 1992): both
    reviewers share the prevalence, and kappa is the chance-corrected agreement."""
    q = prevalence * (1 - prevalence)
    p = [prevalence ** 2 + q * kappa, q * (1 - kappa), q * (1 - kappa),
         (1 - prevalence) ** 2 + q * kappa]
    return rng.multinomial(n, p).reshape(2, 2)


def kappa_coverage(n: int, prevalence: float, kappa: float, reps: int, seed: int = 0
                   ) -> tuple[float, int, int]:
    """(coverage among defined kappas, intervals outside [-1, 1], undefined tables)."""
    rng = np.random.default_rng(seed)
    hit = outside = undefined = 0
    for _ in range(reps):
        r = cohen_kappa(two_raters(rng, n, prevalence, kappa), ("match", "non-match"))
        if r.ci_low != r.ci_low:  # NaN: kappa undefined
            undefined += 1
            continue
        hit += r.ci_low <= kappa <= r.ci_high
        outside += r.ci_low < -1 or r.ci_high > 1
    return hit / max(reps - undefined, 1), outside, undefined


def many_coverage(n: int, prevalence: float, kappa: float, reps: int, seed: int = 0
                  ) -> tuple[float, float]:
    """Coverage of Fleiss' kappa's and Krippendorff's alpha's intervals, two reviewers per
    pair, among the tables where each is defined."""
    from docket.core.reviewing.agreement_summary import overall_agreement

    rng = np.random.default_rng(seed)
    hits = [0, 0]
    defined = [0, 0]
    for _ in range(reps):
        (mm, mn), (nm, nn) = two_raters(rng, n, prevalence, kappa).tolist()
        says = ["mm"] * mm + ["mn"] * mn + ["nm"] * nm + ["nn"] * nn
        labels = {who: {u: "match" if s[i] == "m" else "non-match" for u, s in enumerate(says)}
                  for i, who in enumerate(("ana", "ben"))}
        got = overall_agreement(labels)
        for j, (low, high) in enumerate(((got.fleiss_low, got.fleiss_high),
                                         (got.alpha_low, got.alpha_high))):
            if low is not None and high is not None:
                defined[j] += 1
                hits[j] += low <= kappa <= high
    return hits[0] / max(defined[0], 1), hits[1] / max(defined[1], 1)


def default_design(rng: np.random.Generator, n_pairs: int = 1500, prevalence: float = 0.3,
                   overlap: float = 0.2) -> tuple[dict[str, dict[int, str]], np.ndarray]:
    """docket's default overlap design with three reviewers: every pair decided by one
    reviewer, the overlap share by two different ones."""
    names = list(RATES)
    truth = rng.random(n_pairs) < prevalence
    labels: dict[str, dict[int, str]] = {n: {} for n in names}
    for pid in range(n_pairs):
        k = 2 if rng.random() < overlap else 1
        for who in rng.choice(len(names), size=k, replace=False):
            sens, spec = RATES[names[who]]
            says = rng.random() < (sens if truth[pid] else 1 - spec)
            labels[names[who]][pid] = "match" if says else "non-match"
    return labels, truth


def rates_coverage(reps: int, seed: int = 0, n_boot: int = 200, n_pairs: int = 1500) -> float:
    """Share of the reviewers' sensitivity and specificity intervals that hold the true rate."""
    from docket.core.reviewing.reviewer_rates import reviewer_rates
    rng = np.random.default_rng(seed)
    hits = []
    for _ in range(reps):
        labels, _ = default_design(rng, n_pairs)
        fit = reviewer_rates(labels, include_hold=False, n_boot=n_boot,
                             seed=int(rng.integers(1 << 31)))
        assert fit is not None and fit.identified
        for r in fit.reviewers:
            sens, spec = RATES[r.name]
            hits += [r.sensitivity.low <= sens <= r.sensitivity.high,
                     r.specificity.low <= spec <= r.specificity.high]
    return float(np.mean(hits))
