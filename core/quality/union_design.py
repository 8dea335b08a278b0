"""The audit slice and a supplement together: one design-based sample of the candidate pairs.

The audit slice is a stratified random sample on the model's score (strata h), a supplement an
independent one on a matcher's own score (strata g). Every candidate pair lies in one cell
(h, g). Each design draws without replacement and treats the pairs of a stratum alike, so both
treat alike the pairs of one cell, and so does their union: given how many pairs of each cell
the two drew between them, those pairs are a simple random sample of the cell (the union's law
is unchanged by any reordering of a cell's pairs). The cells are post-strata of the union, and
the estimators of ``known_domains`` apply with the cells as strata, conditioned on the counts
drawn per cell (post-stratification, inference given the realised sample sizes: common
practice). Labelled pairs stand for the cell's pairs as in the audit slice (the others missing
at random, held ones kept apart for bounds).

The supplement sees what the matcher scores high; the slice, what the model scores high: a
match the matcher scores low but the model high sits in a cell the slice samples densely, so
recall no longer rests on the supplement's thin low strata alone.

Small cells. A cell with fewer than ``MIN_LABELS`` labelled pairs (and not wholly labelled) is
merged with the next cells of the same audit stratum, in supplement-stratum order, until the
group has that many; a short tail joins the group before it. Merged cells differ in their chance
of being drawn, a small bias (the cells merged are the small ones) traded for a variance that can
be estimated. A group is named "h:g" (audit stratum h, supplement stratum g) or "h:g1-g2".

A pair's chance of being in the union is 1 - (1 - pi_a)(1 - pi_s) (the draws are independent);
``union_inclusion`` gives it for the gold export.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .audit_sample import AuditSample

MIN_LABELS = 2


@dataclass(frozen=True)
class UnionDesign:
    """Every candidate pair's place in the two designs (one entry per candidate pair)."""

    score: np.ndarray  # the matcher judged
    label: np.ndarray  # 1 match, 0 non-match, NaN: no gold label
    held: np.ndarray  # bool: on hold, no gold label
    audit_stratum: np.ndarray
    supplement_stratum: np.ndarray
    in_audit: np.ndarray  # bool: drawn into the audit slice
    in_supplement: np.ndarray  # bool: drawn into the supplement


def _name(h: int, first: int, last: int) -> str:
    return f"{h}:{first}" if first == last else f"{h}:{first}-{last}"


def groups(d: UnionDesign) -> np.ndarray:
    """The post-stratum name of every candidate pair (see the module notes)."""
    drawn = d.in_audit | d.in_supplement
    labelled = drawn & ~np.isnan(d.label)
    out = np.empty(d.score.size, dtype=object)
    for h in np.unique(d.audit_stratum).tolist():
        in_h = d.audit_stratum == h
        cells = np.unique(d.supplement_stratum[in_h]).tolist()
        size = {g: int(np.sum(in_h & (d.supplement_stratum == g))) for g in cells}
        got = {g: int(np.sum(labelled & in_h & (d.supplement_stratum == g))) for g in cells}
        spans: list[list[int]] = []
        open_: list[int] = []
        for g in cells:
            open_.append(g)
            m, n = sum(got[c] for c in open_), sum(size[c] for c in open_)
            if m >= MIN_LABELS or m == n:
                spans.append(open_)
                open_ = []
        if open_:
            if spans:
                spans[-1].extend(open_)
            else:
                spans.append(open_)
        for span in spans:
            at = in_h & np.isin(d.supplement_stratum, span)
            out[at] = _name(int(h), int(span[0]), int(span[-1]))
    return out


def union_sample(d: UnionDesign) -> tuple[AuditSample, dict[str, tuple[int, int]]]:
    """The union of the two samples as an ``AuditSample`` on the post-strata, and the design
    (post-stratum -> (candidate pairs, pairs drawn by either sample))."""
    group = groups(d)
    drawn = d.in_audit | d.in_supplement
    keep = drawn & ~np.isnan(d.label)
    on_hold = drawn & d.held & np.isnan(d.label)
    names, at = np.unique(group.astype(str), return_inverse=True)
    size = np.bincount(at, minlength=names.size)
    picked = np.bincount(at, weights=drawn, minlength=names.size).astype(int)
    design = {str(k): (int(n), int(m)) for k, n, m in zip(names, size, picked, strict=True)}
    pi = (picked / size)[at]
    key = names[at]
    sample = AuditSample(d.score[keep], d.label[keep].astype(int), key[keep], pi[keep],
                         {k: v[0] for k, v in design.items()},
                         {k: v[1] for k, v in design.items()},
                         held_score=d.score[on_hold], held_stratum=key[on_hold],
                         population={str(k): d.score[at == i] for i, k in enumerate(names)})
    return sample, design


def union_inclusion(audit_pi: np.ndarray, supplement_pi: np.ndarray) -> np.ndarray:
    """The chance a pair is drawn by either of two independent samples."""
    return 1.0 - (1.0 - np.asarray(audit_pi, float)) * (1.0 - np.asarray(supplement_pi, float))
