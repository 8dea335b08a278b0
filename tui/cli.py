"""The ``docket`` command: argument parsing only; every command calls the core facade."""

from __future__ import annotations

import argparse
import os
import sys
import warnings
from collections.abc import Callable

from . import commands
from .cli_checks import Parser, at_least, parse, share
from .terminal import safe_streams, shown


class _Formatter(argparse.RawDescriptionHelpFormatter):
    def __init__(self, prog: str) -> None:
        super().__init__(prog, max_help_position=32, width=100)


def _command(sub: argparse._SubParsersAction, name: str, summary: str, description: str,
             example: str, func: Callable[[argparse.Namespace], int]) -> argparse.ArgumentParser:
    p = sub.add_parser(name, help=summary, description=f"{summary}\n\n{description}".strip(),
                       epilog=f"example:\n  {example}", formatter_class=_Formatter)
    p.set_defaults(func=func)
    return p


def build_parser() -> argparse.ArgumentParser:
    parser = Parser(
        prog="docket", formatter_class=_Formatter,
        description="Review candidate record pairs, measure agreement and export gold labels.",
        epilog="Start with:  docket demo")
    parser.add_argument("--version", action="version", version=f"docket {commands.version()}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = _command(sub, "new", "Create a project from one table (deduplicate) or two (link).",
                 "Reads the records, makes candidate pairs (from --pairs, from --block rules, or "
                 "rules docket chooses from the data), compares them, fits a Fellegi-Sunter model "
                 "and draws the audit slice.\n\nBlocking keys: col, col[:N], tokens(col), "
                 "digits(col), year(col); join keys with & inside a rule; several --block rules "
                 "are OR-ed.\nField kinds: name, text, longtext, code, number, date (or skip).",
                 "docket new vets.docket --left north.csv --right south.csv "
                 "--left-id client_id --right-id ref --map owner=owner_name",
                 commands.new)
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
    p.add_argument("--pairs", metavar="FILE",
                   help="candidate pairs from elsewhere: left id, right id")
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
    p.add_argument("--seed", type=int, default=0, help="seed for the audit slice (default 0)")
    p.add_argument("--force", action="store_true", help="replace an existing project file")

    p = _command(sub, "status", "Show a project's records, pairs, decisions and model.", "",
                 "docket status vets.docket --json", commands.status)
    p.add_argument("project")
    p.add_argument("--json", action="store_true", help="machine-readable output")

    p = _command(sub, "next", "List the next pairs a reviewer's queue would show.",
                 "Each pair with its probability and why it is queued: uncertain (near the "
                 "threshold), audit (from the audit slice) or overlap (a second reviewer needed).",
                 "docket next vets.docket --reviewer maya -n 5", commands.next_pairs)
    p.add_argument("project")
    p.add_argument("--reviewer", required=True, metavar="NAME")
    p.add_argument("-n", type=at_least(0), default=10, metavar="N", help="how many (default 10)")
    p.add_argument("--json", action="store_true", help="machine-readable output")

    p = _command(sub, "label", "Record decisions in bulk from a file, then refit the model.",
                 "The file (CSV or JSONL) has columns left_id,right_id,label[,note] or "
                 "pair_id,label[,note]; label is match, non-match or hold. Every row is checked "
                 "before anything is written.",
                 "docket label vets.docket --reviewer maya --from decisions.csv", commands.label)
    p.add_argument("project")
    p.add_argument("--reviewer", required=True, metavar="NAME")
    p.add_argument("--from", dest="source", required=True, metavar="FILE")

    p = _command(sub, "export", "Write a project's pairs, gold labels or clusters out.",
                 "scores: every candidate pair with per-field similarities, match weight, "
                 "probability and the predicted label at the project's threshold.\n"
                 "gold: the gold labels, how each was decided, reviewers, audit flag and "
                 "inclusion probability.\ntraining: gold plus both records and the "
                 "similarities, with a stable train/test split (--for-lm: text for a language "
                 "model, JSON lines).\nclusters: record id -> cluster id from gold matches; "
                 "conflicts: clusters that hold a gold non-match; missed: true matches that "
                 "are not candidates (docket missed).",
                 "docket export vets.docket --what training -o training.parquet", commands.export)
    p.add_argument("project")
    p.add_argument("--what", choices=["scores", "gold", "training", "clusters", "conflicts",
                                      "missed"], default="scores")
    p.add_argument("-o", "--output", required=True, metavar="FILE|-",
                   help="file (.csv, .parquet, .jsonl) or - for standard output")
    p.add_argument("--format", choices=["csv", "parquet", "jsonl"])
    p.add_argument("--test-share", type=share, default=0.2, metavar="SHARE",
                   help="training: share in the test split (default 0.2)")
    p.add_argument("--seed", type=int, default=0, help="training: seed of the split (default 0)")
    p.add_argument("--for-lm", action="store_true",
                   help="gold or training: pairs as text, JSON lines, for a language model")
    p.add_argument("--all-records", action="store_true",
                   help="clusters: every record, singletons too")
    p.add_argument("--no-formula-guard", dest="formula_guard", action="store_false",
                   help="CSV: write cells beginning with = + - @ tab or CR as they are (by "
                        "default they get a leading ' so a spreadsheet cannot run them)")

    p = _command(sub, "review", "Open the review screen on a reviewer's queue.",
                 "Keys: s match, d non-match, h hold, z undo, e note, [ ] history, / find, "
                 "? help, q quit. Every decision is saved as it is made.",
                 "docket review vets.docket --reviewer maya --mask email,phone", commands.review)
    p.add_argument("project")
    p.add_argument("--reviewer", metavar="NAME",
                   help="defaults to $DOCKET_REVIEWER, then your user name")
    p.add_argument("--mask", metavar="COL,...", help="show these columns partly masked")

    p = _command(sub, "demo", "Build the demo project from the bundled invented sample.",
                 "Two invented veterinary practices merging their client registers. The project "
                 "is built once in DIR and opened in the review screen.",
                 "docket demo --dir /tmp/docket-demo", commands.demo)
    p.add_argument("--dir", default="docket-demo",
                   help="folder for the demo (default ./docket-demo)")
    p.add_argument("--fresh", action="store_true",
                   help="rebuild the demo project from scratch (refused while it holds "
                        "decisions, unless --discard-decisions)")
    p.add_argument("--discard-decisions", action="store_true",
                   help="with --fresh: rebuild even though the decisions made in it are lost")
    p.add_argument("--no-open", action="store_true", help="build only; do not open the screen")
    p.add_argument("--reviewer", metavar="NAME", help="who reviews (default: your user name)")

    from .cli_gold import register as register_gold
    from .cli_missed import register as register_missed
    from .cli_screens import register as register_screens
    from .cli_team import register as register_team
    register_team(sub)
    register_gold(sub)
    register_missed(sub)
    register_screens(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    with safe_streams(), warnings.catch_warnings():  # every line printed reaches it inert
        warnings.simplefilter("always")
        warnings.showwarning = commands.warn_line  # one line each, on standard error
        return _main(argv)


def _main(argv: list[str] | None) -> int:
    parser = build_parser()
    args = parse(parser, argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return 0
    from docket.core.errors import DocketError
    try:
        return int(args.func(args) or 0)
    except DocketError as exc:
        print(f"docket: {shown(exc)}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("docket: interrupted; nothing was half-written", file=sys.stderr)
        return 130
    except BrokenPipeError:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
