"""``docket matchers``: import machine raters' outputs, list, mark and remove them.

Argument parsing and printing only: reading, checking and storing live in
``docket.core.matchers``.
"""

from __future__ import annotations

import argparse
from typing import Any

from .figures import many
from .terminal import json_text, padded

ACTIONS = ("import", "list", "mark", "remove", "ensemble", "queue")


def register(sub: argparse._SubParsersAction) -> None:
    """Add ``docket matchers`` to the command's sub-parsers."""
    from .cli_base import command
    p = command(
        sub, "matchers", "Store machine raters' outputs in the project and manage them.",
        "import FILE...: one long file (left_id,right_id,matcher,score or label) or one file "
        "per matcher (named after the file, or --name); score from 0 to 1, or label match / "
        "non-match. Every row is checked first; a bad one stops the import with nothing "
        "stored. Rows naming pairs outside the candidate pairs are counted and reported.\n"
        "list: the stored matchers.  mark NAME: set --group (prompt variants of one matcher), "
        "--role teacher|student, --threshold.  remove NAME...: forget them.\n"
        "ensemble NAME --of A,B,C --method vote|dawid-skene: a combined matcher, stored and "
        "evaluated like the others.\nqueue disagreement [--of A,B,...]: reviewers see the "
        "pairs these raters split on first, then the model's uncertain pairs (the audit "
        "slice is untouched); queue uncertain: back to the model's order.\n\n"
        "Then: docket evaluate PROJECT --matchers",
        "docket matchers vets.docket import outputs.csv --group prompts", run)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("action", choices=ACTIONS, help="what to do (see above)")
    p.add_argument("names", nargs="*", metavar="FILE|NAME",
                   help="files to import, or matcher names to mark / remove / create")
    p.add_argument("--name", metavar="NAME", help="import: the matcher of a single file")
    p.add_argument("--replace", action="store_true",
                   help="import, ensemble: replace matchers already stored under these names")
    p.add_argument("--threshold", type=float, metavar="T",
                   help="score at or above which a pair is a predicted match (default 0.5)")
    p.add_argument("--group", metavar="GROUP",
                   help="mark these matchers as variants of one another (e.g. prompt wordings)")
    p.add_argument("--role", choices=("teacher", "student"),
                   help="a matcher distilled (student) from another (teacher)")
    p.add_argument("--clear", action="store_true",
                   help="mark: take away the matcher's group and role")
    p.add_argument("--of", metavar="A,B,...",
                   help="ensemble: the matchers it combines; queue: the raters that count "
                        "(default: every stored matcher but ensembles)")
    p.add_argument("--method", choices=("vote", "dawid-skene"), default="vote",
                   help="ensemble: majority vote (ties: non-match) or Dawid-Skene")
    p.add_argument("--with-reviewers", action="store_true",
                   help="ensemble, dawid-skene: reviewers' labels join the raters")
    p.add_argument("--json", action="store_true", help="machine-readable output")


def run(args: argparse.Namespace) -> int:
    from docket.core import DocketError, Project
    if args.action != "import" and args.name:
        raise DocketError("--name goes with import")
    readonly = args.action == "list"
    with Project.open(args.project, readonly=readonly) as project:
        if args.action == "import":
            out: Any = _import(project, args)
        elif args.action == "mark":
            out = _mark(project, args)
        elif args.action == "remove":
            project.forget_matchers(args.names)
            out = {"removed": args.names}
        elif args.action == "ensemble":
            out = _ensemble(project, args)
        elif args.action == "queue":
            out = _queue(project, args)
        else:
            out = project.matchers()
    if args.json:
        print(json_text(out))
        return 0
    print("\n".join(render(args.action, out)))
    return 0


def _import(project: Any, args: argparse.Namespace) -> list[dict[str, Any]]:
    from docket.core import DocketError
    if not args.names:
        raise DocketError("import needs at least one file of matcher output")
    read = project.import_matchers(args.names, name=args.name, replace=args.replace,
                           threshold=0.5 if args.threshold is None else args.threshold,
                           group=args.group, role=args.role)
    return [{"name": m.name, "kind": m.kind, "source": m.source, "rows": m.rows,
             "given": m.given, "outside": m.outside, "absent": m.absent,
             "outside_examples": m.outside_examples} for m in read]


