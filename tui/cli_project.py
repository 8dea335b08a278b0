"""The project commands: ``new``, ``status``, ``next`` and ``label``."""

from __future__ import annotations

import argparse
import csv
import shlex
from pathlib import Path

from .built_text import print_built
from .cli_base import command, default_reviewer, open_project, refit_words, refuse_to_discard
from .cli_checks import MOST_LISTED, MOST_WORKERS, at_least, check_engine, share
from .figures import many
from .terminal import json_text


def parse_together(value: str | None, option: str = "--together",
                   give: str = "two or more, comma-separated, or 'none'") -> list[str] | None:
    """``--together a,b,c`` (or ``--compare``) as a list of field names (None: not given); a
    name that holds a comma is quoted as in a CSV row: ``'"street, no",town'``."""
    if value is None:
        return None
    try:
        names = next(csv.reader([value], skipinitialspace=True, strict=True), [])
    except csv.Error:  # a quote never closed
        from docket.core import DocketError
        raise DocketError(f"{option} {value}: a quote is not closed; quote a name that "
                          "holds a comma whole, as '\"street, no\",town'") from None
    names = [name.strip() for name in names if name.strip()]
    if not names:  # '--together "$COLS"' with COLS unset turned the home grouping off, unsaid
        from docket.core import DocketError
        raise DocketError(f"{option} {value!r} names no field; name {give}")
    return names


def new(args: argparse.Namespace) -> int:
    from docket.core import NewProject, Project, parse_kinds, parse_map

    from .progress import progress_bar
    if args.id_column and (args.left_id or args.right_id):
        from docket.core import DocketError
        raise DocketError("give --id, or --left-id and --right-id, not both")
    if args.right_id and not args.right:  # it was ignored, and the id column guessed
        from docket.core import DocketError
        raise DocketError(f"--right-id {args.right_id}: names the id column of --right, and "
                          "no --right table is given; for one table use --id")
    check_engine(args)
    spec = NewProject(
        path=Path(args.project), left=Path(args.left),
        right=Path(args.right) if args.right else None, id_column=args.id_column,
        left_id=args.left_id, right_id=args.right_id, column_map=parse_map(args.map),
        kinds=parse_kinds(args.field), keep_placeholders=args.keep_placeholders,
        together=parse_together(args.together),
        compare=parse_together(args.compare, "--compare", "one or more, comma-separated"),
        pairs_file=Path(args.pairs) if args.pairs else None,
        rules=args.block or [], audit=args.audit, overlap=args.overlap,
        overlap_reviewers=args.overlap_reviewers,
        one_to_one=args.one_to_one, max_pairs=args.max_pairs, threshold=args.threshold,
        seed=args.seed, force=args.force, sample_above=args.sample_above, engine=args.engine,
        workers=args.workers, scheduler=args.scheduler)
    if args.force and not args.discard_decisions and spec.path.is_file():
        refuse_to_discard(str(spec.path), "--force")
    with progress_bar() as update:
        built = Project.create(spec, progress=update)
    print_built(built)
    where = shlex.quote(str(built.path))
    from .folding import echo
    echo(f"next: docket review {where}   (or: docket next {where} --reviewer NAME; "
         f"docket status {where})")
    return 0


def status(args: argparse.Namespace) -> int:
    from .status_text import status_lines
    with open_project(args.project, readonly=True) as project:
        report = project.status()
    if args.json:
        print(json_text(report.to_dict()))
        return 0
    from .folding import echo
    echo("\n".join(status_lines(report)))
    return 0


def next_pairs(args: argparse.Namespace) -> int:
    reviewer = default_reviewer(args.reviewer)
    if not args.claim:  # only looking: works on a read-only project and writes nothing
        with open_project(args.project, readonly=True) as project:
            items = project.next_pairs(reviewer, max(0, args.n))
    else:
        with open_project(args.project) as project:
            reviewer = project.ensure_reviewer(reviewer)
            items = project.next_pairs(reviewer, max(0, args.n), claim=True)
    if args.json:
        print(json_text([i.to_dict() for i in items]))
        return 0
    from .queue_table import queue_lines
    print("\n".join(queue_lines(items)))
    if not items:
        print("(the queue is empty for this reviewer)" if args.n > 0
              else "(-n 0: no pair asked for)")
    return 0


