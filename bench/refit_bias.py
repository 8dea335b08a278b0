"""Does a refit on the audit slice bias what ``evaluate`` says about the model? By simulation.

For each seed a DBLP-ACM link project is built (Köpcke, Thor & Rahm, PVLDB 3(1), 2010; truth
from its matches.csv), its audit slice is labelled from the truth, the model is refit on those
labels, and ``evaluate`` estimates precision and recall at the default threshold. The truth is
the refit model's own precision and recall over all candidate pairs. Bias is the mean of
estimate − truth over the seeds. Targets: |bias| ≤ 0.005 for both, and the 95 % intervals
hold the truth in ≥ 93 % of runs.

    python bench/refit_bias.py [seeds, default 22]
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from _common import data_dir

from docket.core import NewProject, Project
from docket.core.exports.exporting import scores_frame
from docket.core.quality.evaluate import evaluate
from tests.quality import load_truth

TARGET_BIAS = 0.005
TARGET_COVER = 0.93


def one_run(folder: Path, tmp: Path, truth: set[tuple[str, str]], seed: int
            ) -> dict[str, float]:
    """Estimate and truth of precision and recall for one seed's audit slice and refit."""
    path = tmp / f"dblp{seed}.docket"
    Project.create(NewProject(path=path, left=folder / "dblp.csv", right=folder / "acm.csv",
                              id_column="id", seed=seed))
    with Project.open(path) as project:
        audit = project.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs WHERE audit = 1").fetchall()
        for pid, a, b in audit:
            project.decide(pid, "oracle", "match" if (a, b) in truth else "non-match")
        project.refit()
        row = evaluate(project)["at_threshold"]
        s = scores_frame(project)
    path.unlink()
    yes = (s.predicted == "match").to_numpy()
    y = np.array([(a, b) in truth for a, b in zip(s.left_id, s.right_id, strict=True)])
    out = {"seed": seed}
    for name, true in (("precision", (yes & y).sum() / max(1, yes.sum())),
                       ("recall", (yes & y).sum() / max(1, y.sum()))):
        est = row[name]
        out[name] = float(est["value"]) - float(true)
        out[f"{name}_covered"] = float(est["low"] <= true <= est["high"])
    return out


def main() -> None:
    seeds = int(sys.argv[1]) if len(sys.argv) > 1 else 22
    folder = data_dir()
    truth = load_truth(folder / "matches.csv", "dblp_id", "acm_id")
    runs = []
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(seeds):
            t = time.perf_counter()
            r = one_run(folder, Path(tmp), truth, seed)
            runs.append(r)
            print(f"seed {seed:>2}: precision bias {r['precision']:+.4f} "
                  f"({'in' if r['precision_covered'] else 'OUT'}), recall bias "
                  f"{r['recall']:+.4f} ({'in' if r['recall_covered'] else 'OUT'})  "
                  f"{time.perf_counter() - t:.0f} s", flush=True)
    for name in ("precision", "recall"):
        bias = np.array([r[name] for r in runs])
        cover = np.mean([r[f"{name}_covered"] for r in runs])
        print(f"{name:<9} mean bias {bias.mean():+.4f} (target within ±{TARGET_BIAS}), "
              f"upward in {(bias > 0).sum()} of {len(bias)}, intervals hold the truth in "
              f"{cover:.1%} (target ≥ {TARGET_COVER:.0%})")


if __name__ == "__main__":
    main()
