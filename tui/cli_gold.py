"""``docket evaluate`` and ``docket export``.

Argument parsing and printing only: the figures and the frames come from the facade
(``Project.evaluate``, ``Project.export_rows``).
"""

from __future__ import annotations

import argparse
import math
import shlex
import sys
from typing import Any

from .cli_base import MASK_HELP, command, open_project
from .cli_checks import at_least, finite, share
from .evaluation_text import evaluation_lines
from .figures import many
from .terminal import json_text


def _shares(text: str) -> list[float]:
    try:
        values = [float(t) for t in text.split(",") if t.strip()]
    except ValueError:
        values = [math.nan]
    if not all(math.isfinite(v) for v in values):  # nan ended in a traceback
        raise argparse.ArgumentTypeError(f"{text!r}: give numbers separated by commas, "
                                         "e.g. 0.5,0.9,0.99")
    return values


def register(sub: argparse._SubParsersAction) -> None:
    """Add evaluate and export to the command's sub-parsers."""
    p = command(
        sub, "evaluate", "Estimate precision, recall and F1 from the audit slice.",
        "Design-based (Horvitz-Thompson) estimates with 95% confidence intervals at a range of "
        "thresholds, from the gold labels of the audit slice only. The naive figure from all "
        "gold labels is shown beside them, marked biased: the queue picks uncertain pairs "
        "first. Recall is within the candidate pairs; matches that blocking never paired are "
        "outside it.\n\nWith --predictions, any matcher's output (left_id, right_id and a "
        "score or a label column) is judged the same way and scored as a machine rater "
        "(Cohen's kappa against the gold labels).",
        "docket evaluate vets.docket --target-precision 0.95", evaluate)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--json", action="store_true", help="machine-readable output")
    p.add_argument("--screen", action="store_true",
                   help="open the quality screen (plots, threshold table, clusters) instead; with "
                        "--matchers, the matchers screen")
    p.add_argument("--mask", action="append", metavar="COL,...",
                   help="with --screen: " + MASK_HELP)
    p.add_argument("--matchers", action="store_true",
                   help="every matcher stored with 'docket matchers' side by side: figures, "
                        "kappa, paired differences, variants, teacher and student")
    p.add_argument("--predictions", metavar="FILE",
                   help="a matcher's output to evaluate (CSV, Parquet, JSONL)")
    p.add_argument("--threshold", type=finite, metavar="T",
                   help="with --predictions: the score at which a pair is a predicted match "
                        "(default: the project's threshold)")
    p.add_argument("--supplement", action="store_true", help="with --predictions: judge it "
                   "from the audit slice and the supplement drawn on its scores together "
                   "('docket supplement')")
    p.add_argument("--thresholds", type=_shares, metavar="T,T,...",
                   help="thresholds for the table (default 0.1 ... 0.9, 0.95, 0.99 and the "
                        "project's)")
    goal = p.add_mutually_exclusive_group()
    goal.add_argument("--target-precision", type=share, metavar="P",
                      help="suggest the lowest threshold whose estimated precision reaches P")
    goal.add_argument("--target-recall", type=share, metavar="R",
                      help="suggest the highest threshold whose estimated recall reaches R")

    p = command(sub, "export", "Write a project's pairs, gold labels or clusters out.",
                 "scores: every candidate pair with per-field similarities, match weight, "
                 "probability and the predicted label at the project's threshold.\n"
                 "gold: the gold labels and how each was reached (every reviewer's label and "
                 "note; the adjudicator, reason and time), audit flag and inclusion "
                 "probability.\ntraining: gold plus both records and the "
                 "similarities, with a train/test split that keeps each record on one side.\n"
                 "--for-lm (scores, gold, training): each pair as a prompt for a language "
                 "model, JSON lines, from docket's template or yours (--lm-template).\n"
                 "clusters: record id -> cluster id from gold matches; "
                 "conflicts: clusters that hold a gold non-match; missed: true matches that "
                 "are not candidates (docket missed).\nmodel: the current model as a small JSON "
                 "file that 'docket score --model' and a cluster's scoring function read.",
                 "docket export vets.docket --what training -o training.parquet", export)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--what", choices=["scores", "gold", "training", "clusters", "conflicts",
                                      "missed", "model"], default="scores",
                   help="what to write (default scores; see above)")
    p.add_argument("-o", "--output", required=True, metavar="FILE|-",
                   help="file (.csv, .parquet, .jsonl) or - for standard output")
    p.add_argument("--format", choices=["csv", "parquet", "jsonl"],
                   help="default: from the file's extension; csv for -")
    p.add_argument("--test-share", type=share, default=0.2, metavar="SHARE",
                   help="training: share in the test split (default 0.2)")
    p.add_argument("--seed", type=at_least(0), default=0,
                   help="training: seed of the split (default 0)")
    p.add_argument("--split-by", choices=["record", "pair"], default="record",
                   help="training: keep each record on one side (record, default) or split "
                        "pairs independently, each keeping its side as labels arrive (pair)")
    p.add_argument("--for-lm", action="store_true",
                   help="scores, gold or training: each pair as a prompt for a language "
                        "model, JSON lines")
    p.add_argument("--lm-template", metavar="FILE",
                   help="with --for-lm: the prompt's text, with $first, $second (the two "
                        "records) and $fields (their field names); $$ is a dollar sign")
    p.add_argument("--all-records", action="store_true",
                   help="clusters: every record, singletons too")
    p.add_argument("--no-formula-guard", dest="formula_guard", action="store_false",
                   help="CSV: write cells beginning with = + - @ tab or CR as they are (by "
                        "default they get a leading ' so a spreadsheet cannot run them)")


