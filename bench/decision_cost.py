"""One decision's cost at 0, 25,000 and 100,000 earlier decisions by the same reviewer.

Beside it, the next-pair query with a claim (what the review screen runs for every pair it
serves) at the same history sizes.

A synthetic 120,000-pair project is built in a temporary folder; the reviewer's history is
written straight into the log (as a long session would have left it), then the same
``Project.decide`` call is timed on fresh pairs at each history size. Target: p50 ≤ 2 ms at
every size, so the ratio of the largest to the smallest should stay near 1.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
import uuid
from datetime import UTC, datetime, timedelta
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import REPO  # noqa: F401  (puts the repository on sys.path)

N_RECORDS = 60_000
N_PAIRS = 120_000
SIZES = (0, 25_000, 100_000)
TIMED = 300
REVIEWER = "bench"


def make_project(folder: Path, n_records: int = N_RECORDS, n_pairs: int = N_PAIRS,
                 seed: int = 0) -> Path:
    """A link project over synthetic records with exactly ``n_pairs`` given pairs."""
    from docket.core import NewProject, Project

    rng = np.random.default_rng(seed)
    names = np.array([f"{a} {b}" for a in ("anna", "jon", "kari", "per", "liv", "ole")
                      for b in ("berg", "dahl", "lund", "moe", "vik", "strand", "holm")])

    def table(prefix: str) -> pd.DataFrame:
        return pd.DataFrame({"id": [f"{prefix}{i}" for i in range(n_records)],
                             "name": rng.choice(names, n_records),
                             "town": rng.choice([f"town{i}" for i in range(200)], n_records)})
    left, right = table("L"), table("R")
    lp, rp, pp = folder / "left.csv", folder / "right.csv", folder / "pairs.csv"
    left.to_csv(lp, index=False)
    right.to_csv(rp, index=False)
    li = rng.integers(0, n_records, n_pairs * 2)
    ri = rng.integers(0, n_records, n_pairs * 2)
    pairs = pd.DataFrame({"left_id": left.id.to_numpy()[li], "right_id": right.id.to_numpy()[ri]})
    pairs.drop_duplicates().head(n_pairs).to_csv(pp, index=False)
    path = folder / "cost.docket"
    Project.create(NewProject(path=path, left=lp, right=rp, id_column="id", pairs_file=pp))
    return path


def add_history(project: object, pair_ids: list[int], reviewer: str = REVIEWER) -> None:
    """Write standing labels for ``pair_ids`` straight into the log, dated in the past."""
    start = datetime.now(UTC) - timedelta(days=30)
    taken = {pid for (pid,) in project.connection.execute(  # type: ignore[attr-defined]
        "SELECT pair_id FROM current WHERE reviewer = ?", (reviewer,))}
    pair_ids = [pid for pid in pair_ids if pid not in taken]  # served during an earlier round
    rows = [(str(uuid.uuid4()), pid, reviewer, "reviewer", "non-match", "",
             (start + timedelta(microseconds=i)).isoformat(timespec="microseconds"))
            for i, pid in enumerate(pair_ids)]
    with project.transaction() as conn:  # type: ignore[attr-defined]
        conn.executemany("INSERT INTO decisions (decision_id, pair_id, reviewer, role, label, "
                         "note, decided_at) VALUES (?, ?, ?, ?, ?, ?, ?)", rows)
        conn.executemany("INSERT INTO current VALUES (?, ?, ?, ?, ?, ?)",
                         [(r[1], r[2], r[3], r[0], r[4], r[6]) for r in rows])
        conn.execute("INSERT OR IGNORE INTO reviewers (name, role, added_at) VALUES (?, ?, ?)",
                     (reviewer, "reviewer", rows[0][6] if rows else ""))
        conn.execute("UPDATE reviewers SET standing = standing + ? WHERE name = ?",
                     (len(rows), reviewer))
        conn.executemany("UPDATE pairs SET n_labels = n_labels + 1, open = (n_labels + 1 < need) "
                         "WHERE pair_id = ?", [(p,) for p in pair_ids])


def time_decisions(project: object, pair_ids: list[int]) -> list[float]:
    out = []
    for pid in pair_ids:
        t = time.perf_counter()
        project.decide(pid, REVIEWER, "match", seconds=1.0)  # type: ignore[attr-defined]
        out.append(time.perf_counter() - t)
    return out


def time_serving(project: object, n: int = TIMED // 3) -> list[float]:
    """Serve with a claim, then decide (untimed), as the review screen does."""
    out = []
    for _ in range(n):
        t = time.perf_counter()
        item = project.next_pairs(REVIEWER, 1, claim=True)[0]  # type: ignore[attr-defined]
        out.append(time.perf_counter() - t)
        project.decide(item.pair_id, REVIEWER, "non-match")  # type: ignore[attr-defined]
    return out


def main() -> None:
    from docket.core import Project

    with tempfile.TemporaryDirectory() as tmp:
        print(f"building a {N_PAIRS:,}-pair project …", flush=True)
        path = make_project(Path(tmp))
        with Project.open(path) as project:
            ids = [r[0] for r in project.connection.execute(
                "SELECT pair_id FROM pairs ORDER BY pair_id")]
            history, spare = ids[:max(SIZES)], ids[max(SIZES):]
            results = {}
            have = 0
            for k, size in enumerate(SIZES):
                add_history(project, history[have:size])
                have = size
                timed = spare[k * TIMED:(k + 1) * TIMED]
                q = sorted(time_decisions(project, timed))
                served = sorted(time_serving(project))
                results[size] = (statistics.median(q), q[int(0.99 * len(q))],
                                 statistics.median(served))
        base = results[SIZES[0]][0]
        serve_base = results[SIZES[0]][2]
        for size, (p50, p99, serve) in results.items():
            print(f"one decision after {size:>7,} earlier decisions: p50 {p50 * 1e3:6.3f} ms, "
                  f"p99 {p99 * 1e3:6.3f} ms; p50 / target 2 ms = {p50 / 2e-3:.2f}; "
                  f"p50 / p50 at 0 = {p50 / base:.2f}")
            print(f"  next pair with a claim: p50 {serve * 1e3:6.3f} ms; "
                  f"/ p50 at 0 = {serve / serve_base:.2f}")


if __name__ == "__main__":
    main()
