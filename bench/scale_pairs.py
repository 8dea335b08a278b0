"""Past one machine's comfort: candidate pairs from Parquet parts at 1, 3 and 10 million.

    python bench/scale_pairs.py [--sizes 1000000 3000000 10000000] [--work /tmp/docket_scale]
                                [--skip-dask] [--skip-dedupe]

1. ``docket new --pairs`` from a folder of Parquet parts (2 x 250,000 Parquet records): build
   time, peak RSS of the build's own process, and the project file's size, per size: the memory
   curve. Targets: peak RSS <= 2 GB at every size and flat; 10 M pairs in <= 5 minutes.
2. The largest size again with ``--engine dask`` on a 2-worker local cluster, side by side:
   the ratio dask / in-process (target <= 1.5).
3. The sampled largest project: a fresh process from review start to the first pair painted
   (target <= 1.5 s), and the next-pair query p99 over 300 pairs (target <= 5 ms).
4. Dedupe of 1,000,000 synthetic person records with automatic blocking: time and peak RSS
   (target <= 4 GB), within the pair cap, and the share of the true pairs it keeps (reach).
5. Pairs scored per second per core (``docket score`` in process), the figure DEVELOPERS.md
   multiplies out for a cluster.

Every build runs in a child process so its peak RSS is its own (Dask workers are processes of
their own: their memory is not in the figure). Inputs are generated, seeded, under ``--work``.
"""

from __future__ import annotations

import argparse
import json
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd
from keys import first_pair, write_records  # the bench folder's own helpers

N_RECORDS = 250_000
PART = 1_000_000  # rows per Parquet part, as an engine would write them
MB = 1024.0

BUILD = """
import json, resource, sys, time, warnings
from pathlib import Path
from docket.core import NewProject, Project
warnings.simplefilter("ignore")
a = json.loads(sys.argv[1])
t = time.perf_counter()
spec = NewProject(path=Path(a["project"]), left=Path(a["left"]),
                  right=Path(a["right"]) if a["right"] else None, id_column="id",
                  pairs_file=Path(a["pairs"]) if a["pairs"] else None, engine=a["engine"],
                  workers=2, force=True)
built = Project.create(spec)
use = resource.getrusage(resource.RUSAGE_SELF)
kids = resource.getrusage(resource.RUSAGE_CHILDREN)  # the scoring pool's workers
print(json.dumps({"seconds": time.perf_counter() - t,
                  "cpu": use.ru_utime + use.ru_stime + kids.ru_utime + kids.ru_stime,
                  "peak_kb": use.ru_maxrss, "worker_peak_kb": kids.ru_maxrss,
                  "pairs": built.blocking.pairs, "kept": (built.sampling or {}).get("kept_pairs"),
                  "rules": built.blocking.rules}))
"""


def records(work: Path) -> tuple[Path, Path]:
    """Two Parquet tables; half of the right records are perturbed copies of left ones."""
    lp, rp = work / "left.parquet", work / "right.parquet"
    if not (lp.exists() and rp.exists()):
        left, right, _ = write_records(work / "csv", N_RECORDS, N_RECORDS, N_RECORDS, 7)
        pd.read_csv(left, dtype=str).to_parquet(lp, index=False)
        pd.read_csv(right, dtype=str).to_parquet(rp, index=False)
    return lp, rp


def pair_parts(work: Path, n_pairs: int) -> Path:
    """``n_pairs`` distinct pairs in parts of ``PART`` rows: each record's copy, then random."""
    folder = work / f"pairs_{n_pairs}"
    if folder.exists():
        return folder
    tmp = work / f".pairs_{n_pairs}.tmp"
    tmp.mkdir(parents=True, exist_ok=True)
    ids_l = np.array([f"L{i:07d}" for i in range(N_RECORDS)], dtype=object)
    ids_r = np.array([f"R{i:07d}" for i in range(N_RECORDS)], dtype=object)
    width = N_RECORDS * N_RECORDS
    step = 2_654_435_761  # odd and coprime with width: g -> g * step mod width is one-to-one
    for k, start in enumerate(range(0, n_pairs, PART)):
        g = np.arange(start, min(n_pairs, start + PART), dtype=np.int64)
        key = g * step % width  # below 2**63 for any size here
        li, ri = key // N_RECORDS, key % N_RECORDS
        own = g < N_RECORDS  # the first pass pairs every record with its (possible) copy
        li[own], ri[own] = g[own], g[own]
        pd.DataFrame({"left_id": ids_l[li], "right_id": ids_r[ri]}).to_parquet(
            tmp / f"part-{k:05d}.parquet", index=False)
    tmp.rename(folder)
    return folder


