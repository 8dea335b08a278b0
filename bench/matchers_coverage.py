"""Coverage of the machine-rater intervals on DBLP-ACM, the long version of the suite's check.

Each run redraws the audit slice (what another --seed at 'docket new' draws), answers it from
the benchmark's truth, and judges matchers that are the truth with a known share of answers
flipped at random, so their true precision, recall and F1 over the candidate pairs are known:
how often do the 95 % intervals (and the paired-difference intervals of two such matchers)
hold the truth? Asked: >= 93 % for the single matcher; the stated 95 % for the differences.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

from _common import data_dir

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
from tests.matchers_support import dblp_arrays, flipped
from tests.test_matchers_side_by_side import _true, redrawn


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=300)
    args = parser.parse_args()
    from docket.core.matchers.paired import paired_difference
    from docket.core.matchers.side_by_side import figures
    with tempfile.TemporaryDirectory() as tmp:
        prob, y = dblp_arrays(data_dir(), Path(tmp) / "dblp.docket")
    measures = ("precision", "recall", "f1")
    for rate in (0.02, 0.05, 0.10):
        hits = dict.fromkeys(measures, 0)
        for seed in range(1, args.runs + 1):
            pred = flipped(y, rate, 1000 + seed)
            truth = _true(pred, y)
            row = figures(redrawn(prob, y, seed, {"lm": pred}), "lm")
            for m in measures:
                hits[m] += row[m]["low"] <= truth[m] <= row[m]["high"]
        print(f"truth with {rate:.0%} flipped, {args.runs} runs: " + ", ".join(
            f"{m} {k / args.runs:.1%}" for m, k in hits.items()) + " within the 95% intervals")
    for ra, rb in ((0.03, 0.08), (0.05, 0.05)):
        hits = dict.fromkeys(measures, 0)
        for seed in range(1, args.runs + 1):
            a, b = flipped(y, ra, 2000 + seed), flipped(y, rb, 3000 + seed)
            ta, tb = _true(a, y), _true(b, y)
            judged = redrawn(prob, y, seed, {"a": a, "b": b})
            sa, sb = judged.sample_for("a"), judged.sample_for("b")
            for m in measures:
                d = paired_difference(sa, "a", sb, "b", m)
                hits[m] += d.low <= ta[m] - tb[m] <= d.high
        print(f"paired difference, {ra:.0%} vs {rb:.0%} flipped, {args.runs} runs: " + ", ".join(
            f"{m} {k / args.runs:.1%}" for m, k in hits.items()) + " hold the true difference "
            "(stated 95%)")


if __name__ == "__main__":
    main()
