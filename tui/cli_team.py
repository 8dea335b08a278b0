"""The team commands: ``reviewers``, ``agreement`` and ``merge``.

Argument parsing and printing only; the work is done by ``docket.core.reviewing.team``,
``docket.core.reviewing.merge`` and ``docket.core.reviewing.bulk``.
"""

from __future__ import annotations

import argparse
import shlex
from pathlib import Path

from .agreement_lines import agreement_lines
from .cli_base import command, default_reviewer, open_project, refit_words
from .figures import many
from .terminal import json_text, padded, shown


def register(sub: argparse._SubParsersAction) -> None:
    p = command(sub, "reviewers", "Add reviewers and adjudicators to a project, or list them.",
                 "add NAME registers a reviewer (--role adjudicator: one who may also settle "
                 "pairs in adjudication); adding an existing name changes its role. A name used "
                 "with review, next or label is registered as a reviewer on first use; "
                 "adjudicators are added here.\nlist shows each person's role, standing labels, "
                 "holds, adjudications and time spent.",
                 "docket reviewers vets.docket add ines --role adjudicator", reviewers)
    p.add_argument("project", help="the project file (made by docket new)")
    # prog: the actions' usage and errors read 'docket reviewers project add', as if to be typed
    actions = p.add_subparsers(dest="action", metavar="ACTION", required=True,
                               prog="docket reviewers PROJECT")
    a = actions.add_parser("add", help="register a reviewer or change their role",
                           description="Register a reviewer, or change an existing one's role.")
    a.add_argument("name", metavar="NAME",
                   help="the reviewer's name, as they give it to review, next and label")
    a.add_argument("--role", choices=["reviewer", "adjudicator"], default="reviewer",
                   help="default reviewer")
    a.add_argument("--by", metavar="NAME",
                   help="who grants the role, kept with it in the project (default "
                        "$DOCKET_REVIEWER or your login name)")
    b = actions.add_parser("list", help="list reviewers with their work so far",
                           description="List reviewers with their role and work so far.")
    b.add_argument("--json", action="store_true", help="machine-readable output")

    p = command(sub, "agreement", "Show how far the reviewers agree.",
                 "For every two reviewers with pairs in common: Cohen's kappa with its standard "
                 "error (Fleiss, Cohen & Everitt 1969, non-null) and 95% CI, PABAK with the "
                 "prevalence and bias indices, the confusion matrix, the Landis & Koch band and "
                 "hold rates. Over all reviewers: Fleiss' kappa and Krippendorff's alpha "
                 "(nominal). Dawid-Skene: each reviewer's sensitivity and specificity.\nBy "
                 "default kappa is over match / non-match on pairs both decided; --include-hold "
                 "counts hold as a third category.",
                 "docket agreement vets.docket --json", agreement)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--json", action="store_true", help="machine-readable output")
    p.add_argument("--screen", action="store_true",
                   help="open the agreement screen instead of printing")
    p.add_argument("--include-hold", action="store_true",
                   help="count hold as a third category")

    p = command(sub, "merge", "Bring in decisions made offline in copies of this project.",
                 "Each OTHER must be a copy of the same project (same records and candidate "
                 "pairs); it is opened read-only. Merging twice changes nothing, and the order "
                 "of the files does not matter. All files are checked before anything is "
                 "written; then the model is refit.\nRoles stay this project's: a copy's role "
                 "changes are listed and left out unless --accept-roles is given. A copy with "
                 "an unknown role, or a time more than 1 hour ahead of this machine's clock, is "
                 "refused.",
                 "docket merge vets.docket laptop-ines.docket laptop-maya.docket", merge)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("others", nargs="+", metavar="OTHER", help="a copy of the project")
    p.add_argument("--accept-roles", action="store_true",
                   help="also take the copies' role changes (default: list and leave them out)")


# -- reviewers -----------------------------------------------------------------------------
def _duration(seconds: float) -> str:
    s = round(seconds)
    return f"{s // 3600}:{s % 3600 // 60:02d}:{s % 60:02d}"


