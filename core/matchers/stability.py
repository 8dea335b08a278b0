"""Stability across variants: matchers marked as variants of one another (one group name),
e.g. one prompt in several wordings. How often does the answer flip between them?

Figures are over every candidate pair (a census of the variants' answers, so no sampling
interval): the share of pairs on which the variants do not all agree, the same share among the
pairs at least one variant calls a match (most candidate pairs are easy non-matches, which
hide instability), the flip share of every two variants, and Fleiss' kappa among them.
"""

from __future__ import annotations

from itertools import combinations
from typing import Any

import numpy as np

from ..reviewing.agreement_many import fleiss
from ..storage.project_file import ProjectFile
from .judged import Judged


def groups(judged: Judged) -> dict[str, list[str]]:
    out: dict[str, list[str]] = {}
    for name in judged.names:
        info = judged.infos[name]
        if info is not None and info.variant_group:
            out.setdefault(info.variant_group, []).append(name)
    return out


def group_stability(predicted: dict[str, np.ndarray], members: list[str]) -> dict[str, Any]:
    """Flip shares and Fleiss' kappa of ``members`` (bool predictions per candidate pair)."""
    votes = np.sum([predicted[m] for m in members], axis=0)
    k = len(members)
    split = (votes > 0) & (votes < k)
    any_match = votes > 0
    counts = np.stack([votes, k - votes], axis=1)
    f = fleiss(counts)
    return {
        "members": members,
        "pairs": int(votes.size),
        "flipping_pairs": int(split.sum()),
        "flip_share": float(split.mean()) if votes.size else None,
        "flip_share_among_any_match": float(split[any_match].mean()) if any_match.any()
        else None,
        "pairwise": [{"first": a, "second": b,
                      "flip_share": float(np.mean(predicted[a] != predicted[b]))}
                     for a, b in combinations(members, 2)],
        "fleiss_kappa": f.kappa, "fleiss_se0": f.se0, "band": f.band,
        "observed_agreement": f.p_bar, "chance_agreement": f.p_bar_e,
    }


def variants(project: ProjectFile, judged: Judged) -> list[dict[str, Any]]:
    """One entry per group with at least two members."""
    out = []
    for group, members in sorted(groups(judged).items()):
        if len(members) >= 2:
            out.append({"group": group, **group_stability(judged.predicted, members)})
        else:
            out.append({"group": group, "members": members,
                        "note": "one member only: mark another matcher with this group"})
    return out