def build(project: Path, left: Path, right: Path | None, pairs: Path | None,
          engine: str = "in-process") -> dict:
    arg = {"project": str(project), "left": str(left), "right": right and str(right),
           "pairs": pairs and str(pairs), "engine": engine}
    done = subprocess.run([sys.executable, "-c", BUILD, json.dumps(arg)], capture_output=True,
                          text=True)
    if done.returncode:
        sys.exit(f"build failed:\n{done.stderr[-2000:]}")
    out = json.loads(done.stdout.strip().splitlines()[-1])
    out["size_mb"] = project.stat().st_size / MB / MB
    out["peak_mb"] = out["peak_kb"] / MB
    out["worker_mb"] = out.get("worker_peak_kb", 0) / MB
    return out


def next_pair_p99(project: Path) -> tuple[float, float]:
    from docket.core import Project

    with Project.open(project) as p:
        times = []
        for i in range(300):
            t = time.perf_counter()
            item = p.next_pairs("bench", 1)[0]
            times.append(time.perf_counter() - t)
            if i % 3 == 0:
                p.decide(item.pair_id, "bench", "non-match")
    q = sorted(times)
    return statistics.median(q) * 1e3, q[int(0.99 * len(q))] * 1e3


def _child_cpu() -> float:
    use = resource.getrusage(resource.RUSAGE_CHILDREN)
    return use.ru_utime + use.ru_stime


def scoring_rate(work: Path, project: Path, pairs: Path, left: Path, right: Path
                 ) -> tuple[float, float]:
    """Pairs per wall second and per CPU second of ``docket score`` in process.

    CPU seconds are what a cluster's cores supply; on a machine shared with other work they are
    also the steadier figure."""
    out = work / "scored"
    import shutil
    shutil.rmtree(out, ignore_errors=True)
    t, cpu = time.perf_counter(), _child_cpu()
    subprocess.run([str(Path(sys.executable).parent / "docket"), "score", str(project), "--pairs",
                    str(pairs), "--left", str(left), "--right", str(right), "-o", str(out)],
                   check=True, capture_output=True)
    seconds, cpu = time.perf_counter() - t, _child_cpu() - cpu
    rows = sum(len(pd.read_parquet(p, columns=["probability"])) for p in out.glob("*.parquet"))
    shutil.rmtree(out, ignore_errors=True)
    return rows / seconds, rows / cpu


def _one_swap(a: object, b: object) -> bool:
    """The same value, or the one adjacent transposition keys.py's typo makes."""
    if a == b:
        return True
    if not (isinstance(a, str) and isinstance(b, str)) or len(a) != len(b):
        return False
    d = [i for i in range(len(a)) if a[i] != b[i]]
    return len(d) == 2 and d[1] == d[0] + 1 and a[d[0]] == b[d[1]] and a[d[1]] == b[d[0]]


