"""Are evaluate's figures honest beyond DBLP-ACM? Bias and interval coverage on every invented
scenario the benches generate, before and after a refit, by simulation.

For each scenario and seed the scenario's tables are made from the seed (the generators of
bench/invented_people.py, bench/invented_tables.py and sample/make_sample.py), a project is
built with that seed (its audit slice drawn from it), the slice is labelled from the truth as a
setting says, and ``evaluate`` estimates precision, recall and F1 at thresholds 0.2, 0.5 (the
default) and 0.8. The truth is the model's own figure over all candidate pairs: the label-free
model before the refit, the refit model (fitted on every label) after it; bias is the mean of
estimate - truth over the seeds, coverage the share of runs whose 95 % interval (with held or
unsettled pairs: the bounds printed in its place) holds the truth. Settings:

- ``slice`` (the default size, 5 % of the candidates, at most 1,000), ``200`` and ``50``:
  every drawn pair labelled;
- ``part``: the default slice, only its first 40 % in the order the queue serves it;
- ``two``: the default slice labelled by two reviewers, one always right, the other wrong on
  a quarter of the pairs the label-free model finds hard (scores 0.1-0.9, or gets wrong at
  0.5) and 2 % of the rest; disagreements are left for an adjudicator.

No timing is asserted; the figures are printed per scenario and pooled over the scenarios.

    python bench/estimate_bias.py [seeds, default 12] [scenario ...] [--settings a,b]
"""

from __future__ import annotations

import shutil
import sys
import tempfile
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd
from _common import REPO, data_dir
from invented_people import people, registers
from invented_tables import products, suppliers

from docket.core import NewProject, Project
from docket.core.quality.evaluate import evaluate
from tests.quality import load_truth

THRESHOLDS = (0.2, 0.5, 0.8)
MEASURES = ("precision", "recall", "f1")
SETTINGS = ("slice", "200", "50", "part", "two")
PART = 0.4
SLIP_HARD, SLIP_EASY = 0.25, 0.02


def _sample(folder: Path, seed: int) -> tuple[dict, set]:
    from sample.make_sample import SEED, build, write
    s = build(SEED + seed)
    write(s, folder)
    return ({"left": folder / "practice_north.csv", "right": folder / "practice_south.csv",
             "left_id": "client_id", "right_id": "ref",
             "column_map": {"owner": "owner_name", "born": "date_of_birth"}},
            {tuple(t) for t in s.truth})


def _invented(make: Callable, base: int) -> Callable[[Path, int], tuple[dict, set]]:
    def made(folder: Path, seed: int) -> tuple[dict, set]:
        *tables, truth = make(folder, seed=base + seed)
        return ({"left": tables[0], "right": tables[1] if len(tables) > 1 else None,
                 "id_column": "id"}, truth)
    return made


def _dblp(folder: Path, seed: int) -> tuple[dict, set]:
    where = data_dir()
    return ({"left": where / "dblp.csv", "right": where / "acm.csv", "id_column": "id"},
            load_truth(where / "matches.csv", "dblp_id", "acm_id"))


# each makes its tables in a folder from a seed: (NewProject's arguments, true pairs)
SCENARIOS: dict[str, Callable[[Path, int], tuple[dict, set]]] = {
    "people": _invented(people, 23), "registers": _invented(registers, 29),
    "suppliers": _invented(suppliers, 11), "products": _invented(products, 7),
    "sample": _sample, "dblp-acm": _dblp}


def _pairs(project: Project, truth: set) -> pd.DataFrame:
    """Every candidate pair: its model probability (not the cross-fitted one), audit order,
    stratum and whether it is a true match."""
    f = pd.read_sql_query(
        "SELECT p.pair_id, p.left_id, p.right_id, p.audit, t.probability FROM pairs p "
        "JOIN patterns t ON t.pattern_id = p.pattern_id ORDER BY p.pair_id", project.connection)
    f["y"] = [(a, b) in truth for a, b in zip(f.left_id, f.right_id, strict=True)]
    return f


def _truth(f: pd.DataFrame, t: float) -> dict[str, float]:
    pred, y = (f.probability >= t).to_numpy(), f.y.to_numpy()
    tp, fp, fn = (pred & y).sum(), (pred & ~y).sum(), (~pred & y).sum()
    return {"precision": tp / (tp + fp) if tp + fp else np.nan,
            "recall": tp / (tp + fn) if tp + fn else np.nan,
            "f1": 2 * tp / (2 * tp + fp + fn) if tp + fp + fn else np.nan}


def _audit_order(project: Project) -> list[int]:
    """The audit pairs in the order a reviewer's queue serves them."""
    rows = project.connection.execute(
        "SELECT pair_id FROM pairs WHERE audit = 1 ORDER BY audit_order").fetchall()
    return [int(r[0]) for r in rows]


