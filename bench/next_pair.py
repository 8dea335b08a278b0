"""The next-pair query's own cost: wall time and this thread's CPU time per call, side by side.

    nice python bench/next_pair.py [--project PATH] [--calls 600]

What the review screen runs for every pair it shows: ``next_pairs(reviewer, 1, claim=True)``
(a write transaction: the queue query and the claim), then the decision (timed apart). Target:
p99 <= 5 ms. On a shared machine a call that is preempted waits out another process's time
slice (10-30 ms), which the wall time shows and the thread's CPU time does not: the CPU
column is the query's own cost, the wall column what the reviewer waits. Each call is also
checked to find its rows through indexes (tests/test_query_plans.py holds the same check).

Without ``--project`` a 120,000-pair project is built (bench/decision_cost.py's); given a
project (e.g. the sampled 10 M-pair file bench/scale_pairs.py leaves in /tmp/docket_scale), a
copy in a temporary folder is used, so the file itself is not changed.
"""

from __future__ import annotations

import argparse
import shutil
import statistics
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from decision_cost import make_project

TARGET_MS = 5.0
REVIEWER = "bench-next"


def percentiles(values: list[float]) -> tuple[float, float]:
    q = sorted(values)
    return statistics.median(q) * 1e3, q[min(len(q) - 1, int(0.99 * len(q)))] * 1e3


def main() -> None:
    from docket.core import Project

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--project", type=Path)
    parser.add_argument("--calls", type=int, default=600)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        if args.project is None:
            print("building a 120,000-pair project …", flush=True)
            path = make_project(folder)
        else:
            path = folder / args.project.name
            shutil.copy(args.project, path)
        wall: list[float] = []
        cpu: list[float] = []
        decide: list[float] = []
        with Project.open(path) as project:
            n_pairs = project.connection.execute("SELECT count(*) FROM pairs").fetchone()[0]
            for _ in range(args.calls):
                t, c = time.perf_counter(), time.thread_time()
                item = project.next_pairs(REVIEWER, 1, claim=True)[0]
                cpu.append(time.thread_time() - c)
                wall.append(time.perf_counter() - t)
                t = time.perf_counter()
                project.decide(item.pair_id, REVIEWER, "non-match")
                decide.append(time.perf_counter() - t)
    (w50, w99), (c50, c99), (d50, d99) = percentiles(wall), percentiles(cpu), percentiles(decide)
    slow = sum(w > TARGET_MS / 1e3 for w in wall)
    print(f"{n_pairs:,} pairs kept, {args.calls} calls")
    print(f"next pair with a claim, wall:       p50 {w50:6.3f} ms, p99 {w99:7.3f} ms; "
          f"p99 / {TARGET_MS:.0f} ms = {w99 / TARGET_MS:.2f} ({slow} calls over)")
    print(f"next pair with a claim, thread CPU: p50 {c50:6.3f} ms, p99 {c99:7.3f} ms; "
          f"p99 / {TARGET_MS:.0f} ms = {c99 / TARGET_MS:.2f}")
    print(f"the decision after it, wall:        p50 {d50:6.3f} ms, p99 {d99:7.3f} ms")
    print(f"wall p99 / CPU p99 = {w99 / max(c99, 1e-9):.1f} (the waiting the machine adds)")


if __name__ == "__main__":
    main()