def evaluate(args: argparse.Namespace) -> int:
    from docket.core import Project
    if args.screen:
        from pathlib import Path

        from .masking import expand_mask, parse_mask
        from .team_app import run_matchers, run_quality
        mask = parse_mask(args.mask)
        with Project.open(args.project, readonly=True) as project:  # bad path or mask: one line
            expand_mask(project, mask)
        (run_matchers if args.matchers else run_quality)(Path(args.project), mask)
        return 0
    if args.matchers:
        from .matchers_report import evaluate_matchers
        return evaluate_matchers(args)
    from .progress import working
    with working("evaluating"), Project.open(args.project, readonly=True) as project:
        if args.predictions:
            report = project.evaluate_predictions(args.predictions, args.threshold,
                                                  args.thresholds, args.target_precision,
                                                  args.target_recall, supplement=args.supplement)
        else:
            if args.threshold is not None or args.supplement:
                from docket.core import DocketError
                raise DocketError("--threshold and --supplement go with --predictions; the "
                                  "project's own threshold is set at 'docket new'")
            report = project.evaluate(args.thresholds, args.target_precision,
                                      args.target_recall)
        name = project.meta.get("name") or project.path.stem
    if args.json:
        print(json_text(report.to_dict()))
        return 0
    from .folding import echo, width
    echo("\n".join(evaluation_lines(report, name, width())))
    return 0


