"""A reviewer's decisions while a 25,000-row bulk ``label`` runs on the same file.

A synthetic 40,000-pair project is built in a temporary folder. One process records 25,000
labels from a file (``apply_rows``, as ``docket label`` does); meanwhile this process decides
other pairs as a reviewer, one every 20 ms, timing each ``Project.decide``. Three runs side by
side on fresh copies: no bulk run (the baseline), the bulk run in its batches (the default), and
the bulk run as one transaction (how it was written before). Target: p99 ≤ 100 ms while the
batched run goes on. A decision that waits past the 5 s busy timeout fails and is counted.

Run: ``nice python bench/bulk_label.py``.
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import REPO
from decision_cost import make_project

BULK_ROWS = 25_000
TARGET_P99_S = 0.100
EVERY_S = 0.020
BASELINE_DECISIONS = 150

_BULK = """
import sys, time
from pathlib import Path
from docket.core import Project
from docket.core.reviewing.bulk import apply_rows, read_rows
path, source, whole = sys.argv[1:4]
with Project.open(path) as p:
    rows = read_rows(p, Path(source))
    print("ready", flush=True)
    t = time.perf_counter()
    apply_rows(p, "bulk", rows, **({"batch": 10 ** 9, "seconds": float("inf")}
                                   if whole == "1" else {}))
    print(f"{time.perf_counter() - t:.3f}", flush=True)
"""


def _decide_while(path: Path, pair_ids: list[int], running: subprocess.Popen[str] | None
                  ) -> tuple[list[float], int]:
    """Decide pairs one by one, every EVERY_S, while ``running`` runs (or a fixed count)."""
    from docket.core import DocketError, Project

    times, errors = [], 0
    with Project.open(path) as project:
        for pid in pair_ids:
            if running is None and len(times) >= BASELINE_DECISIONS:
                break
            if running is not None and running.poll() is not None:
                break
            t = time.perf_counter()
            try:
                project.decide(pid, "maya", "match", seconds=1.0)
            except DocketError:
                errors += 1
            times.append(time.perf_counter() - t)
            time.sleep(EVERY_S)
    return sorted(times), errors


def _run(base: Path, folder: Path, name: str, whole: bool | None, source: Path,
         mine: list[int]) -> str:
    path = folder / f"{name}.docket"
    shutil.copy(base, path)
    proc = None
    if whole is not None:
        proc = subprocess.Popen([sys.executable, "-c", _BULK, str(path), str(source),
                                 str(int(whole))], stdout=subprocess.PIPE, text=True, cwd=REPO)
        assert proc.stdout is not None and proc.stdout.readline().strip() == "ready"
    times, errors = _decide_while(path, mine, proc)
    bulk_s = ""
    if proc is not None:
        out, _ = proc.communicate(timeout=3600)
        bulk_s = f"; the bulk run took {float(out.strip().splitlines()[-1]):.1f} s"
    if not times:
        return f"{name:<28} no decision was timed{bulk_s}"
    p50, p99 = times[len(times) // 2], times[min(len(times) - 1, int(0.99 * len(times)))]
    return (f"{name:<28} {len(times):>4} decisions: p50 {p50 * 1e3:7.1f} ms, p99 "
            f"{p99 * 1e3:7.1f} ms, failed {errors}; p99 / target 100 ms = "
            f"{p99 / TARGET_P99_S:.2f}{bulk_s}")


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        print("building a 40,000-pair project …", flush=True)
        base = make_project(folder, n_records=20_000, n_pairs=40_000)
        from docket.core import Project
        with Project.open(base) as p:
            ids = [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs "
                                                      "ORDER BY pair_id")]
        source = folder / "bulk.csv"
        pd.DataFrame({"pair_id": ids[:BULK_ROWS],
                      "label": ["non-match"] * BULK_ROWS}).to_csv(source, index=False)
        mine = ids[BULK_ROWS:]
        print(_run(base, folder, "no bulk run", None, source, mine), flush=True)
        print(_run(base, folder, "bulk run in batches", False, source, mine), flush=True)
        print(_run(base, folder, "bulk run, one transaction", True, source, mine),
              flush=True)


if __name__ == "__main__":
    main()
