"""What cutting similarities into bands costs the model, measured side by side.

docket keeps every field's similarity per pair (continuous, in the project file), but both
models read it cut into ordered bands (nine for long text, four for names), so that the queue,
the refit and a sampled project's counts work per pattern. This bench asks whether the ranking
inside a band carries signal the bands throw away, in two ways:

- ceiling: every pair labelled from the truth, two folds by pair id (each half scored by a model
  fitted on the other half). The same L2 logistic regression (scikit-learn) is fitted on the
  bands alone (the ranker's cumulative coding beside the Fellegi–Sunter log-odds) and on the
  bands plus each field's raw similarity and a missing flag. The gap is the most that reading the
  raw numbers add when every pair is labelled (one slope per field).
- labels: the labels a reviewer gives in queue order (answered from the truth), then docket's
  refit, against a per-pair logistic regression on the same labels, with the raw similarities
  alone and with them beside docket's log-odds; its penalty is chosen by five-fold held-out log
  loss on those labels, as the refit chooses its ranker.

Data: DBLP-ACM (link; link without titles, the hardest of them; titles as one table), the
bundled sample, the sample's generator run with another seed, and two invented scenarios
(bench/invented_tables.py: products to deduplicate, suppliers to link) and eateries to
deduplicate on name and town (bench/invented_eateries.py); nothing was tuned on the last four.
Answers come from the truth files.
Rerun: python bench/banding_loss.py [link authors titles sample other products suppliers
       eateries]
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd
from _common import REPO, data_dir
from invented_eateries import eateries
from invented_tables import products, suppliers
from model_quality import titles_table
from sklearn.linear_model import LogisticRegression
from sklearn.metrics import log_loss
from sklearn.model_selection import StratifiedKFold

from docket.core import NewProject, Project
from docket.core.exports.exporting import scores_frame
from docket.core.matching.logistic import one_hot
from tests.conftest import sample_spec
from tests.quality import answer_in_queue_order, load_truth

PENALTIES = (0.01, 0.1, 1.0, 10.0, 100.0)


def _f1(pred: np.ndarray, y: np.ndarray, n_true: int) -> tuple[float, float, float]:
    tp = int((pred & y).sum())
    p, r = tp / max(1, int(pred.sum())), tp / n_true
    return 2 * p * r / max(1e-12, p + r), p, r


def _features(project: Project) -> tuple[pd.DataFrame, np.ndarray, np.ndarray]:
    """Scores, the banded design (bias column dropped) and the raw similarities with flags."""
    s = scores_frame(project)
    conn = project.connection
    levels = dict(conn.execute("SELECT pattern_id, levels FROM patterns"))
    pat = pd.read_sql_query("SELECT pair_id, pattern_id FROM pairs ORDER BY pair_id", conn)
    patterns = np.array([[int(x) for x in levels[i].split(",")] for i in pat.pattern_id])
    n_levels = [len(json.loads(r[0])) for r in conn.execute(
        "SELECT levels FROM fields ORDER BY position")]
    banded = one_hot(patterns, n_levels, s.log_odds.to_numpy())[:, 1:]
    sims = s[[c for c in s.columns if c.startswith("sim_")]].to_numpy(dtype=float)
    raw = np.hstack([np.nan_to_num(sims), np.isnan(sims).astype(float)])
    return s, banded, raw


def _cross_fit(x: np.ndarray, y: np.ndarray, fold: np.ndarray, c: float) -> np.ndarray:
    out = np.zeros(len(y))
    for k in (0, 1):
        test = fold == k
        model = LogisticRegression(C=c, max_iter=5000).fit(x[~test], y[~test])
        out[test] = model.predict_proba(x[test])[:, 1]
    return out


def _chosen(x: np.ndarray, y: np.ndarray) -> LogisticRegression:
    """The penalty with the lowest five-fold held-out log loss on the labels, then refitted."""
    folds = StratifiedKFold(n_splits=5, shuffle=True, random_state=0)
    best, best_loss = PENALTIES[0], np.inf
    for c in PENALTIES:
        pred = np.zeros(len(y))
        for train, test in folds.split(x, y):
            pred[test] = LogisticRegression(C=c, max_iter=5000).fit(
                x[train], y[train]).predict_proba(x[test])[:, 1]
        loss = log_loss(y, np.clip(pred, 1e-6, 1 - 1e-6))
        if loss < best_loss:
            best, best_loss = c, loss
    return LogisticRegression(C=best, max_iter=5000).fit(x, y)


def _line(name: str, f: tuple[float, float, float], extra: str = "") -> None:
    print(f"  {name:<44} F1 {f[0]:.4f}  P {f[1]:.4f}  R {f[2]:.4f}{extra}", flush=True)


def ceiling(project: Project, truth: set, n_true: int) -> None:
    s, banded, raw = _features(project)
    y = np.array([(a, b) in truth for a, b in zip(s.left_id, s.right_id, strict=True)])
    fold = s.pair_id.to_numpy() % 2
    print(f"  ceiling: {len(y):,} pairs all labelled from the truth, two folds", flush=True)
    for name, x in (("bands", banded), ("bands + raw similarities", np.hstack([banded, raw]))):
        p = _cross_fit(x, y.astype(int), fold, 10.0)
        _line(name, _f1(p >= 0.5, y, n_true),
              f"  log loss {log_loss(y, np.clip(p, 1e-6, 1 - 1e-6)):.4f}")


def with_labels(project: Project, truth: set, n_true: int, n: int) -> None:
    answer_in_queue_order(project, truth, n)
    s, _, raw = _features(project)
    y = np.array([(a, b) in truth for a, b in zip(s.left_id, s.right_id, strict=True)])
    lab = pd.read_sql_query("SELECT pair_id, label FROM current_labels WHERE label != 'hold'",
                            project.connection).drop_duplicates("pair_id")
    at = s.set_index("pair_id").index.get_indexer(lab.pair_id)
    ly = (lab.label == "match").to_numpy().astype(int)
    print(f"  {n} queue-order labels ({ly.sum()} matches)", flush=True)
    _line(f"docket's refit ({project.meta.get('ranker')})",
          _f1(s.predicted.to_numpy() == "match", y, n_true))
    log_odds = s.log_odds.to_numpy()[:, None] / 10  # scaled so the penalty barely touches it
    for name, x in (("raw similarities alone", raw),
                    ("raw similarities + docket's log-odds", np.hstack([raw, log_odds]))):
        model = _chosen(x[at], ly)
        _line(name, _f1(model.predict_proba(x)[:, 1] >= 0.5, y, n_true),
              f"  (C {model.C:g})")


def _run(name: str, spec: NewProject, truth: set, n_true: int, n: int) -> None:
    print(name, flush=True)
    Project.create(spec)
    with Project.open(spec.path) as project:
        ceiling(project, truth, n_true)
        with_labels(project, truth, n_true, n)


def main() -> None:
    folder = data_dir()
    which = set(sys.argv[1:]) or {"link", "authors", "titles", "sample", "other", "products",
                                  "suppliers", "eateries"}
    with tempfile.TemporaryDirectory() as tmp_name:
        tmp = Path(tmp_name)
        if "link" in which:
            truth = load_truth(folder / "matches.csv", "dblp_id", "acm_id")
            _run("DBLP-ACM link", NewProject(path=tmp / "link.docket", left=folder / "dblp.csv",
                                             right=folder / "acm.csv", id_column="id"),
                 truth, len(truth), 200)
        if "authors" in which:
            # the titles left out: names, venue and year only, where name bands matter most
            for side in ("dblp", "acm"):
                pd.read_csv(folder / f"{side}.csv", dtype=str).drop(columns="title").to_csv(
                    tmp / f"{side}_authors.csv", index=False)
            truth = load_truth(folder / "matches.csv", "dblp_id", "acm_id")
            _run("DBLP-ACM link without titles",
                 NewProject(path=tmp / "authors.docket", left=tmp / "dblp_authors.csv",
                            right=tmp / "acm_authors.csv", id_column="id"),
                 truth, len(truth), 200)
        if "titles" in which:
            csv, both_ways = titles_table(folder, tmp)
            _run("DBLP-ACM titles as one table",
                 NewProject(path=tmp / "titles.docket", left=csv, id_column="id"),
                 both_ways, len(both_ways) // 2, 300)
        for key, seed in (("sample", None), ("other", 20261202)):
            if key not in which:
                continue
            where = REPO / "sample"
            if seed is not None:
                where = tmp / f"seed{seed}"
                subprocess.run([sys.executable, str(REPO / "sample" / "make_sample.py"),
                                "--out", str(where), "--seed", str(seed)], check=True,
                           stdout=subprocess.DEVNULL)
            truth = load_truth(where / "truth.csv", "left_id", "right_id")
            spec = sample_spec(tmp / f"{key}.docket")
            spec.left, spec.right = where / "practice_north.csv", where / "practice_south.csv"
            _run("the sample" if seed is None else f"the sample's generator, seed {seed}",
                 spec, truth, len(truth), 200)
        if "products" in which:
            csv, both_ways = products(tmp)
            _run("products to deduplicate (invented)",
                 NewProject(path=tmp / "products.docket", left=csv, id_column="id"),
                 both_ways, len(both_ways) // 2, 200)
        if "eateries" in which:
            csv, both_ways = eateries(tmp)
            _run("eateries to deduplicate on name and town (invented)",
                 NewProject(path=tmp / "eateries.docket", left=csv, id_column="id"),
                 both_ways, len(both_ways) // 2, 200)
        if "suppliers" in which:
            left, right, truth = suppliers(tmp)
            _run("suppliers to link (invented)",
                 NewProject(path=tmp / "suppliers.docket", left=left, right=right,
                            id_column="id"), truth, len(truth), 200)


if __name__ == "__main__":
    main()