def label(args: argparse.Namespace) -> int:
    reviewer = default_reviewer(args.reviewer)
    from .progress import progress_bar
    with open_project(args.project) as project, progress_bar() as update:
        # registers the reviewer only if it records
        n, result = project.label_from(Path(args.source), reviewer, update)
    if result is None:
        print(f"recorded no decision for {reviewer}: nothing new, so the model stays as it was")
        return 0
    # Audit pairs are not among them: they are fitted on, and judged by a model fitted
    # without them (cross-fitting).
    aside = (f"; {result.set_aside:,} set aside until another reviewer has labelled "
             f"{'it' if result.set_aside == 1 else 'them'}" if result.set_aside else "")
    from .folding import echo
    echo(f"recorded {many(n, 'decision')} for {reviewer}; {refit_words(result)}"
         f"{'' if result.superseded else aside}")
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add new, status, next and label to the command's sub-parsers."""
    p = command(sub, "new", "Create a project from one table (deduplicate) or two (link).",
                 "Reads the records, makes candidate pairs (from --pairs, from --block rules, or "
                 "rules docket chooses from the data), compares them, fits a Fellegi-Sunter model "
                 "and draws the audit slice.\n\nBlocking keys: col, col[:N], tokens(col), "
                 "digits(col), year(col); join keys with & inside a rule; several --block rules "
                 "are OR-ed; near(col) (each record's nearest by TF-IDF similarity), "
                 "lone(col) (the nearest of only the records no uncommon word of col pairs) "
                 "and * (every pair, for small tables) stand alone.\nField kinds: name, text, "
                 "longtext, code, number, date (or skip).",
                 "docket new vets.docket --left north.csv --right south.csv "
                 "--left-id client_id --right-id ref --map owner=owner_name",
                 new)
    p.add_argument("project", help="project file to create")
    p.add_argument("--left", required=True, metavar="FILE",
                   help="records (CSV, TSV, Parquet, JSONL)")
    p.add_argument("--right", metavar="FILE", help="second table: link mode")
    p.add_argument("--id", dest="id_column", metavar="COL", help="id column of both tables")
    p.add_argument("--left-id", metavar="COL", help="id column of the left table")
    p.add_argument("--right-id", metavar="COL", help="id column of the right table")
    p.add_argument("--map", action="append", metavar="L=R",
                   help="compare left column L with right column R (repeatable)")
    p.add_argument("--field", action="append", metavar="COL:KIND",
                   help="set a field's kind instead of the detected one (repeatable)")
    p.add_argument("--compare", metavar="COLS",
                   help="compare only these columns, comma-separated (quoted as --together; "
                        "by default every column the tables share); the rest are shown, not "
                        "compared")
    p.add_argument("--keep-placeholders", action="store_true",
                   help="compare values such as 'N/A', 'unknown', '-' or 'XX1 1XX' as written "
                        "(by default, one that fills 1%% or more of a column is missing)")
    p.add_argument("--together", metavar="COLS",
                   help="fields that say where a record lives, read as one so that one home "
                        "counts once: comma-separated (quote a name that holds a comma: "
                        "'\"street, no\",town'), or 'none' (by default the address, "
                        "town, postcode and phone columns, found by name)")
    p.add_argument("--pairs", metavar="PATH",
                   help="candidate pairs from elsewhere: left id, right id (CSV, Parquet, or "
                        "a folder of Parquet parts of any size, read in batches)")
    p.add_argument("--block", action="append", metavar="RULE", help="a blocking rule (repeatable)")
    p.add_argument("--max-pairs", type=at_least(1), default=5_000_000, metavar="N",
                   help="stop if blocking would make more pairs than this (default 5,000,000)")
    p.add_argument("--audit", type=at_least(1), metavar="N",
                   help="audit slice size (default 5%% of pairs, at most 1,000)")
    p.add_argument("--overlap", type=share, default=0.2, metavar="SHARE",
                   help="share of pairs that two reviewers decide (default 0.2)")
    p.add_argument("--overlap-reviewers", type=at_least(2), default=2, metavar="K",
                   help="how many different reviewers decide each overlap pair (default 2)")
    p.add_argument("--one-to-one", action="store_true",
                   help="link mode: each record matches at most one on the other side")
    p.add_argument("--threshold", type=share, default=0.5, metavar="P",
                   help="match probability at which a pair is predicted a match (default 0.5)")
    p.add_argument("--seed", type=at_least(0), default=0,
                   help="seed for the audit slice (default 0)")
    p.add_argument("--sample-above", type=at_least(100), default=1_000_000, metavar="N",
                   help="with more candidate pairs than this, count every pair's comparison "
                        "pattern but keep a stratified random sample of N pairs (default "
                        "1,000,000)")
    p.add_argument("--engine", choices=["in-process", "dask"], default="in-process",
                   help="where blocking and scoring run (dask needs: pip install "
                        "'docket[dask]')")
    p.add_argument("--workers", type=at_least(1, MOST_WORKERS), default=None, metavar="N",
                   help="processes that compare pairs (default: every core; small builds "
                        "use one); dask: workers of the local cluster (default 2)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="dask: an existing scheduler (for example tcp://10.0.0.5:8786) "
                        "instead of a local cluster")
    p.add_argument("--force", action="store_true", help="replace an existing project file")
    p.add_argument("--discard-decisions", action="store_true",
                   help="with --force: replace it even though the decisions made in it are lost")

    p = command(sub, "status", "Show a project's records, pairs, decisions and model.", "",
                 "docket status vets.docket --json", status)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--json", action="store_true", help="machine-readable output")

    p = command(sub, "next", "List the next pairs a reviewer's queue would show.",
                 "Each pair with its probability and why it is queued: uncertain (near the "
                 "threshold), audit (from the audit slice), overlap (a second reviewer needed), "
                 "or audit, overlap (both)."
                 "\nPairs that other reviewers hold claims on are left out. Without --claim this "
                 "only looks: nothing is written and no one is registered. With --claim the "
                 "pairs are held for this reviewer for 15 minutes, or until decided or others "
                 "are claimed, so that no one else is given them meanwhile.",
                 "docket next vets.docket --reviewer maya -n 5 --claim", next_pairs)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--reviewer", required=True, metavar="NAME", help="whose queue to list")
    p.add_argument("-n", type=at_least(0, MOST_LISTED), default=10, metavar="N",
                   help="how many (default 10)")
    p.add_argument("--claim", action="store_true",
                   help="hold the pairs listed for this reviewer (registers the reviewer)")
    p.add_argument("--json", action="store_true", help="machine-readable output")

    p = command(sub, "label", "Record decisions in bulk from a file, then refit the model.",
                 "The file (CSV or JSONL) has columns left_id,right_id,label[,note] or "
                 "pair_id,label[,note]; label is match, non-match or hold "
                 "(any letter case; non_match, nonmatch and no-match mean non-match). "
                 "Every row is checked "
                 "before anything is written. Rows are written in short batches, so reviewers "
                 "at work on the project meanwhile are not held up; should writing fail part "
                 "way, the rows already written are taken back.",
                 "docket label vets.docket --reviewer maya --from decisions.csv", label)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--reviewer", required=True, metavar="NAME",
                   help="who made the decisions in the file")
    p.add_argument("--from", dest="source", required=True, metavar="FILE",
                   help="the decisions: CSV or JSONL with the columns above")
