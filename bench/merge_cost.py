"""Merging a copy that holds 2,500 and 25,000 decisions made offline; merging it again.

A synthetic 40,000-pair project is built in a temporary folder and copied; in each copy one
reviewer's decisions are written straight into the log (as an offline session would have left
them), then ``docket merge`` brings them into a fresh copy of the project. Target: the
25,000-decision merge ≤ 10 s, and merging linear in the copy's size (time per decision the same
at both sizes). Merging the same copy again (nothing new) is timed beside it. Wall time is
printed beside this process's CPU time: on a shared machine the wall time mostly measures
the other users.

Run: ``nice python bench/merge_cost.py``.
"""

from __future__ import annotations

import shutil
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from decision_cost import add_history, make_project

SIZES = (2_500, 25_000)
TARGET_S = 10.0


def main() -> None:
    from docket.core import Project
    from docket.core.reviewing.merge import merge

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        print("building a 40,000-pair project …", flush=True)
        base = make_project(folder, n_records=20_000, n_pairs=40_000)
        results = {}
        for size in SIZES:
            here, copy = folder / f"here{size}.docket", folder / f"copy{size}.docket"
            shutil.copy(base, here)
            shutil.copy(base, copy)
            with Project.open(copy) as other:
                ids = [r[0] for r in other.connection.execute(
                    "SELECT pair_id FROM pairs ORDER BY pair_id LIMIT ?", (size,))]
                add_history(other, ids, reviewer="offline")
            with Project.open(here) as project:
                t, cpu = time.perf_counter(), time.process_time()
                report = merge(project, [copy])
                first, first_cpu = time.perf_counter() - t, time.process_time() - cpu
                t = time.perf_counter()
                merge(project, [copy])
                again = time.perf_counter() - t
                got = project.connection.execute(
                    "SELECT count(*) FROM current WHERE reviewer = 'offline'").fetchone()[0]
            assert got == size, (got, size, report)
            results[size] = (first, first_cpu, again)
        small, large = SIZES
        per = {s: results[s][0] / s for s in SIZES}
        for size, (first, cpu, again) in results.items():
            print(f"merge of a copy with {size:>6,} decisions: wall {first:6.2f} s, CPU "
                  f"{cpu:6.2f} s ({first / size * 1e6:6.1f} µs each); again (nothing new) "
                  f"{again:6.2f} s; wall / target {TARGET_S:.0f} s = {first / TARGET_S:.2f}, "
                  f"CPU / target = {cpu / TARGET_S:.2f}")
        print(f"time per decision at {large:,} / at {small:,} = {per[large] / per[small]:.2f} "
              "(1.00 is linear)")


if __name__ == "__main__":
    main()
