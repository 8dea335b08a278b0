"""Every command on 100,000 and on 1,000,000 pairs, side by side: time and peak memory.

Two projects are built in a temporary folder from the synthetic records of ``scale.py`` (the
same 2 x 250,000 records; 100,000 and 1,000,000 random candidate pairs), each given the same
decisions: two reviewers of 3,000 pairs each, 1,500 of them shared (the audit slice, the
likeliest pairs and random ones; a few labels flipped, some held). Each command then runs in a
fresh process (``/usr/bin/time`` where it exists, for the peak RSS; else the children's
``ru_maxrss``) on a copy of each project. The ratio of the large to the small is printed: the
pairs grow 10 x, so a ratio well above 10 is superlinear, and one near 1 does not depend on
the pairs. The label file holds 25,000 of each project's pairs (one in 30 a match); the matcher
file scores every pair.

Run: ``nice python bench/commands_scale.py`` (about five minutes on two cores).
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from scale import BUILD, make_inputs

SIZES = (100_000, 1_000_000)
SCREEN = """
import asyncio, sys
from docket.tui.team_app import make_team_app
async def main():
    app = make_team_app(sys.argv[1], "lee" if sys.argv[2] == "adjudicate" else "",
                        start=sys.argv[2], keymap_file=None)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()  # the figures worked out, shown
        await pilot.pause()
    app.project.close()
