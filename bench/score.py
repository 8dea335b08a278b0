"""docket's comparison of the DBLP-ACM candidate pairs against bare rapidfuzz.process.cpdist.

Both sides score the same pairs and columns with the same scorers, measured in one run. The
bare side gets its strings ready-made (not timed). docket is timed twice: end to end, with
normalising each record's values and preparing each field (the TF-IDF rows of its distinct
values), and with that per-record work done once beforehand, as a build's chunks of pairs share
it, so that only the per-pair work (grouping distinct value pairs, comparing, cutting levels)
is timed. Target: docket ≥ 0.6× the bare throughput.
"""

from __future__ import annotations

import numpy as np
from _common import best_of, data_dir
from rapidfuzz import process

from docket.core.matching import compare, scoring
from docket.core.pairs import blocking
from docket.core.pairs.autoblock import choose_rules
from docket.core.records import fields, sources


def main() -> None:
    folder = data_dir()
    left = sources.load_table(folder / "dblp.csv", "id")
    right = sources.load_table(folder / "acm.csv", "id")
    specs = fields.resolve_fields(left.frame, right.frame, "dblp", "acm", {}, {})
    rules = choose_rules(left.frame, right.frame, specs, blocking.DEFAULT_MAX_PAIRS)
    li, ri, _, report = blocking.block(rules, left.frame, right.frame, specs)
    n = len(li)
    strings = [f for f in specs if f.kind in compare.SCORERS]
    bare_inputs = [(compare.SCORERS[f.kind],
                    [x or "" for x in left.frame[f.left_column].to_numpy()[li]],
                    [x or "" for x in right.frame[f.right_column].to_numpy()[ri]]) for f in strings]
    scorer_of = {"name": "JaroWinkler", "text": "Levenshtein", "longtext": "token_set_ratio",
                 "code": "OSA"}

    def bare() -> None:
        for f, (_, a, b) in zip(strings, bare_inputs, strict=True):
            from rapidfuzz import fuzz
            from rapidfuzz.distance import OSA, JaroWinkler, Levenshtein
            scorer = {"name": JaroWinkler.normalized_similarity,
                      "text": Levenshtein.normalized_similarity,
                      "longtext": fuzz.token_set_ratio,
                      "code": OSA.normalized_similarity}[f.kind]
            process.cpdist(a, b, scorer=scorer, workers=-1, dtype=np.float32)

    def docket() -> None:
        ln = scoring.normalised(strings, left.frame, "left")
        rn = scoring.normalised(strings, right.frame, "right")
        scoring.compare_pairs(strings, ln, rn, li, ri)

    ln = scoring.normalised(strings, left.frame, "left")
    rn = scoring.normalised(strings, right.frame, "right")
    prepared = scoring.prepare(strings, ln, rn)

    def per_pair() -> None:
        scoring.compare_pairs(strings, ln, rn, li, ri, prepared=prepared)

    t_bare = best_of(bare, 5)
    t_docket = best_of(docket, 5)
    t_pairs = best_of(per_pair, 5)
    print(f"DBLP-ACM candidate pairs: {n:,} ({', '.join(report.rules)}); string fields: "
          + ", ".join(f"{f.name} ({scorer_of[f.kind]})" for f in strings))
    total = n * len(strings) / 1e6
    print(f"bare cpdist     {t_bare:7.3f} s   {total / t_bare:6.2f} M comparisons/s")
    print(f"docket compare  {t_docket:7.3f} s   {total / t_docket:6.2f} M comparisons/s  "
          "(end to end)")
    print(f"docket per pair {t_pairs:7.3f} s   {total / t_pairs:6.2f} M comparisons/s  "
          "(the per-record work done once)")
    print(f"ratio docket/bare throughput: end to end {t_bare / t_docket:.2f}x, per pair "
          f"{t_bare / t_pairs:.2f}x (target >= 0.6x)")


if __name__ == "__main__":
    main()
