"""``docket score`` (every pair scored back with the project's model) and the model file."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from .cli_checks import MOST_WORKERS, at_least, check_engine
from .figures import many


def register(sub: argparse._SubParsersAction) -> None:
    """Add ``docket score`` to the command's sub-parsers."""
    from .cli_base import command
    p = command(
        sub, "score", "Score any number of pairs with a project's current model.",
        "Applies the model as the reviewers' labels and refits have left it to every pair in "
        "--pairs (a CSV or Parquet file, or a folder of Parquet parts of any size) and writes "
        "left_id, right_id, log_odds, probability and predicted as Parquet parts into the "
        "new folder -o. Pairs are read and scored in batches, so memory does not grow with "
        "them. The records come from the project unless --left/--right name the tables (a "
        "sampled project keeps only the records of its sample). --model scores with an "
        "exported model file (docket export PROJECT --what model -o FILE) instead.",
        "docket score vets.docket --pairs all_pairs/ -o scored/ --engine dask --workers 4",
        score)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--pairs", required=True, metavar="PATH",
                   help="pairs: left id, right id (CSV, Parquet, or a folder of parts)")
    p.add_argument("-o", "--output", required=True, metavar="FOLDER",
                   help="new folder for the scored Parquet parts")
    p.add_argument("--model", metavar="FILE", help="an exported model file to score with")
    p.add_argument("--left", metavar="FILE", help="the left (or only) table of records")
    p.add_argument("--right", metavar="FILE", help="the right table of records (link mode)")
    p.add_argument("--engine", choices=["in-process", "dask"], default="in-process",
                   help="where scoring runs (dask needs: pip install 'docket[dask]')")
    p.add_argument("--workers", type=at_least(1, MOST_WORKERS), default=None, metavar="N",
                   help="dask: workers of the local cluster (default 2)")
    p.add_argument("--scheduler", metavar="ADDRESS", help="dask: an existing scheduler")


def score(args: argparse.Namespace) -> int:
    from docket.core import Project, score_to_parts

    from .progress import progress_bar
    check_engine(args)
    if args.workers is not None and args.engine != "dask":  # in process it was ignored, unsaid
        from docket.core import DocketError
        raise DocketError(f"--workers {args.workers}: workers of a local Dask cluster; add "
                          "--engine dask (in process, score runs as one process)")
    with Project.open(args.project, readonly=True) as project:
        job = project.scoring_job(args.pairs, args.model, args.left, args.right)
    model = job.model
    with progress_bar() as update:
        rows = score_to_parts(job, Path(args.pairs), Path(args.output), args.engine,
                              args.workers or 2, args.scheduler,
                              lambda d, t: update("scoring pairs", d, t))
    print(f"scored {many(rows, 'pair')} into {args.output} (ranker {model.ranker}, threshold "
          f"{model.threshold:g})", file=sys.stderr)
    return 0


def export_model(project: Any, target: str) -> None:
    """The project's current model as a small JSON file (``docket export --what model``)."""
    from docket.core import atomic_write
    text = json.dumps(project.model_file())
    if target == "-":
        print(text)
        return
    atomic_write(Path(target), lambda p: p.write_text(text, encoding="utf-8"))
    print(f"wrote the model to {target}", file=sys.stderr)
