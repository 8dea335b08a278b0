"""Merging a copy that holds 2,500 and 25,000 decisions made offline; merging it again.

A synthetic 40,000-pair project is built in a temporary folder and copied; in each copy one
reviewer's decisions are written straight into the log (as an offline session would have left
them), then ``docket merge`` brings them into a fresh copy of the project. Target: the
25,000-decision merge ≤ 10 s, and merging linear in the copy's size (time per decision the same
at both sizes). Merging the same copy again (nothing new) is timed beside it. Wall time is
printed beside this process's CPU time: on a shared machine the wall time mostly measures
the other users (a merge blocks on almost nothing: 12-18 voluntary context switches in a
25,000-decision merge, i.e. no fsync waits; its wall time is its CPU time stretched by the
scheduler). Beside it, in the same run, the 25,000-decision merge as it was done before:
``current`` rebuilt one (pair, reviewer, role) at a time (six statements each) with SQLite's
2 MB page cache.

Run: ``nice python bench/merge_cost.py``.
"""

from __future__ import annotations

import shutil
import sys
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from decision_cost import add_history, make_project

SIZES = (2_500, 25_000)
TARGET_S = 10.0


@contextmanager
def one_key_at_a_time() -> Iterator[None]:
    from docket.core.reviewing import merge as merging
    from docket.core.storage import decisions as log

    def per_key(conn: object, keys: list[tuple[int, str, str]]) -> None:
        for key in keys:
            log.refresh(conn, *key)  # type: ignore[arg-type]

    saved = log.refresh_many, merging.CACHE_KIB
    log.refresh_many, merging.CACHE_KIB = per_key, 2000  # type: ignore[assignment]
    try:
        yield
    finally:
        log.refresh_many, merging.CACHE_KIB = saved


def timed_merge(base: Path, folder: Path, size: int, label: str) -> tuple[float, float, float]:
    from docket.core import Project
    from docket.core.reviewing.merge import merge

    here, copy = folder / f"here{label}.docket", folder / f"copy{label}.docket"
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
    return first, first_cpu, again


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        print("building a 40,000-pair project …", flush=True)
        base = make_project(folder, n_records=20_000, n_pairs=40_000)
        results = {size: timed_merge(base, folder, size, str(size)) for size in SIZES}
        with one_key_at_a_time():
            before = timed_merge(base, folder, SIZES[-1], "before")
        small, large = SIZES
        per = {s: results[s][0] / s for s in SIZES}
        for size, (first, cpu, again) in results.items():
            print(f"merge of a copy with {size:>6,} decisions: wall {first:6.2f} s, CPU "
                  f"{cpu:6.2f} s ({first / size * 1e6:6.1f} µs each); again (nothing new) "
                  f"{again:6.2f} s; wall / target {TARGET_S:.0f} s = {first / TARGET_S:.2f}, "
                  f"CPU / target = {cpu / TARGET_S:.2f}")
        print(f"time per decision at {large:,} / at {small:,} = {per[large] / per[small]:.2f} "
              "(1.00 is linear)")
        now = results[large]
        print(f"as before (one key at a time, 2 MB cache), {large:,} decisions: wall "
              f"{before[0]:6.2f} s, CPU {before[1]:6.2f} s; now / before: wall "
              f"{now[0] / before[0]:.2f}, CPU {now[1] / before[1]:.2f}")


if __name__ == "__main__":
    main()
