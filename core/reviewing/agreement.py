"""Inter-rater agreement between reviewers.

Cohen's kappa with its standard errors, PABAK with the prevalence and bias indices and the
Landis & Koch bands; the coefficients for many reviewers at once (Fleiss' kappa, Krippendorff's
alpha) are in :mod:`agreement_many`. The summaries over reviewers (every pair of them, all of
them at once) are in :mod:`agreement_summary`.

Pure statistics over plain Python / numpy data: nothing here opens a project file.

Degenerate data never raises. When a coefficient is undefined (no units, or chance agreement
p_e == 1 because both reviewers used one and the same category for every unit) it is NaN and
its band is "undefined". Reporting 1.0 for "everyone always said match" would claim a
reliability the data cannot show: such data cannot tell a careful reviewer from a constant one.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

# The label vocabulary of core.types.Label, repeated so this module stays dependency-free.
MATCH, NON_MATCH, HOLD = "match", "non-match", "hold"
DECIDED: tuple[str, ...] = (MATCH, NON_MATCH)
WITH_HOLD: tuple[str, ...] = (MATCH, NON_MATCH, HOLD)
UNDEFINED = "undefined"

_NAN = math.nan
_EPS = 1e-12  # how close to 1 chance agreement may come before kappa counts as undefined


def json_ready(value: Any) -> Any:
    """Turn nested results into JSON-serialisable data; NaN and infinities become None."""
    if isinstance(value, Mapping):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, (float, np.floating)):
        number = float(value)
        return number if math.isfinite(number) else None
    return value


class _ToDict:
    def to_dict(self) -> dict[str, Any]:
        return json_ready(asdict(self))  # type: ignore[call-overload]


def _count_table(table: Any, *, square: bool) -> np.ndarray:
    counts = np.asarray(table, dtype=float)
    if counts.ndim != 2 or (square and counts.shape[0] != counts.shape[1]):
        raise ValueError(f"expected a {'square ' if square else ''}2-D table, got {counts.shape}")
    if not np.all(np.isfinite(counts)) or np.any(counts < 0) or np.any(counts != np.round(counts)):
        raise ValueError("a table holds counts: whole numbers, zero or more")
    return counts.astype(np.int64)


def _names(categories: Sequence[str] | None, k: int) -> tuple[str, ...]:
    names = tuple(str(i) for i in range(k)) if categories is None else tuple(categories)
    if len(names) != k or len(set(names)) != k:
        raise ValueError(f"need {k} distinct category names, got {list(names)}")
    return names


def confusion(a: Sequence[str], b: Sequence[str], categories: Sequence[str]) -> np.ndarray:
    """Counts of (a's label, b's label): rows follow ``a``, columns ``b``, in category order."""
    if len(a) != len(b):
        raise ValueError(f"the two label sequences differ in length ({len(a)} vs {len(b)})")
    k = len(categories)
    index = {c: i for i, c in enumerate(_names(categories, k))}
    try:
        rows = np.fromiter((index[x] for x in a), dtype=np.intp, count=len(a))
        cols = np.fromiter((index[x] for x in b), dtype=np.intp, count=len(b))
    except KeyError as err:
        raise ValueError(f"label {err.args[0]!r} is not one of {list(categories)}") from None
    return np.bincount(rows * k + cols, minlength=k * k).reshape(k, k)


_BANDS: tuple[tuple[float, str], ...] = ((0.20, "Slight"), (0.40, "Fair"), (0.60, "Moderate"),
                                         (0.80, "Substantial"), (1.00, "Almost perfect"))


def landis_koch(kappa: float | None) -> str:
    """Landis & Koch (1977) strength-of-agreement band for a kappa.

    The published bands (0.00-0.20, 0.21-0.40, ...) leave gaps for a continuous kappa; docket
    closes them upper-inclusively: kappa < 0 Poor; 0 <= kappa <= 0.20 Slight;
    0.20 < kappa <= 0.40 Fair; 0.40 < kappa <= 0.60 Moderate; 0.60 < kappa <= 0.80 Substantial;
    0.80 < kappa <= 1 Almost perfect. Kappa is rounded to 12 decimals first, so that a computed
    0.2 carrying float noise (0.20000000000000004) stays Slight. NaN or None gives "undefined";
    a kappa above 1 is an error.
    """
    if kappa is None or math.isnan(kappa):
        return UNDEFINED
    value = round(kappa, 12)
    if value < 0:
        return "Poor"
    for upper, name in _BANDS:
        if value <= upper:
            return name
    raise ValueError(f"kappa cannot exceed 1, got {kappa}")


@dataclass(frozen=True)
class CohenResult(_ToDict):
    """Cohen's (1960) kappa for two reviewers, from their k x k table of counts.

    ``se`` is the large-sample non-null asymptotic standard error of Fleiss, Cohen & Everitt
    (1969), the "ASE" of SAS and the SE of Stata's kapci. The 95 % interval is not built on it
    (it covers too little on small or lopsided samples): ``ci_method`` names the one used, see
    :mod:`agreement_intervals`; it never leaves [-1, 1]. ``se0`` is the standard error under the
    null hypothesis kappa = 0, and ``z`` = kappa / se0 (NaN when se0 is 0, which happens when one
    reviewer used a single category). NaN fields mark an undefined kappa: see the module notes.
    """

    n: int
    categories: tuple[str, ...]
    table: list[list[int]]  # rows: first reviewer, columns: second reviewer
    observed: float  # p_o
    expected: float  # p_e, chance agreement from the two sets of marginals
    kappa: float
    se: float
    se0: float
    ci_low: float
    ci_high: float
    z: float
    band: str
    ci_method: str = ""
    wald_low: float = _NAN  # kappa -/+ 1.959964 se: the large-sample interval SAS and Stata print
    wald_high: float = _NAN


def cohen_kappa(table: Any, categories: Sequence[str] | None = None) -> CohenResult:
    """Cohen's kappa, its FCE-1969 and null standard errors and 95% interval from a k x k table.

    ``categories`` names the rows/columns (default "0", "1", ...).
    """
    counts = _count_table(table, square=True)
    names = _names(categories, counts.shape[0])
    n = int(counts.sum())
    p_o = p_e = _NAN
    if n > 0:
        # Integer sums first: perfect agreement then gives p_o == 1.0 and kappa == 1.0 exactly.
        row_n, col_n = counts.sum(axis=1).tolist(), counts.sum(axis=0).tolist()
        p_o = int(np.trace(counts)) / n
        p_e = sum(r * c for r, c in zip(row_n, col_n, strict=True)) / (n * n)
        p = counts / n
        rows, cols = p.sum(axis=1), p.sum(axis=0)
    if n == 0 or 1.0 - p_e < _EPS:
        return CohenResult(
            n, names, counts.tolist(), p_o, p_e, _NAN, _NAN, _NAN, _NAN, _NAN, _NAN, UNDEFINED
        )
    kappa = (p_o - p_e) / (1.0 - p_e)
    term_a = float(np.sum(np.diag(p) * (1.0 - (rows + cols) * (1.0 - kappa)) ** 2))
    off = p * (cols[:, None] + rows[None, :]) ** 2  # p_ij (p_.i + p_j.)^2
    np.fill_diagonal(off, 0.0)
    term_b = (1.0 - kappa) ** 2 * float(off.sum())
    term_c = (kappa - p_e * (1.0 - kappa)) ** 2
    scale = n * (1.0 - p_e) ** 2
    var = (term_a + term_b - term_c) / scale
    var0 = (p_e + p_e**2 - float(np.sum(rows * cols * (rows + cols)))) / scale
    # Both variances are exactly 0 in boundary cases (kappa == 1, a constant reviewer); keep
    # float noise there from turning into a tiny SE and an absurd z.
    se = math.sqrt(var) if var * n > _EPS else 0.0
    se0 = math.sqrt(var0) if var0 * n > _EPS else 0.0
    z = kappa / se0 if se0 > 0 else _NAN
    from .agreement_intervals import kappa_interval
    low, high, how = kappa_interval(counts, kappa)
    return CohenResult(
        n=n,
        categories=names,
        table=counts.tolist(),
        observed=p_o,
        expected=p_e,
        kappa=kappa,
        se=se,
        se0=se0,
        ci_low=_NAN if low is None else low,
        ci_high=_NAN if high is None else high,
        z=z,
        band=landis_koch(kappa),
        ci_method=how,
        wald_low=kappa - 1.959963984540054 * se,
        wald_high=kappa + 1.959963984540054 * se,
    )


@dataclass(frozen=True)
class PabakResult(_ToDict):
    """Prevalence- and bias-adjusted kappa (Byrt, Bishop & Carlin 1993): (k p_o - 1)/(k - 1).

    For a 2 x 2 table [[a, b], [c, d]] of n units, prevalence_index = (a - d)/n and bias_index
    = (b - c)/n, both signed; for other sizes they are None."""

    n: int
    k: int
    observed: float
    pabak: float
    prevalence_index: float | None
    bias_index: float | None


def pabak(table: Any) -> PabakResult:
    """PABAK with the signed prevalence and bias indices (2 x 2 only) from a k x k table."""
    counts = _count_table(table, square=True)
    k, n = counts.shape[0], int(counts.sum())
    p_o = float(np.trace(counts)) / n if n else _NAN
    value = (k * p_o - 1.0) / (k - 1) if k > 1 else _NAN
    if k != 2:
        return PabakResult(n, k, p_o, value, None, None)
    (a, b), (c, d) = counts.tolist()
    if n == 0:
        return PabakResult(n, k, p_o, value, _NAN, _NAN)
    return PabakResult(n, k, p_o, value, (a - d) / n, (b - c) / n)