def _mark(project: Any, args: argparse.Namespace) -> list[dict[str, Any]]:
    return project.mark_matchers(args.names, group=args.group, role=args.role,
                              threshold=args.threshold, clear=args.clear)


def _ensemble(project: Any, args: argparse.Namespace) -> list[dict[str, Any]]:
    from docket.core import DocketError
    if len(args.names) != 1 or not args.of:
        raise DocketError("ensemble needs one new name and --of A,B,... (at least two)")
    members = [m.strip() for m in args.of.split(",") if m.strip()]
    project.store_ensemble(args.names[0], members, args.method, args.with_reviewers,
                           args.replace)
    return project.matchers()


def apply_demo_matchers(project: Any, folder: Any) -> list[str]:
    """Store the demo's invented matcher outputs (``sample/make_matchers.py``), marked as the
    scenario has them: three prompt variants of one model, its distilled student, a rule."""
    project.import_matchers([folder / "matchers_lm.csv"], group="lm-prompts", replace=True)
    project.import_matchers([folder / "matcher_rules.csv"], name="rules", threshold=0.6,
                            replace=True)
    project.import_matchers([folder / "matcher_student.csv"], name="student",
                            role="student", replace=True)
    project.mark_matchers(["lm-plain"], role="teacher")
    return [m["name"] for m in project.matchers()]


def _queue(project: Any, args: argparse.Namespace) -> dict[str, Any]:
    from docket.core import QUEUE_ORDERS, DocketError
    if len(args.names) != 1 or args.names[0] not in QUEUE_ORDERS:
        raise DocketError("queue needs one order: disagreement or uncertain")
    members = [m.strip() for m in args.of.split(",") if m.strip()] if args.of else None
    return project.choose_queue_order(args.names[0], members)


def render(action: str, out: Any) -> list[str]:
    from .characters import visible as plain
    if action == "import":
        lines = []
        for m in out:
            lines.append(f"stored matcher {plain(m['name'])} ({m['kind']}s) from "
                         f"{plain(m['source'])}: {many(m['given'], 'candidate pair')} given, "
                         f"{m['absent']:,} absent (count as predicted non-matches)")
            if m["outside"]:
                shown = ", ".join(f"{plain(a)}|{plain(b)}" for a, b in m["outside_examples"])
                lines.append(f"  {many(m['outside'], 'row names a pair', 'rows name pairs')} "
                             "outside the candidate pairs "
                             f"(not stored, no audit stratum holds them), e.g. {shown}")
        return lines
    if action == "queue":
        extra = (f"; {many(out['split_pairs'], 'pair')} split "
                 f"{', '.join(map(plain, out['raters']))}"
                 if out["mode"] == "disagreement" else "")
        return [f"queue order: {out['text']}{extra}"]
    if action == "remove":
        return [f"removed {', '.join(plain(n) for n in out['removed'])}"]
    return table_lines(out)


def table_lines(rows: list[dict[str, Any]]) -> list[str]:
    """The stored matchers, one line each (also used by ``docket status``)."""
    from rich.cells import cell_len

    from .characters import visible as plain
    if not rows:
        return ["no matchers stored; add some with 'docket matchers PROJECT import FILE'"]
    # each column as wide as its widest entry: at fixed widths (a name column of 22) the table
    # was 101 columns for names of nine letters, and every row folded at 80
    cells = [[plain(m["name"]), m["kind"], f"{m['threshold']:g}", plain(m["variant_group"] or "—"),
              m["role"] or "—", f"{m['given']:,}", f"{m['outside']:,}", f"{m['absent']:,}"]
             for m in rows]
    heads = ["matcher", "kind", "threshold", "group", "role", "given", "outside", "absent"]
    widths = [max(cell_len(h), *(cell_len(r[i]) for r in cells)) for i, h in enumerate(heads)]
    left = (True, True, False, True, True, False, False, False)
    out = []
    for row in [heads, *cells]:
        out.append("  " + "  ".join(padded(c, w) if lft else " " * (w - cell_len(c)) + c
                                    for c, w, lft in zip(row, widths, left, strict=True))
                   .rstrip())
    return out
