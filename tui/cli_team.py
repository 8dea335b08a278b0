"""The team commands: ``reviewers``, ``agreement`` and ``merge``.

Argument parsing and printing only; the work is done by ``docket.core.reviewing.team``,
``docket.core.reviewing.merge`` and ``docket.core.reviewing.bulk``.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from .cli_base import command, default_reviewer, open_project
from .figures import TOO_FEW, counted, interval, number, percent
from .terminal import json_text, shown


def register(sub: argparse._SubParsersAction) -> None:
    p = command(sub, "reviewers", "Add reviewers and adjudicators to a project, or list them.",
                 "add NAME registers a reviewer (--role adjudicator: one who may also settle "
                 "pairs in adjudication); adding an existing name changes its role. A name used "
                 "with review, next or label is registered as a reviewer on first use; "
                 "adjudicators are added here.\nlist shows each person's role, standing labels, "
                 "holds, adjudications and time spent.",
                 "docket reviewers vets.docket add ines --role adjudicator", reviewers)
    p.add_argument("project")
    actions = p.add_subparsers(dest="action", metavar="ACTION", required=True)
    a = actions.add_parser("add", help="register a reviewer or change their role",
                           description="Register a reviewer, or change an existing one's role.")
    a.add_argument("name")
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
    p.add_argument("project")
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
    p.add_argument("project")
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
                                          granted_by=default_reviewer(args.by))
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
    print(f"{'name':<18} {'role':<12} {'labels':>7} {'holds':>6} {'adjudicated':>11} "
          f"{'time':>9}  added")
    for r in people:
        print(f"{shown(r['name']):<18} {r['role']:<12} {r['labels']:>7,} {r['holds']:>6,} "
              f"{r['adjudications']:>11,} {_duration(r['seconds']):>9}  "
              f"{(r['added_at'] or '—')[:19].replace('T', ' ')}")
    return 0


# -- agreement -----------------------------------------------------------------------------
def _print_pair(r: dict[str, Any], floor: int) -> None:
    a, b = r["reviewer_a"], r["reviewer_b"]
    print(f"{a} × {b}: {r['n']:,} pairs used of {r['n_common']:,} in common")
    if r["too_few"]:
        print(f"  Cohen's kappa and PABAK: {TOO_FEW} (n {r['n']:,}; needs {floor})")
    else:
        print(f"  Cohen's kappa {interval(r['kappa'], r['ci_low'], r['ci_high'], 4)} "
              f"(n {r['n']:,}; {r['band']}); SE {number(r['se'], 4)}")
        print(f"  observed {number(r['observed'], 4)}  chance {number(r['expected'], 4)}  "
              f"PABAK {interval(r['pabak'], r['pabak_low'], r['pabak_high'], 4)}  prevalence "
              f"index {number(r['prevalence_index'], 4)}  bias index "
              f"{number(r['bias_index'], 4)}")
    print(f"  holds: {a} {percent(r['hold_rate_a'])}, {b} {percent(r['hold_rate_b'])}")
    conf = r["confusion"]
    cats = conf["categories"]
    width = max(len(c) for c in cats) + 2
    print(f"  confusion (rows {a}, columns {b}):")
    print(f"    {'':<{width}}" + "".join(f"{c:>11}" for c in cats))
    for cat, row in zip(cats, conf["table"], strict=True):
        print(f"    {cat:<{width}}" + "".join(f"{n:>11,}" for n in row))


def _print_rates(ds: dict[str, Any] | None) -> None:
    if not ds:
        return
    if not ds["identified"]:
        print(f"\nDawid–Skene: {ds['reason']} ({ds['units']:,} pairs, "
              f"{ds['units_rated_twice']:,} with two or more labels)")
        return
    state = "converged" if ds["converged"] else "not converged"
    print(f"\nDawid–Skene ({ds['iterations']} EM rounds, {state}; {ds['units']:,} pairs, "
          f"{ds['units_rated_twice']:,} with two or more labels)")
    holds = ds["reviewers"] and ds["reviewers"][0]["hold_rate_match"] is not None
    print(f"  {'reviewer':<18} {'sensitivity':>22} {'specificity':>22}"
          + ("  holds (match / non-match)" if holds else ""))
    for v in ds["reviewers"]:
        sens, spec = v["sensitivity"], v["specificity"]
        line = (f"  {v['name']:<18} {interval(sens['value'], sens['low'], sens['high']):>22} "
                f"{interval(spec['value'], spec['low'], spec['high']):>22}")
        if holds:
            line += f"  {percent(v['hold_rate_match'])} / {percent(v['hold_rate_non_match'])}"
        print(line)
    print(f"  {ds['method']}")
    if ds["warning"]:
        print(f"  warning: {ds['warning']}")


def print_agreement(report: dict[str, Any]) -> None:
    names = list(report["reviewers"])
    if not names:
        print(f"agreement · {report['name']} · no reviewer labels yet")
        return
    floor = report["min_pairs"]
    print(f"agreement · {report['name']} · {len(names)} reviewer(s): " + ", ".join(
        f"{n} {v['labels']:,} labels" for n, v in report["reviewers"].items()))
    print(f"({report['conventions']['holds']})")
    if not report["reviewer_pairs"]:
        print("\nno two reviewers have pairs in common yet")
    for r in report["reviewer_pairs"]:
        print()
        _print_pair(r, floor)
    o = report["overall"]
    print("\nall reviewers")
    if o["fleiss_units"]:
        fleiss = counted(o["fleiss_kappa"], o["fleiss_low"], o["fleiss_high"],
                         o["fleiss_units"], floor)
        print(f"  Fleiss' kappa {fleiss} ({o['fleiss_band']}) on pairs with "
              f"{o['fleiss_raters']} ratings each")
    else:
        print("  Fleiss' kappa — (no pair has two ratings yet)")
    alpha = counted(o["krippendorff_alpha"], o["alpha_low"], o["alpha_high"], o["alpha_units"],
                    floor)
    print(f"  Krippendorff's alpha (nominal) {alpha} on pairs with two or more ratings")
    _print_rates(report["dawid_skene"])
    c = report["conventions"]
    print(f"\nSE: {c['se']}.\nCI: {c['ci']}.\nbands: {c['bands']}.")


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
        print(json_text(report))
    else:
        print_agreement(report)
    return 0


# -- merge ---------------------------------------------------------------------------------
def merge(args: argparse.Namespace) -> int:
    with open_project(args.project) as project:
        result, refit = project.merge([Path(p) for p in args.others],
                                      accept_roles=args.accept_roles)
    for f in result.files:
        print(f"  {f.path}: {f.decisions:,} decisions, {f.new:,} new")
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
    print(f"brought {result.added:,} decisions into {args.project} ({who}) on "
          f"{result.pairs_touched:,} pairs")
    if result.new_reviewers:
        print("new reviewers: " + ", ".join(result.new_reviewers))
    for name in result.unconfirmed_adjudicators:
        print(f"note: {name} adjudicated in a copy but is not an adjudicator here; confirm with "
              f"'docket reviewers {args.project} add {name} --role adjudicator'")
    if refit is not None:
        print(f"refit: ranker {refit.ranker}, {refit.labels:,} labelled pairs used")
    return 0
