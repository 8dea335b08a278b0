"""The review screen's benchmark: how fast it moves from one pair to the next.

    /tmp/venv/bin/python bench/keys.py [--decisions 500] [--work /tmp/docket_bench]

1. In a 100,000-pair project, headless, over 500 decisions: the time from a key press to the
   next pair painted (p50, p99, max), beside the same app repainting the same card with no
   commit and no queue step, measured in the same run, alternating, so machine noise hits both.
2. In a fresh process: the time from the start of the review (after imports) to the first
   pair on screen for a 1,000,000-pair project, next to the interpreter + import time.

The synthetic records and candidate pairs are generated (seeded) under ``--work``, outside the
repository, and the projects are built once with ``NewProject(pairs_file=...)`` and reused.
"""

from __future__ import annotations

import argparse
import asyncio
import json
import shutil
import statistics
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

SYLLABLES = ("an", "bel", "cor", "dra", "el", "fin", "gar", "hol", "is", "jun", "ka", "lor",
             "mar", "nel", "or", "pel", "quin", "ros", "sel", "tor", "ul", "van", "wen", "yr")
STREETS = ("Road", "Lane", "Rise", "Close", "Row", "Street", "Way", "Gardens")
TOWNS = tuple(f"{a.title()}{b}ton" for a in SYLLABLES[:12] for b in ("ing", "ham", "s"))


def _words(rng: np.random.Generator, n: int, parts: int) -> np.ndarray:
    picks = rng.integers(0, len(SYLLABLES), size=(n, parts))
    table = np.array(SYLLABLES, dtype=object)
    out = table[picks[:, 0]]
    for j in range(1, parts):
        out = out + table[picks[:, j]]
    return np.array([w.title() for w in out], dtype=object)


def _typo(rng: np.random.Generator, values: np.ndarray, share: float) -> np.ndarray:
    out = values.copy()
    for i in np.flatnonzero(rng.random(len(values)) < share):
        v = out[i]
        if isinstance(v, str) and len(v) > 3:
            k = int(rng.integers(1, len(v) - 1))
            out[i] = v[:k] + v[k + 1] + v[k] + v[k + 2:]
    return out


def write_records(work: Path, n_left: int, n_right: int, n_pairs: int, seed: int
                  ) -> tuple[Path, Path, Path]:
    """Two CSV tables and a pairs file: every left record has n_pairs / n_left candidates,
    the first of which is (for half of the records) a perturbed copy of it."""
    import pandas as pd

    rng = np.random.default_rng(seed)
    work.mkdir(parents=True, exist_ok=True)
    tag = f"{n_left}_{n_right}_{n_pairs}_{seed}"
    paths = (work / f"left_{tag}.csv", work / f"right_{tag}.csv", work / f"pairs_{tag}.csv")
    if all(p.exists() for p in paths):
        return paths

    def frame(n: int, prefix: str) -> pd.DataFrame:
        first, last = _words(rng, n, 2), _words(rng, n, 3)
        return pd.DataFrame({
            "id": [f"{prefix}{i:07d}" for i in range(n)],
            "name": first + " " + last,
            "street": [f"{int(a)} {b} {c}" for a, b, c in zip(
                rng.integers(1, 200, n), _words(rng, n, 2), rng.choice(STREETS, n),
                strict=True)],
            "town": rng.choice(np.array(TOWNS, dtype=object), n),
            "postcode": [f"Q{chr(65 + int(a))}{int(b)} {int(c)}{chr(65 + int(d))}{chr(65 + int(e))}"
                         for a, b, c, d, e in zip(*(rng.integers(0, k, n) for k in
                                                    (26, 10, 10, 26, 26)), strict=True)],
            "email": [f"{a.lower()}.{b.lower()}@example.org" for a, b in zip(first, last,
                                                                              strict=True)],
            "born": [f"{int(y)}-{int(m):02d}-{int(d):02d}" for y, m, d in zip(
                rng.integers(1940, 2005, n), rng.integers(1, 13, n), rng.integers(1, 29, n),
                strict=True)],
        })

    left = frame(n_left, "L")
    right = frame(n_right, "R")
    per = max(1, n_pairs // n_left)
    copies = np.flatnonzero(rng.random(n_left) < 0.5)
    copies = copies[copies < n_right]
    for col in ("name", "street", "town", "postcode", "email", "born"):
        values = left[col].to_numpy(dtype=object)[copies]
        right.loc[copies, col] = _typo(rng, values, 0.3)
    li = np.repeat(np.arange(n_left), per)
    ri = rng.integers(0, n_right, size=len(li))
    ri[::per] = np.where(np.arange(n_left) < n_right, np.arange(n_left), ri[::per])
    pairs = pd.DataFrame({"left_id": left["id"].to_numpy()[li],
                          "right_id": right["id"].to_numpy()[ri]}).drop_duplicates()
    left.to_csv(paths[0], index=False)
    right.to_csv(paths[1], index=False)
    pairs.to_csv(paths[2], index=False)
    return paths


def project_with(work: Path, n_pairs: int, seed: int = 7) -> Path:
    from docket.core import NewProject, Project

    n_left = n_pairs // 4
    target = work / f"bench_{n_pairs}.docket"
    if target.exists():
        return target
    left, right, pairs = write_records(work, n_left, n_left, n_pairs, seed)
    t = time.perf_counter()
    Project.create(NewProject(path=target, left=left, right=right, id_column="id",
                              pairs_file=pairs, seed=seed, force=True))
    print(f"built {target.name} in {time.perf_counter() - t:.1f} s", file=sys.stderr)
    return target


def pair_count(path: Path) -> int:
    import sqlite3

    with sqlite3.connect(f"file:{path}?mode=ro", uri=True) as conn:
        return int(conn.execute("SELECT count(*) FROM pairs").fetchone()[0])


def _pct(values: list[float], q: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, round(q * (len(ordered) - 1)))]


