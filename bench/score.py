"""docket's comparison of candidate pairs against bare rapidfuzz.process.cpdist, on DBLP-ACM
(long text) and on the sample (names, short text, codes).

Both sides score the same pairs and columns, measured in one run; the bare side runs one
scorer per column (Jaro–Winkler for names, Levenshtein for short text, the token set ratio for
long text, OSA for codes) on strings made ready beforehand (not timed). docket does more per
column: names take the better of two measures, long text adds a TF-IDF cosine. It is timed
twice: end to end, with normalising each record's values and preparing each field (the
distinct values' TF-IDF rows and words), and with that per-record work done once beforehand,
as a build's chunks of pairs share it, so that only the per-pair work is timed. Target on
DBLP-ACM: docket ≥ 0.6× the bare throughput. Pass ``dblp`` or ``sample`` to run one.
"""

from __future__ import annotations

import sys

import numpy as np
import pandas as pd
from _common import REPO, best_of, data_dir
from rapidfuzz import fuzz, process
from rapidfuzz.distance import OSA, JaroWinkler, Levenshtein

from docket.core.matching import compare, scoring
from docket.core.pairs import blocking
from docket.core.pairs.autoblock import choose_rules
from docket.core.records import fields, sources

BARE = {"name": ("JaroWinkler", JaroWinkler.normalized_similarity),
        "text": ("Levenshtein", Levenshtein.normalized_similarity),
        "longtext": ("token_set_ratio", fuzz.token_set_ratio),
        "code": ("OSA", OSA.normalized_similarity)}


def measure(title: str, left: pd.DataFrame, right: pd.DataFrame,
            column_map: dict[str, str]) -> None:
    specs = fields.resolve_fields(left, right, "left", "right", column_map, {})
    rules = choose_rules(left, right, specs, blocking.DEFAULT_MAX_PAIRS)
    li, ri, _, report = blocking.block(rules, left, right, specs)
    strings = [f for f in specs if f.kind in compare.SCORERS]
    bare_inputs = [(BARE[f.kind][1], [x or "" for x in left[f.left_column].to_numpy()[li]],
                    [x or "" for x in right[f.right_column].to_numpy()[ri]]) for f in strings]

    def bare() -> None:
        for scorer, a, b in bare_inputs:
            process.cpdist(a, b, scorer=scorer, workers=-1, dtype=np.float32)

    def docket() -> None:
        ln = scoring.normalised(strings, left, "left")
        rn = scoring.normalised(strings, right, "right")
        scoring.compare_pairs(strings, ln, rn, li, ri)

    ln = scoring.normalised(strings, left, "left")
    rn = scoring.normalised(strings, right, "right")
    prepared = scoring.prepare(strings, ln, rn)

    def per_pair() -> None:
        scoring.compare_pairs(strings, ln, rn, li, ri, prepared=prepared)

    t_bare = best_of(bare, 5)
    t_docket = best_of(docket, 5)
    t_pairs = best_of(per_pair, 5)
    n = len(li)
    print(f"{title}: {n:,} candidate pairs ({', '.join(report.rules)}); string fields: "
          + ", ".join(f"{f.name} ({BARE[f.kind][0]})" for f in strings))
    total = n * len(strings) / 1e6
    print(f"  bare cpdist     {t_bare:7.3f} s   {total / t_bare:6.2f} M comparisons/s")
    print(f"  docket compare  {t_docket:7.3f} s   {total / t_docket:6.2f} M comparisons/s  "
          "(end to end)")
    print(f"  docket per pair {t_pairs:7.3f} s   {total / t_pairs:6.2f} M comparisons/s  "
          "(the per-record work done once)")
    print(f"  ratio docket/bare throughput: end to end {t_bare / t_docket:.2f}x, per pair "
          f"{t_bare / t_pairs:.2f}x", flush=True)


def main() -> None:
    which = set(sys.argv[1:]) or {"dblp", "sample"}
    if "dblp" in which:
        folder = data_dir()
        measure("DBLP-ACM (target >= 0.6x)", sources.load_table(folder / "dblp.csv", "id").frame,
                sources.load_table(folder / "acm.csv", "id").frame, {})
    if "sample" in which:
        sample = REPO / "sample"
        measure("the sample (no target)",
                sources.load_table(sample / "practice_north.csv", "client_id").frame,
                sources.load_table(sample / "practice_south.csv", "ref").frame,
                {"owner": "owner_name", "born": "date_of_birth"})


if __name__ == "__main__":
    main()
