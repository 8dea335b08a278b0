"""Model quality on outside data and on the sample: F1 without labels and after queue-order
labels, and blocking reach for free text.

Targets: DBLP-ACM link with no labels (no --one-to-one) F1 ≥ 0.90; after 200 queue-order
labels ≥ 0.98; DBLP-ACM titles as one table: reach ≥ 0.995 in ≤ 50,000 candidates and F1 ≥ 0.80
after 300 labels; the sample F1 ≥ 0.98 after 200 labels. Answers come from the truth files.
Invented scenarios nothing was tuned on (bench/invented_tables.py: products, suppliers;
bench/invented_people.py: people to deduplicate, two registers of people to link;
bench/invented_eateries.py: two town guides' eateries to deduplicate on name and town) are printed
beside them, with no target.
Rerun: python bench/model_quality.py [link titles sample products suppliers people registers
       eateries]
"""

from __future__ import annotations

import sys
import tempfile
from collections.abc import Callable
from pathlib import Path

import pandas as pd
from _common import REPO, data_dir
from invented_eateries import eateries
from invented_people import people, registers
from invented_tables import products, suppliers

from docket.core import NewProject, Project
from tests.conftest import sample_spec
from tests.quality import answer_in_queue_order, load_truth, measure


def _line(name: str, m: dict[str, float]) -> None:
    print(f"{name:<34} F1 {m['f1']:.4f}  P {m['precision']:.4f}  R {m['recall']:.4f}  "
          f"reach {m['blocking_recall']:.4f}  pairs {m['pairs']:,}", flush=True)


def titles_table(folder: Path, tmp: Path) -> tuple[Path, set[tuple[str, str]]]:
    """Both files as one table of titles; ids carry their source, truth from matches.csv."""
    dblp = pd.read_csv(folder / "dblp.csv", dtype=str)
    acm = pd.read_csv(folder / "acm.csv", dtype=str)
    table = pd.concat([pd.DataFrame({"id": "dblp:" + dblp["id"], "title": dblp["title"]}),
                       pd.DataFrame({"id": "acm:" + acm["id"], "title": acm["title"]})])
    path = tmp / "titles.csv"
    table.to_csv(path, index=False)
    pairs = load_truth(folder / "matches.csv", "dblp_id", "acm_id")
    truth = set()
    for d, a in pairs:
        x, y = "dblp:" + d, "acm:" + a
        truth.add((x, y))
        truth.add((y, x))  # a one-table pair may be stored either way round
    return path, truth


def dedupe_measure(project: Project, truth: set) -> dict[str, float]:
    m = measure(project, truth)
    # measure() divides recall by the size of the truth set, which holds each pair twice here.
    half = len(truth) / 2
    s = m["recall"] * len(truth) / half
    m["recall"] = s
    m["blocking_recall"] = m["blocking_recall"] * len(truth) / half
    p = m["precision"]
    m["f1"] = 2 * p * s / max(1e-12, p + s)
    return m


def _run(name: str, spec: NewProject, truth: set, n: int) -> None:
    """Build, measure with no labels, answer ``n`` pairs in queue order, measure again."""
    # a one-table truth holds each pair both ways round; dedupe_measure counts it once
    how = dedupe_measure if spec.right is None else measure
    Project.create(spec)
    with Project.open(spec.path) as project:
        _line(f"{name}, no labels", how(project, truth))
        answer_in_queue_order(project, truth, n)
        _line(f"{name}, {n} labels", how(project, truth))


# each makes its tables (one: deduplicate, two: link) and the true pairs in a folder
INVENTED: dict[str, Callable[[Path], tuple]] = {
    "products": products, "suppliers": suppliers, "people": people, "registers": registers,
    "eateries": eateries}


def main() -> None:
    folder = data_dir()
    which = set(sys.argv[1:]) or {"link", "titles", "sample", *INVENTED}
    with tempfile.TemporaryDirectory() as tmp_name:
        tmp = Path(tmp_name)
        if "link" in which:
            _run("DBLP-ACM link", NewProject(path=tmp / "dblp.docket", left=folder / "dblp.csv",
                                             right=folder / "acm.csv", id_column="id"),
                 load_truth(folder / "matches.csv", "dblp_id", "acm_id"), 200)
        if "titles" in which:
            csv, ttruth = titles_table(folder, tmp)
            _run("DBLP-ACM titles", NewProject(path=tmp / "titles.docket", left=csv,
                                               id_column="id"), ttruth, 300)
        if "sample" in which:
            _run("sample", sample_spec(tmp / "sample.docket"),
                 load_truth(REPO / "sample" / "truth.csv", "left_id", "right_id"), 200)
        for key, make in INVENTED.items():
            if key in which:
                *tables, truth = make(tmp)
                _run(f"{key} (invented)", NewProject(
                    path=tmp / f"{key}.docket", left=tables[0],
                    right=tables[1] if len(tables) > 1 else None, id_column="id"), truth, 200)


if __name__ == "__main__":
    main()
