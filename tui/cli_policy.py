"""The ``policy`` command: show or change the project's gold-label policy.

Argument parsing and printing only; the rules live in ``docket.core.reviewing.gold``.
"""

from __future__ import annotations

import argparse
from typing import Any

from .cli_base import command, open_project
from .cli_checks import at_least
from .figures import many
from .terminal import json_text


def register(sub: argparse._SubParsersAction) -> None:
    p = command(sub, "policy", "Show or change when a decided pair becomes a gold label.",
                "With no option it shows the policy. Unanimous decisions become gold; "
                "disagreements only when an adjudicator settles them; holds never.\n"
                "--min-reviews N: a pair needs N reviewer decisions before it can be gold.\n"
                "--independent-adjudication: an adjudicator may not settle a pair they decided "
                "as a reviewer (one taken back counts too); such pairs wait for another "
                "adjudicator, and an adjudication of one made earlier or brought in by merge "
                "stops counting. --adjudicator-may-settle-own allows it again (the default: "
                "the adjudication screen then flags the adjudicator's own label).",
                "docket policy vets.docket --independent-adjudication", policy)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--min-reviews", type=at_least(1), metavar="N",
                   help="reviewer decisions a pair needs before it can be gold (default 1)")
    own = p.add_mutually_exclusive_group()
    own.add_argument("--independent-adjudication", dest="independent", action="store_true",
                     default=None, help="adjudicators settle only pairs they did not review")
    own.add_argument("--adjudicator-may-settle-own", dest="independent", action="store_false",
                     help="adjudicators may settle pairs they reviewed (flagged on screen)")
    p.add_argument("--json", action="store_true", help="machine-readable output")


def policy_lines(rules: dict[str, Any]) -> list[str]:
    own = ("an adjudicator may not settle a pair they decided as a reviewer"
           if rules["independent_adjudication"] else
           "an adjudicator may settle a pair they reviewed (flagged on screen)")
    return [f"a pair needs {many(rules['min_reviews'], 'reviewer decision')}; unanimous decisions "
            "become gold; disagreements only when an adjudicator settles them; holds never",
            own]


def policy(args: argparse.Namespace) -> int:
    changes: dict[str, Any] = {}
    if args.min_reviews is not None:
        changes["min_reviews"] = int(args.min_reviews)
    if args.independent is not None:
        changes["independent_adjudication"] = bool(args.independent)
    with open_project(args.project, readonly=not changes) as project:
        rules = project.set_gold_policy(**changes) if changes else project.gold_policy()
        planned = int(project.meta.get("overlap_reviewers") or 2)
    if args.json:
        print(json_text(rules))
        return 0
    from .folding import echo
    echo(("gold policy now: " if changes else "gold policy: ") + "; ".join(policy_lines(rules)))
    if rules["min_reviews"] > planned:  # a typo away from no gold label at all
        print(f"note: the queue plans at most {planned} reviewers for a pair (its overlap "
              f"pairs), so a pair becomes gold only once more reviewers than that decide it")
    return 0
