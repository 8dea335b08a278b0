"""Building with one process or every core, side by side, and a sampled build's second pass.

    nice python bench/build_workers.py [--pairs 1000000] [--sample-above N] [--rounds 1]

Each build runs in a child process, alternating, so machine noise hits every variant alike:
  one process   --workers 1
  threads x cores  forked workers, each asking rapidfuzz for every core (as builds did before)
  every core    the default (forked scoring workers sharing the scorer, one thread each)
and with --sample-above below --pairs (a sampled project), also
  compare again one process that holds no similarities from the scoring pass and compares
                every kept pair again (how a sampled build went before it held them)
Printed: wall seconds, CPU seconds (the build's process and its workers), wall seconds of the
comparing steps (normalising values, the scoring pass and any second pass; the chance
baseline not included), peak RSS of the build's process and of its largest worker (shared
pages counted in both), and each variant's wall time over the first's.
Inputs (2 x 250,000 synthetic Parquet records, seeded) are made by bench/scale.py's generator
under --work, or given with --inputs: a folder holding left.parquet, right.parquet and
pairs.parquet (a file or a folder of parts; bench/scale_pairs.py's inputs linked so have six
compared fields to bench/scale.py's four).
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import time
from pathlib import Path

import scale  # the bench folder's own generator

CHILD = """
import json, resource, sys, time, warnings
from pathlib import Path
from docket.core import NewProject, Project
from docket.core.ordering import sampling
warnings.simplefilter("ignore")
a = json.loads(sys.argv[1])
if a["again"]:  # both engines that hold similarities: pairs in memory, pairs spilled to disk
    from docket.core.storage import spilled
    sampling.held_for = spilled.held_for = lambda *args: sampling.Held()
if a["threads"]:  # each scoring worker's rapidfuzz calls on every core, as before
    from docket.core.matching import compare
    compare.use_threads = lambda n: None
d = Path(a["dir"])
spent, last = {}, [time.perf_counter(), ""]
def progress(name, done, total):  # seconds per build step, up to the next step's report
    now = time.perf_counter()
    spent[last[1]] = spent.get(last[1], 0.0) + now - last[0]
    last[:] = [now, name]
t = time.perf_counter()
Project.create(NewProject(path=Path(a["project"]), left=d / "left.parquet",
                          right=d / "right.parquet", id_column="id",
                          pairs_file=d / "pairs.parquet", force=True, workers=a["workers"],
                          sample_above=a["sample_above"]), progress=progress)
me, kids = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
print(json.dumps({"wall": time.perf_counter() - t,
                  "cpu": me.ru_utime + me.ru_stime + kids.ru_utime + kids.ru_stime,
                  "rss": me.ru_maxrss / 1024, "worker_rss": kids.ru_maxrss / 1024,
                  "comparing": spent.get("comparing", 0.0)
                               + spent.get("comparing the kept pairs", 0.0)}))
"""


def run(folder: Path, project: Path, workers: int | None, sample_above: int, again: bool,
        threads: bool = False) -> dict:
    arg = {"dir": str(folder), "project": str(project), "workers": workers,
           "sample_above": sample_above, "again": again, "threads": threads}
    done = subprocess.run([sys.executable, "-c", CHILD, json.dumps(arg)], capture_output=True,
                          text=True)
    if done.returncode:
        sys.exit(f"build failed:\n{done.stderr[-2000:]}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--pairs", type=int, default=1_000_000)
    parser.add_argument("--sample-above", type=int, default=None,
                        help="keep a sample of this many pairs (default: keep every pair)")
    parser.add_argument("--rounds", type=int, default=1)
    parser.add_argument("--work", type=Path, default=Path("/tmp/docket_workers"))
    parser.add_argument("--inputs", type=Path, default=None)
    args = parser.parse_args()
    folder = args.inputs or args.work / f"in{args.pairs}"
    if not (folder / "pairs.parquet").exists():
        folder.mkdir(parents=True, exist_ok=True)
        scale.N_PAIRS = args.pairs
        scale.make_inputs(folder)
    sample_above = args.sample_above or args.pairs
    variants: list[tuple[str, int | None, bool, bool]] = [
        ("one process", 1, False, False), ("threads x cores", None, False, True),
        ("every core", None, False, False)]
    if sample_above < args.pairs:
        variants.insert(0, ("compare again", 1, True, False))
    kept = f"sample of {sample_above:,}" if sample_above < args.pairs else "all kept"
    print(f"{args.pairs:,} pairs from {folder}, {kept}")
    for r in range(args.rounds):
        first = None
        for name, workers, again, threads in variants:
            t = time.perf_counter()
            out = run(folder, args.work / "bench.docket", workers, sample_above, again, threads)
            first = first or out["wall"]
            print(f"  round {r + 1} {name:13s} wall {out['wall']:6.1f} s  cpu {out['cpu']:6.1f} s"
                  f"  comparing {out['comparing']:5.1f} s"
                  f"  rss {out['rss']:6.0f} MB  worker rss {out['worker_rss']:5.0f} MB  "
                  f"wall / first {out['wall'] / first:.2f}  ({time.perf_counter() - t:.1f} s "
                  "with interpreter)")


if __name__ == "__main__":
    main()