asyncio.run(main())
"""
FIRST_PAIR = """
import sys
from docket.tui.review_app import make_app
app = make_app(sys.argv[1], "bench-first", keymap_file=None)
app.on_painted = app.exit
app.run(headless=True, size=(120, 40))
"""


def _labels(pairs: pd.DataFrame, rng: np.random.Generator, flip: float) -> np.ndarray:
    cut = pairs["probability"].quantile(0.8)
    lab = np.where(pairs["probability"] >= cut, "match", "non-match")
    flipped = rng.random(len(pairs)) < flip
    lab = np.where(flipped, np.where(lab == "match", "non-match", "match"), lab)
    return np.where(rng.random(len(pairs)) < 0.01, "hold", lab)


def _files(project: Path, folder: Path) -> None:
    """ana.csv and ben.csv (two reviewers), big.csv (25,000 rows), matcher.csv (every pair)."""
    import sqlite3
    from contextlib import closing
    # closed, not only committed: an open connection kept the later commands' writes in the
    # write-ahead log, which a copy of the file alone does not hold
    with closing(sqlite3.connect(project)) as conn:
        pairs = pd.read_sql_query(
            "SELECT p.left_id, p.right_id, p.audit, t.probability FROM pairs p "
            "JOIN patterns t USING (pattern_id)", conn)
    rng = np.random.default_rng(1)
    pool = pd.concat([pairs[pairs.audit == 1], pairs.nlargest(1000, "probability"),
                      pairs.sample(3000, random_state=2)]).drop_duplicates(
        ["left_id", "right_id"]).sample(frac=1, random_state=3)
    for name, part, flip in (("ana", pool.iloc[:3000], 0.02), ("ben", pool.iloc[1500:4500],
                                                                0.05)):
        part.assign(label=_labels(part, rng, flip))[["left_id", "right_id", "label"]].to_csv(
            folder / f"{name}.csv", index=False)
    big = pairs.sample(25_000, random_state=5)[["left_id", "right_id"]]
    big["label"] = np.where(np.arange(len(big)) % 30 == 0, "match", "non-match")
    big.to_csv(folder / "big.csv", index=False)
    pairs.assign(score=np.clip(pairs["probability"] + rng.normal(0, 0.1, len(pairs)), 0, 1))[
        ["left_id", "right_id", "score"]].to_csv(folder / "matcher.csv", index=False)
    pairs[["left_id", "right_id"]].to_parquet(folder / "score_pairs.parquet", index=False)


def _measure(args: list[str]) -> tuple[float, float]:
    """Wall seconds and peak RSS in MB of one command in a fresh process."""
    timer = Path("/usr/bin/time")
    out = Path(tempfile.mkstemp(suffix=".time")[1])
    cmd = [str(timer), "-f", "%M", "-o", str(out), *args] if timer.exists() else args
    t = time.perf_counter()
    run = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    wall = time.perf_counter() - t
    if run.returncode:
        lines = run.stderr.strip().splitlines() or ["(nothing on stderr)"]
        print(f"failed ({run.returncode}): {' '.join(args[:3])}: {lines[-1]}", flush=True)
        return float("nan"), float("nan")
    peak = (float(out.read_text().split()[-1]) / 1024 if timer.exists() else float("nan"))
    out.unlink()
    return wall, peak


def _commands(p: Path, f: Path, w: Path) -> list[tuple[str, list[str]]]:
    """(name, arguments after 'docket', or a script's)."""
    py = sys.executable
    return [
        ("status", ["status", str(p)]),
        ("next", ["next", str(p), "--reviewer", "ana", "-n", "20"]),
        ("label 25,000 rows", ["label", str(p), "--reviewer", "cy", "--from",
                               str(f / "big.csv")]),
        ("agreement", ["agreement", str(p)]),
        ("adjudication queue", [py, "-c", "import sys; from docket.core import Project; "
                                "print(len(Project.open(sys.argv[1]).adjudication_queue()))",
                                str(p)]),
        ("evaluate", ["evaluate", str(p)]),
        ("evaluate --predictions", ["evaluate", str(p), "--predictions",
                                    str(f / "matcher.csv")]),
        *[(f"export {k}", ["export", str(p), "--what", k, "-o", str(w / f"{k}.csv")])
          for k in ("gold", "training", "scores", "clusters")],
        ("find", [py, "-c", "import sys; from docket.core import Project; "
                  "print(len(Project.open(sys.argv[1]).find('anna berg')))", str(p)]),
        ("score", ["score", str(p), "--pairs", str(f / "score_pairs.parquet"), "-o",
                   str(w / "scored")]),
        ("matchers import", ["matchers", str(p), "import", str(f / "matcher.csv"), "--name",
                             "m1"]),
        ("policy", ["policy", str(p)]),
        ("review: first pair", [py, "-c", FIRST_PAIR, str(p)]),
        ("adjudication screen", [py, "-c", SCREEN, str(p), "adjudicate"]),
        ("quality screen", [py, "-c", SCREEN, str(p), "quality"]),
    ]


def main() -> None:
    docket = str(Path(sys.executable).with_name("docket"))
    results: dict[str, list[tuple[float, float]]] = {}
    with tempfile.TemporaryDirectory() as tmp:
        root = Path(tmp)
        for n in SIZES:
            folder = root / str(n)
            folder.mkdir()
            lp, rp, pp = make_inputs(folder, n_pairs=n)
            base = folder / "base.docket"
            print(f"building {n:,} pairs …", flush=True)
            subprocess.run([sys.executable, "-c", BUILD, str(base), str(lp), str(rp), str(pp)],
                           check=True, capture_output=True)
            _files(base, folder)
            for who in ("ana", "ben"):
                subprocess.run([docket, "label", str(base), "--reviewer", who, "--from",
                                str(folder / f"{who}.csv")], check=True, capture_output=True)
            subprocess.run([docket, "reviewers", str(base), "add", "lee", "--role",
                            "adjudicator"], check=True, capture_output=True)
            work = folder / "work"
            for name, args in _commands(folder / "p.docket", folder, work):
                shutil.rmtree(work, ignore_errors=True)
                work.mkdir()
                for extra in ("", "-wal", "-shm"):
                    Path(f"{folder / 'p.docket'}{extra}").unlink(missing_ok=True)
                shutil.copy(base, folder / "p.docket")
                full = args if args[0] == sys.executable else [docket, *args]
                results.setdefault(name, []).append(_measure(full))  # on a fresh copy
    small, large = SIZES
    print(f"\n{'command':<24} {'time ' + f'{small:,}':>14} {f'{large:,}':>10} {'ratio':>6}"
          f" {'peak MB ' + f'{small:,}':>17} {f'{large:,}':>8} {'ratio':>6}")
    for name, ((ts, ms), (tl, ml)) in results.items():
        print(f"{name:<24} {ts:>12.2f} s {tl:>8.2f} s {tl / ts:>6.2f} {ms:>15,.0f} MB "
              f"{ml:>6,.0f} MB {ml / ms:>6.2f}")


if __name__ == "__main__":
    main()