async def measure_keys(path: Path, decisions: int, refit: bool) -> dict[str, list[float]]:
    """Alternate: one decision key, then one repaint of the same card; time each to the frame.

    The clock starts when the key event is posted to the app and stops in the callback that
    Textual runs after the screen has been refreshed with the new card.
    """
    from textual import events

    from docket.tui.review_app import make_app

    app = make_app(path, "bench", refit_every=None if refit else 0,
                   keymap_file=path.with_suffix(".no-keymap"))
    timings: dict[str, list[float]] = {"decide": [], "repaint": []}
    painted = asyncio.Event()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        app.on_painted = painted.set
        for i in range(decisions):
            for kind, key, char in (("decide", *(("s", "s") if i % 3 else ("d", "d"))),
                                    ("repaint", "ctrl+l", None)):
                painted.clear()
                t0 = time.perf_counter()
                app.post_message(events.Key(key, char))
                await painted.wait()
                timings[kind].append(time.perf_counter() - t0)
        app.on_painted = None
        await app.workers.wait_for_complete()
    return timings


def first_pair(path: Path) -> dict[str, float]:
    """A fresh interpreter: its import time, then review start to the first pair painted."""
    code = (
        "import time, sys, json; t0 = time.perf_counter()\n"
        "from docket.tui.review_app import make_app\n"
        "t1 = time.perf_counter()\n"
        f"app = make_app({str(path)!r}, 'bench-first', keymap_file=None)\n"
        "out = {}\n"
        "def done():\n"
        "    out['first'] = time.perf_counter() - t1\n"
        "    app.exit()\n"
        "app.on_painted = done\n"
        "app.run(headless=True, size=(120, 40))\n"
        "out['imports'] = t1 - t0\n"
        "print(json.dumps(out))\n")
    t = time.perf_counter()
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    wall = time.perf_counter() - t
    interp = subprocess.run([sys.executable, "-c", "pass"], capture_output=True, check=True)
    del interp
    t = time.perf_counter()
    subprocess.run([sys.executable, "-c", "pass"], check=True)
    bare = time.perf_counter() - t
    out = json.loads(run.stdout.strip().splitlines()[-1])
    out.update(wall=wall, interpreter=bare)
    return out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--decisions", type=int, default=500)
    parser.add_argument("--work", type=Path, default=Path("/tmp/docket_bench"))
    parser.add_argument("--no-refit", action="store_true",
                        help="also measure with the background refit switched off")
    parser.add_argument("--skip-big", action="store_true", help="skip the 1,000,000-pair part")
    args = parser.parse_args()

    small = project_with(args.work, 100_000)
    runs = [True, False] if args.no_refit else [True]
    for refit in runs:
        copy = args.work / "run.docket"
        for extra in ("", "-wal", "-shm"):
            Path(f"{copy}{extra}").unlink(missing_ok=True)
        shutil.copy(small, copy)
        t = asyncio.run(measure_keys(copy, args.decisions, refit))
        dec, rep = t["decide"], t["repaint"]
        ms = 1000.0
        print(f"{pair_count(small):,} pairs, {len(dec)} decisions, background refit "
              f"{'on (every 25)' if refit else 'off'}:")
        for name, xs in (("key -> next pair painted", dec), ("repaint same card", rep)):
            print(f"  {name:26s} p50 {statistics.median(xs) * ms:6.1f} ms   "
                  f"p99 {_pct(xs, 0.99) * ms:6.1f} ms   max {max(xs) * ms:6.1f} ms")
        print(f"  ratio of p50s              {statistics.median(dec) / statistics.median(rep):.2f}"
              "   (target <= 1.5; p99 target <= 50 ms)")
    if not args.skip_big:
        big = project_with(args.work, 1_000_000)
        copy = args.work / "run_big.docket"
        for extra in ("", "-wal", "-shm"):
            Path(f"{copy}{extra}").unlink(missing_ok=True)
        shutil.copy(big, copy)
        firsts = [first_pair(copy) for _ in range(3)]
        best = min(firsts, key=lambda r: r["first"])
        print(f"{pair_count(big):,} pairs, fresh process (best of 3):")
        print(f"  review start -> first pair painted  {best['first']:.3f} s   (target <= 1.5 s)")
        print(f"  imports {best['imports']:.3f} s; bare interpreter {best['interpreter']:.3f} s; "
              f"whole process {best['wall']:.3f} s")


if __name__ == "__main__":
    main()
