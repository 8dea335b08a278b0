"""The gold table's ``supplements`` column: each supplement that drew a gold pair, and its design.

A supplement (``quality.supplement``) is a stratified random sample of the candidate pairs on
one matcher's score, drawn independently of the audit slice. For each supplement that drew the
pair, the column holds (as JSON, a list): ``supplement`` (the fingerprint of the scores it was
drawn on), ``stratum`` (g), ``inclusion_probability`` = n_g / N_g (n_g drawn of the N_g
candidate pairs of stratum g), ``weight`` = N_g / m_g (m_g the gold-labelled pairs the
supplement drew in g: a stratum's weights add up to N_g, as ``audit_weight`` does for the audit
slice) and ``union_inclusion_probability`` = 1 - (1 - pi_a)(1 - n_g / N_g), the chance of
being drawn by the audit slice (pi_a = n_h / N_h of the pair's audit stratum) or by this
supplement, the two draws being independent. Judging the matcher from both samples together
takes the cells (audit stratum, supplement stratum) of every candidate pair, which need the
matcher's scores beside this file (``quality.union_design``).
"""

from __future__ import annotations

import json
import sqlite3
from collections import Counter
from collections.abc import Iterable

from ..storage.project_file import ProjectFile


def supplement_entries(project: ProjectFile, gold_ids: Iterable[int]) -> dict[int, str]:
    """pair id -> the JSON list described in the module notes, for gold pairs some supplement
    drew (others are absent)."""
    strata = project.meta.get("supplements", {})
    gold = set(gold_ids)
    try:
        rows = project.connection.execute(
            "SELECT s.fingerprint, s.pair_id, s.stratum, s.inclusion, p.inclusion FROM "
            "supplement_pairs s JOIN pairs p ON p.pair_id = s.pair_id "
            "ORDER BY s.pair_id, s.fingerprint").fetchall()
    except sqlite3.OperationalError:  # no supplement drawn: no such table
        return {}
    rows = [r for r in rows if r[1] in gold]
    labelled = Counter((key, int(g)) for key, _, g, _, _ in rows)
    out: dict[int, list[dict]] = {}
    for key, pid, g, pi_s, pi_a in rows:
        size = int(strata[key]["strata"][str(int(g))][0])
        out.setdefault(int(pid), []).append({
            "supplement": key, "stratum": int(g), "inclusion_probability": float(pi_s),
            "weight": size / labelled[(key, int(g))],
            "union_inclusion_probability": 1.0 - (1.0 - float(pi_a)) * (1.0 - float(pi_s))})
    return {pid: json.dumps(v, separators=(",", ":")) for pid, v in out.items()}