def reviewers(args: argparse.Namespace) -> int:
    if args.action == "add":
        with open_project(args.project) as project:
            change = project.add_reviewer(args.name, args.role,
                                          granted_by=default_reviewer(args.by, "--by"))
        print(change.message)
        return 0
    with open_project(args.project, readonly=True) as project:
        people = project.reviewers()
    if args.json:
        print(json_text(people))
        return 0
    if not people:
        print("no reviewers yet; add one with 'docket reviewers PROJECT add NAME'")
        return 0
    # the name column as wide as the longest name that leaves the row within 80 columns (8
    # cells); a longer name goes on a line of its own, its figures under it: 18 cells for
    # 'ines' made each row 89 columns, and a 12-cell name wrapped its row mid-date
    from rich.cells import cell_len
    wide = min(80 - REVIEWER_ROW, max(4, *(cell_len(shown(r["name"])) for r in people)))
    print(f"{'name':<{wide}}  {'role':<12} {'labels':>7} {'holds':>6} {'adjudicated':>11} "
          f"{'time':>9}  added")
    for r in people:
        name = shown(r["name"])
        if cell_len(name) > wide:
            print(name)
            name = ""
        print(f"{padded(name, wide)}  {r['role']:<12} {r['labels']:>7,} {r['holds']:>6,} "
              f"{r['adjudications']:>11,} {_duration(r['seconds']):>9}  "
              f"{(r['added_at'] or '—')[:19].replace('T', ' ')}")
    return 0


REVIEWER_ROW = 2 + 12 + 1 + 7 + 1 + 6 + 1 + 11 + 1 + 9 + 2 + 19  # a row of the list less its name


# -- agreement ---------------------------------------------------------------------------
def agreement(args: argparse.Namespace) -> int:
    if args.screen:
        from pathlib import Path

        from .team_app import run_agreement
        with open_project(args.project, readonly=True):
            pass  # a bad path fails here, as one line, before any screen opens
        run_agreement(Path(args.project))
        return 0
    with open_project(args.project, readonly=True) as project:
        report = project.agreement(include_hold=args.include_hold)
    if args.json:
        print(json_text(report.to_dict()))
        return 0
    from .folding import echo
    echo("\n".join(agreement_lines(report)))
    return 0


# -- merge ---------------------------------------------------------------------------------
def merge(args: argparse.Namespace) -> int:
    from .progress import working
    with working("merging, then refitting"), open_project(args.project) as project:
        result, refit = project.merge([Path(p) for p in args.others],
                                      accept_roles=args.accept_roles)
    for f in result.files:
        print(f"  {f.path}: {many(f.decisions, 'decision')}, {f.new:,} new")
    for change in result.role_changes:
        print(("role accepted: " if result.roles_accepted else "role left out: ")
              + change.message)
    if result.role_changes and not result.roles_accepted:
        print("roles stay as this project records them; to take the copies' role changes, "
              "merge again with --accept-roles")
    if not result.added:
        print(f"nothing new: every decision in these files is already in {args.project}")
        return 0
    who = ", ".join(f"{n} {k:,}" for n, k in result.by_reviewer.items())
    print(f"brought {many(result.added, 'decision')} into {args.project} ({who}) on "
          f"{many(result.pairs_touched, 'pair')}")
    if result.new_reviewers:
        print("new reviewers: " + ", ".join(result.new_reviewers))
    for name, other in result.alike_names:
        print(f"note: {name} (from a copy) and {other} differ only in letter case or "
              "accents, and count as two reviewers")
    for name in result.unconfirmed_adjudicators:
        print(f"note: {name} adjudicated in a copy but is not an adjudicator here; confirm with "
              f"'docket reviewers {shlex.quote(args.project)} add {shlex.quote(name)} --role "
              "adjudicator'")
    if refit is not None:
        print(refit_words(refit))
    return 0
