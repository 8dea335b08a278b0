"""Reviewers of a project, and how far they agree.

``reviewers`` holds who may work on the project and in which role: a reviewer labels pairs, an
adjudicator may also settle them. Agreement is computed from the standing reviewer labels
(``current`` with role 'reviewer'); adjudications never count as a rating, since an
adjudicator decides after seeing everyone's labels.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, cast

from ..errors import DocketError
from ..storage import roles
from ..storage.project_file import ProjectFile
from ..types import ROLES
from .agreement_intervals import MIN_PAIRS

SE_KIND = ("Fleiss, Cohen & Everitt (1969) large-sample non-null standard error (SAS 'ASE', "
           "Stata kapci); se0 is the standard error under kappa = 0")
CI_KIND = ("two categories: goodness-of-fit interval (Donner & Eliasziw 1992), for Cohen's "
           "kappa and, where every pair has two ratings, for Fleiss' kappa and Krippendorff's "
           "alpha; with holds as a third category that someone used, or three ratings of a "
           "pair: percentile bootstrap over pairs; never outside [-1, 1]. "
           "wald_low / wald_high: kappa ± 1.959964 × se, as SAS and Stata print it")
BAND_CONVENTION = ("Landis & Koch (1977), edges closed upper-inclusively: kappa < 0 Poor; "
                   "0 ≤ kappa ≤ 0.20 Slight; 0.20 < kappa ≤ 0.40 Fair; 0.40 < kappa ≤ 0.60 "
                   "Moderate; 0.60 < kappa ≤ 0.80 Substantial; 0.80 < kappa ≤ 1 Almost perfect")
HOLD_CONVENTION = {
    False: "kappa over match / non-match on pairs both reviewers decided; a hold counts as no "
           "rating, and each reviewer's hold rate on the pairs in common is reported beside it",
    True: "hold counted as a third category beside match and non-match",
}


# -- reviewers -----------------------------------------------------------------------------
@dataclass(frozen=True)
class ReviewerChange:
    """What ``add_reviewer`` did: ``before`` is the earlier role, None for a new name."""

    name: str
    role: str
    before: str | None
    granted_by: str = ""

    @property
    def changed(self) -> bool:
        return self.before != self.role

    @property
    def message(self) -> str:
        by = f" (granted by {self.granted_by})" if self.granted_by else ""
        if self.before is None:
            return f"added {self.name} as {self.role}{by}"
        if self.before == self.role:
            return f"{self.name} is already {self.role}; nothing changed"
        return f"{self.name}: role changed from {self.before} to {self.role}{by}"


def clean_name(name: str) -> str:
    return roles.plain_name(name, "give one, e.g. 'add maya'")


def add_reviewer(project: ProjectFile, name: str, role: str = "reviewer",
                 granted_by: str = "") -> ReviewerChange:
    """Register ``name`` in ``role``; an existing reviewer's role is changed (and said so).

    Every change of role is logged with ``granted_by`` and the time, so that decisions are
    judged by the role held when they were made (see ``storage.roles``).
    """
    name = clean_name(name)
    if role not in ROLES:
        raise DocketError(f"unknown role '{role}'; use reviewer or adjudicator")
    by = roles.short(clean_name(granted_by)) if granted_by.strip() else ""
    with project.transaction() as conn:
        name = roles.as_kept(conn, name, added=True)
        row = conn.execute("SELECT role FROM reviewers WHERE name = ?", (name,)).fetchone()
        before = None if row is None else row[0]
        roles.register(conn, name)
        if (before or roles.DEFAULT_ROLE) != role:
            roles.grant(conn, name, role, by or "(not given)")
    return ReviewerChange(name, role, before, by if (before or roles.DEFAULT_ROLE) != role else "")


def list_reviewers(project: ProjectFile) -> list[dict[str, Any]]:
    """Everyone registered (or with decisions), by name: role, added_at and their work so far.

    ``granted_by`` and ``granted_at`` tell who gave the present role and when (None for a
    reviewer never granted another role). ``labels`` and ``holds`` count standing reviewer
    labels, ``adjudications`` standing adjudicator labels; ``seconds`` is the time spent over
    every label decision they made, retracted ones included (the time was spent all the same).
    """
    conn = project.connection
    with project.reading():
        people = {name: {"name": name, "role": role, "added_at": added}
                  for name, role, added in conn.execute("SELECT name, role, added_at "
                                                        "FROM reviewers")}
        for (name,) in conn.execute("SELECT DISTINCT reviewer FROM decisions"):
            people.setdefault(name, {"name": name, "role": "reviewer", "added_at": None})
        counts = {(r, role, label): n for r, role, label, n in conn.execute(
            "SELECT reviewer, role, label, count(*) FROM current GROUP BY reviewer, role, label")}
        seconds = dict(conn.execute("SELECT reviewer, sum(seconds) FROM decisions "
                                    "WHERE label IS NOT NULL GROUP BY reviewer"))
        granted = {g.name: g for g in roles.grants(conn)}  # oldest first: the last one stays
    out = []
    for name in sorted(people):
        mine = {k: n for k, n in counts.items() if k[0] == name}
        out.append({**people[name],
                    "labels": sum(n for (_, role, _), n in mine.items() if role == "reviewer"),
                    "holds": mine.get((name, "reviewer", "hold"), 0),
                    "adjudications": sum(n for (_, role, _), n in mine.items()
                                         if role == "adjudicator"),
                    "seconds": round(float(seconds.get(name) or 0.0), 3),
                    "granted_by": granted[name].granted_by if name in granted else None,
                    "granted_at": granted[name].granted_at if name in granted else None})
    return out


# -- agreement -----------------------------------------------------------------------------
def labels_by_reviewer(project: ProjectFile) -> dict[str, dict[int, str]]:
    """reviewer -> pair_id -> standing label, reviewer role only; reviewers in name order."""
    out: dict[str, dict[int, str]] = {}
    with project.reading():
        rows = project.connection.execute(
            "SELECT reviewer, pair_id, label FROM current WHERE role = 'reviewer' "
            "ORDER BY reviewer, pair_id").fetchall()
    for reviewer, pair_id, label in rows:
        out.setdefault(reviewer, {})[int(pair_id)] = label
    return out


def _pair_entry(r: Any) -> dict[str, Any]:
    c, pb = r.cohen, r.pabak
    return {
        "reviewer_a": r.reviewer_a, "reviewer_b": r.reviewer_b, "n_common": r.n_common,
        "n": r.n, "observed": c.observed, "expected": c.expected, "kappa": c.kappa,
        "se": c.se, "se0": c.se0, "z": c.z, "ci_low": c.ci_low, "ci_high": c.ci_high,
        "ci_method": c.ci_method, "wald_low": c.wald_low, "wald_high": c.wald_high,
        "band": c.band, "pabak": pb.pabak, "prevalence_index": pb.prevalence_index,
        "bias_index": pb.bias_index, "pabak_low": r.pabak_low, "pabak_high": r.pabak_high,
        "too_few": r.n < MIN_PAIRS,
        "confusion": {"rows": r.reviewer_a, "columns": r.reviewer_b,
                      "categories": list(r.categories), "table": r.table},
        "hold_rate_a": r.hold_rate_a, "hold_rate_b": r.hold_rate_b,
    }


def _rates(labels: dict[str, dict[int, str]], include_hold: bool) -> dict[str, Any] | None:
    from dataclasses import asdict

    from .reviewer_rates import reviewer_rates
    fit = reviewer_rates(labels, include_hold)
    if fit is None:
        return None
    out = asdict(fit)
    out["posterior"] = {int(cast(int, k)): round(v, 6) for k, v in fit.posterior.items()}
    return out


def agreement_report(project: ProjectFile, include_hold: bool = False) -> dict[str, Any]:
    """Everything ``docket agreement`` prints, as JSON-ready data (NaN becomes None).

    ``reviewer_pairs``: Cohen's kappa, its SE and 95 % CI, PABAK with the prevalence and bias
    indices, the confusion matrix (rows reviewer_a) and hold rates, for every two reviewers
    with pairs in common. ``overall``: Fleiss' kappa on the pairs with the modal number of
    ratings, and Krippendorff's alpha (nominal) on all pairs, each with a bootstrap interval.
    ``dawid_skene`` (``core.reviewer_rates``): each reviewer's sensitivity P(says match |
    match) and specificity P(says non-match | non-match) with bootstrap intervals, only where
    the model is identified (else ``identified`` false and ``reason``); with hold included,
    hold is a third response of the two classes. Figures resting on fewer than ``min_pairs``
    pairs are shown as "too few pairs to say".
    """
    from .agreement import DECIDED, WITH_HOLD, json_ready
    from .agreement_summary import overall_agreement, pairwise_agreement

    labels = labels_by_reviewer(project)
    categories = WITH_HOLD if include_hold else DECIDED
    pairs = pairwise_agreement(labels, include_hold)
    overall = overall_agreement(labels, include_hold)
    return json_ready({
        "project": str(project.path),
        "name": project.meta.get("name"),
        "include_hold": include_hold,
        "categories": list(categories),
        "conventions": {"se": SE_KIND, "ci": CI_KIND, "bands": BAND_CONVENTION,
                        "holds": HOLD_CONVENTION[include_hold],
                        "ratings": "standing reviewer labels; adjudications are not ratings"},
        "reviewers": {name: {"labels": len(given),
                             "holds": sum(v == "hold" for v in given.values())}
                      for name, given in labels.items()},
        "reviewer_pairs": [_pair_entry(r) for r in pairs],
        "overall": overall.to_dict(),
        "dawid_skene": _rates(labels, include_hold),
        "min_pairs": MIN_PAIRS,
    })


def disagreements(project: ProjectFile, a: str, b: str) -> list[dict[str, Any]]:
    """Pairs both reviewers labelled differently (a hold against a label counts), by pair id."""
    if a == b:
        raise DocketError(f"give two different reviewers, not {a} twice")
    with project.reading():
        known = {r for (r,) in project.connection.execute(
            "SELECT DISTINCT reviewer FROM current WHERE role = 'reviewer'")}
        for name in (a, b):
            if name not in known:
                raise DocketError(f"{name} has no standing labels in {project.path}; "
                                  "see 'docket reviewers PROJECT list'")
        rows = project.connection.execute(
            "SELECT p.pair_id, p.left_id, p.right_id, x.label, x.note, y.label, y.note "
            "FROM current_labels x JOIN current_labels y ON y.pair_id = x.pair_id "
            "JOIN pairs p ON p.pair_id = x.pair_id "
            "WHERE x.reviewer = ? AND x.role = 'reviewer' AND y.reviewer = ? "
            "AND y.role = 'reviewer' AND x.label <> y.label ORDER BY p.pair_id",
            (a, b)).fetchall()
    return [{"pair_id": int(pid), "left_id": left, "right_id": right, "reviewer_a": a,
             "label_a": la, "note_a": na or "", "reviewer_b": b, "label_b": lb,
             "note_b": nb or ""} for pid, left, right, la, na, lb, nb in rows]