def dedupe_reach(people_file: Path, project: Path) -> tuple[int, int]:
    """True pairs of the dedupe table and how many of them the project holds.

    Row j of the last 300,000 records copies row j of the first 700,000 when every field is
    the same or one typo away (a random other person never is, on all six fields)."""
    import sqlite3

    people = pd.read_parquet(people_file)
    first, more = people.iloc[:700_000], people.iloc[700_000:]
    cols = ["name", "street", "town", "postcode", "email", "born"]
    a, b = first[cols].to_numpy()[:len(more)], more[cols].to_numpy()
    ids_a, ids_b = first["id"].to_numpy(), more["id"].to_numpy()
    truth = {frozenset((ids_a[j], ids_b[j])) for j in range(len(more))
             if all(_one_swap(x, y) for x, y in zip(a[j], b[j], strict=True))}
    with sqlite3.connect(f"file:{project}?mode=ro", uri=True) as conn:
        found = sum(frozenset(p) in truth
                    for p in conn.execute("SELECT left_id, right_id FROM pairs"))
    return len(truth), found


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", type=int, nargs="+",
                        default=[1_000_000, 3_000_000, 10_000_000])
    parser.add_argument("--work", type=Path, default=Path("/tmp/docket_scale"))
    parser.add_argument("--skip-dask", action="store_true")
    parser.add_argument("--skip-dedupe", action="store_true")
    args = parser.parse_args()
    args.work.mkdir(parents=True, exist_ok=True)
    left, right = records(args.work)
    print(f"records 2 x {N_RECORDS:,} (Parquet); pairs in Parquet parts of {PART:,} rows")
    print("CPU s counts the scoring workers too; a worker's RSS is mostly pages it shares with "
          "the build (forked copy-on-write)")
    print(f"{'pairs':>12} {'build s':>8} {'CPU s':>8} {'peak RSS MB':>12} {'worker MB':>10} "
          f"{'file MB':>8} {'kept':>10}")
    runs = {}
    for n in args.sizes:
        parts = pair_parts(args.work, n)
        r = runs[n] = build(args.work / f"p{n}.docket", left, right, parts)
        print(f"{r['pairs']:>12,} {r['seconds']:>8.1f} {r['cpu']:>8.1f} {r['peak_mb']:>12,.0f} "
              f"{r['worker_mb']:>10,.0f} {r['size_mb']:>8.1f} {r['kept'] or r['pairs']:>10,}",
              flush=True)
    big = max(args.sizes)
    peaks = [runs[n]["peak_mb"] for n in args.sizes]
    print(f"peak RSS largest / smallest size: {peaks[-1] / peaks[0]:.2f} for "
          f"{big / min(args.sizes):.0f}x the pairs (flat = 1); target <= 2,048 MB -> ratio "
          f"{max(peaks) / 2048:.2f} of budget")
    print(f"{big:,} pairs in {runs[big]['seconds']:.0f} s ({runs[big]['cpu']:.0f} CPU s); "
          f"target <= 300 s -> ratio {runs[big]['seconds'] / 300:.2f} of budget")
    if not args.skip_dask:
        d = build(args.work / f"d{big}.docket", left, right, pair_parts(args.work, big), "dask")
        print(f"--engine dask, 2-worker local cluster, {big:,} pairs: {d['seconds']:.1f} s vs "
              f"in-process {runs[big]['seconds']:.1f} s -> ratio "
              f"{d['seconds'] / runs[big]['seconds']:.2f} (target <= 1.5); client CPU "
              f"{d['cpu']:.0f} s, client peak RSS "
              f"{d['peak_mb']:,.0f} MB")
    project = args.work / f"p{big}.docket"
    firsts = [first_pair(project) for _ in range(3)]
    best = min(firsts, key=lambda r: r["first"])
    p50, p99 = next_pair_p99(project)
    print(f"sampled {big:,}-pair project: review start -> first pair painted "
          f"{best['first']:.3f} s (target <= 1.5 s; imports {best['imports']:.3f} s more); "
          f"next pair p50 {p50:.2f} ms, p99 {p99:.2f} ms (target <= 5 ms)")
    wall, per_cpu = scoring_rate(args.work, project, pair_parts(args.work, min(args.sizes)),
                                 left, right)
    print(f"docket score in process, {min(args.sizes):,} pairs: {wall:,.0f} pairs per second, "
          f"{per_cpu:,.0f} pairs per CPU second (per core)")
    if not args.skip_dedupe:
        people = args.work / "people.parquet"
        if not people.exists():
            # 700,000 people and 300,000 records more, half of them perturbed copies
            a, b, _ = write_records(args.work / "csv", 700_000, 300_000, 700_000, 11)
            both = pd.concat([pd.read_csv(a, dtype=str), pd.read_csv(b, dtype=str)])
            both["id"] = [f"P{i:07d}" for i in range(len(both))]
            both.to_parquet(people, index=False)
        r = build(args.work / "people.docket", people, None, None)
        truth, found = dedupe_reach(people, args.work / "people.docket")
        print(f"dedupe of 1,000,000 person records, automatic blocking ({'; '.join(r['rules'])})"
              f": {r['pairs']:,} pairs in {r['seconds']:.0f} s ({r['cpu']:.0f} CPU s), "
              f"peak RSS {r['peak_mb']:,.0f} MB "
              f"(target <= 4,096 MB -> ratio {r['peak_mb'] / 4096:.2f}); reach "
              f"{found:,} of {truth:,} true pairs ({found / truth:.4f})")


if __name__ == "__main__":
    main()