def export(args: argparse.Namespace) -> int:
    from docket.core import output_format, refuse_folder
    kind = "json" if args.what == "model" else "jsonl" if args.for_lm else args.format or "csv"
    refuse_folder(args.output, f"{args.what}.{kind}")
    if args.what == "model":
        from pathlib import Path

        from docket.core import DocketError
        if args.format:
            raise DocketError(f"--format {args.format}: the model is always a JSON file; "
                              "leave --format out")
        if Path(args.output).suffix.lower() in (".csv", ".tsv", ".parquet", ".jsonl"):
            # 'model.csv' was written as JSON, unsaid, for a table reader to choke on
            raise DocketError(f"-o {args.output}: the model is a JSON file, not a table; "
                              f"name it {Path(args.output).with_suffix('.json')}")
        from .cli_scale import export_model
        with open_project(args.project, readonly=True) as project:
            project.refuse_over_sources(args.output)
            export_model(project, args.output)
        return 0
    if not (args.for_lm and args.output == "-"):
        output_format(args.output, args.format)  # a bad target fails before any work
    if args.what != "scores" or args.for_lm or args.lm_template:
        from docket.core import write_rows

        from .progress import working
        with working(f"exporting {args.what}", args.output != "-"), \
                open_project(args.project, readonly=True) as project:
            project.refuse_over_sources(args.output)
            result = export_other(project, args.what, args)
            # inside: --for-lm records are made from the open project as they are written
            n = write_rows(result, args.output, args.format,
                           guard=getattr(args, "formula_guard", True))
        none = {"conflicts": ": no conflicts, no gold non-match falls inside a cluster",
                # the export is the only mention of missed matches a reader of the
                # README meets; an empty file said nothing of how one is recorded
                "missed": ": no missed match recorded (docket missed "
                          f"{shlex.quote(args.project)} add "
                          "LEFT RIGHT records a true match that no candidate pair holds)"
                }.get(args.what, "")
        said_written(n, args.output, none)
        if args.what == "training" and "split" in getattr(result, "columns", ()):
            note = empty_side(list(result["split"]), args.test_share, args.split_by)
            if note:
                print(f"note: {note}", file=sys.stderr)
        return 0
    from docket.core import write_scores

    from .progress import working
    # '-': the rows are the output
    with working("exporting the scores", args.output != "-"), \
            open_project(args.project, readonly=True) as project:
        project.refuse_over_sources(args.output)
        n = write_scores(project, args.output, args.format,
                         guard=getattr(args, "formula_guard", True))
    if args.output != "-":
        print(f"wrote {many(n, 'pair')} to {args.output}", file=sys.stderr)
    return 0


# -- exports ------------------------------------------------------------------------------------
def empty_side(sides: list[str], test_share: float, split_by: str) -> str | None:
    """Why a training export has nothing on one side, asked for or not: one group of records
    joined by gold pairs goes whole to one side, so 80 pairs of one hub record all went to
    test and the file had no training row, unsaid."""
    n_test = sides.count("test")
    empty = "test" if not n_test and test_share > 0 else \
        "train" if n_test == len(sides) else None
    if not sides or empty is None:
        return None
    counts = f"train {len(sides) - n_test:,}, test {n_test:,}"
    if split_by == "pair":
        return (f"the {empty} side is empty ({counts}): each pair's side is drawn from its id, "
                f"and with {many(len(sides), 'gold pair')} none came out {empty}")
    return (f"the {empty} side is empty ({counts}): gold pairs that share a record go to one "
            "side together, and too few groups of records are joined by gold pairs to fill "
            "both; --split-by pair splits the pairs themselves (a record may then sit on both "
            "sides)")


def export_other(project: Any, what: str, args: argparse.Namespace) -> Any:
    """The frame (or, with --for-lm, the records to be made) that ``docket export --what``
    writes. ``args`` may carry ``test_share``, ``seed``, ``split_by``, ``for_lm``,
    ``lm_template`` and ``all_records``."""
    share = getattr(args, "test_share", None)
    return project.export_rows(
        what, test_share=0.2 if share is None else float(share),
        seed=int(getattr(args, "seed", 0) or 0),
        split_by=getattr(args, "split_by", None) or "record",
        all_records=bool(getattr(args, "all_records", False)),
        for_lm=bool(getattr(args, "for_lm", False)),
        lm_template=getattr(args, "lm_template", None))


def write_export(result: Any, target: str, fmt: str | None, guard: bool = True,
                 none: str = "") -> int:
    """Write what ``export_other`` returned; returns the number of rows written. ``none``
    ends the line said when there are no rows (what their absence means)."""
    from docket.core import write_rows
    n = write_rows(result, target, fmt, guard)
    said_written(n, target, none)
    return n


def said_written(n: int, target: str, none: str = "") -> None:
    if target != "-":
        print(f"wrote {many(n, 'row')} to {target}{none if not n else ''}", file=sys.stderr)
