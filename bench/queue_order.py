"""Labels needed to reach F1 0.95 on DBLP-ACM: docket's queue order against a random order.

Answers come from the benchmark's matches.csv; both runs refit every 25 labels, as the review
screen does. Target: the queue needs ≤ 1/3 of the labels random order needs.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

import numpy as np
from _common import data_dir

from docket.core import NewProject, Project
from tests.quality import load_truth, measure

TARGET = 0.95
STEP = 25
LIMIT = 3000


def labels_to_target(project: Project, truth: set, order: str, seed: int = 0) -> int | None:
    rng = np.random.default_rng(seed)
    pool = [r for r in project.connection.execute(
        "SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id")]
    rng.shuffle(pool)
    for n in range(1, LIMIT + 1):
        if order == "queue":
            item = project.next_pairs("oracle", 1)[0]
            pid, a, b = item.pair_id, item.left_id, item.right_id
        else:
            pid, a, b = pool[n - 1]
        project.decide(pid, "oracle", "match" if (a, b) in truth else "non-match")
        if n % STEP == 0:
            project.refit()
            if measure(project, truth)["f1"] >= TARGET:
                return n
    return None


def main() -> None:
    folder = data_dir()
    truth = load_truth(folder / "matches.csv", "dblp_id", "acm_id")
    found = {}
    with tempfile.TemporaryDirectory() as tmp:
        for order in ("queue", "random"):
            path = Path(tmp) / f"{order}.docket"
            Project.create(NewProject(path=path, left=folder / "dblp.csv",
                                      right=folder / "acm.csv", id_column="id"))
            with Project.open(path) as p:
                start = measure(p, truth)["f1"]
                found[order] = labels_to_target(p, truth, order)
            shown = found[order] if found[order] is not None else f"> {LIMIT}"
            print(f"{order:<7} order: F1 {start:.3f} with no labels; reaches F1 {TARGET} after "
                  f"{shown} labels", flush=True)
    q, r = found["queue"], found["random"] or LIMIT
    if q is None:
        print("queue order did not reach the target")
        sys.exit(1)
    bound = "" if found["random"] else " (at least; random never reached it)"
    print(f"ratio queue/random labels: {q / r:.3f}{bound} (target <= 0.333)")


if __name__ == "__main__":
    main()