def _label(project: Project, setting: str, f: pd.DataFrame, seed: int) -> None:
    y = dict(zip(f.pair_id, f.y, strict=True))
    name = {True: "match", False: "non-match"}
    order = _audit_order(project)
    if setting == "part":
        order = order[:round(PART * len(order))]
    for pid in order:
        project.decide(pid, "ann", name[y[pid]])
    if setting != "two":
        return
    rng = np.random.default_rng(seed)
    p = dict(zip(f.pair_id, f.probability, strict=True))
    for pid in order:
        hard = 0.1 <= p[pid] <= 0.9 or (p[pid] >= 0.5) != y[pid]
        wrong = rng.random() < (SLIP_HARD if hard else SLIP_EASY)
        project.decide(pid, "bo", name[y[pid] != wrong])


def _read(report: dict, f: pd.DataFrame) -> dict[tuple[float, str], tuple]:
    """(estimate - truth, side, width) per threshold and figure (side 0: the interval holds the
    truth, 1: the truth lies above it, -1: below it); None where undefined."""
    out = {}
    for row in report["estimates"]:
        t = row["threshold"]
        if round(t, 6) not in THRESHOLDS:
            continue
        true = _truth(f, t)
        for m in MEASURES:
            iv, b = row[m], row.get(f"{m}_bounds")
            low, high = (b["low"], b["high"]) if b else (iv["low"], iv["high"])
            if iv["value"] is None or low is None or np.isnan(true[m]):
                out[(t, m)] = None
                continue
            side = 1 if true[m] > high + 1e-12 else -1 if true[m] < low - 1e-12 else 0
            out[(t, m)] = (iv["value"] - true[m], side, high - low)
    return out


def one_run(scenario: str, seed: int, settings: list[str], tmp: Path) -> dict:
    """{(setting, stage): figures} for one scenario's tables and project made from ``seed``."""
    folder = tmp / f"{scenario}{seed}"
    folder.mkdir()
    spec, truth = SCENARIOS[scenario](folder, seed)
    builds = {}
    for setting in settings:
        size = int(setting) if setting.isdigit() else None
        if size not in builds:
            path = folder / f"built{size}.docket"
            Project.create(NewProject(path=path, seed=seed, audit=size, **spec))
            builds[size] = path
    out = {}
    for setting in settings:
        size = int(setting) if setting.isdigit() else None
        path = folder / f"{setting}.docket"
        shutil.copy(builds[size], path)
        with Project.open(path) as project:
            f = _pairs(project, truth)
            _label(project, setting, f, seed)
            out[(setting, "before")] = _read(evaluate(project), f)
            project.refit()
            out[(setting, "after")] = _read(evaluate(project), _pairs(project, truth))
        path.unlink()
    shutil.rmtree(folder)
    return out


def _summary(runs: list[dict], key: tuple, t: float, m: str) -> str:
    got = [r[key][(t, m)] for r in runs if r.get(key, {}).get((t, m)) is not None]
    if not got:
        return f"{m} —"
    bias = np.mean([g[0] for g in got])
    cover = np.mean([g[1] == 0 for g in got])
    above, below = sum(g[1] == 1 for g in got), sum(g[1] == -1 for g in got)
    width = np.median([g[2] for g in got])
    out = f"{above} above, " if above else ""
    out += f"{below} below, " if below else ""
    return f"{m} {bias:+.4f} {cover:4.0%} ({out}{width:.3f})" + (
        f" n{len(got)}" if len(got) < len(runs) else "")


def report(title: str, runs: list[dict], settings: list[str]) -> None:
    print(f"\n{title}: {len(runs)} seeds; bias, coverage (runs whose truth lay above or below the "
          "interval, median width) per figure")
    for setting in settings:
        for stage in ("before", "after"):
            for t in THRESHOLDS:
                line = "  ".join(_summary(runs, (setting, stage), t, m) for m in MEASURES)
                print(f"  {setting:<6}{stage:<7}at {t:<4} {line}", flush=True)


def main() -> None:
    args = [a for a in sys.argv[1:] if not a.startswith("--settings")]
    chosen = next((a.split("=", 1)[1] for a in sys.argv[1:] if a.startswith("--settings=")),
                  ",".join(SETTINGS)).split(",")
    seeds = int(args[0]) if args and args[0].isdigit() else 12
    names = [a for a in args if not a.isdigit()] or [s for s in SCENARIOS if s != "dblp-acm"]
    every: list[dict] = []
    with tempfile.TemporaryDirectory() as tmp:
        for name in names:
            runs = []
            for seed in range(seeds):
                runs.append(one_run(name, seed, chosen, Path(tmp)))
                print(f"{name} seed {seed} done", file=sys.stderr, flush=True)
            report(name, runs, chosen)
            every += runs
    if len(names) > 1:
        report("pooled over " + ", ".join(names), every, chosen)


if __name__ == "__main__":
    sys.path.insert(0, str(REPO))
    main()
