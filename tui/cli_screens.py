"""``docket adjudicate``: the adjudication screen (and, from it, agreement and quality).

Argument parsing only. The role check runs before any screen opens, so a reviewer who is not
an adjudicator gets the core's one-line message and exit code 2 from ``cli.main``.
"""

from __future__ import annotations

import argparse
from pathlib import Path


def register(sub: argparse._SubParsersAction) -> None:
    """Add ``docket adjudicate`` to the command's sub-parsers."""
    from .cli import _command
    p = _command(
        sub, "adjudicate", "Open the adjudication screen: settle the pairs reviewers differ on.",
        "The queue holds pairs whose reviewers disagree, pairs with a hold, and gold\n"
        "non-matches that a chain of gold matches contradicts (cluster conflicts). Beside the\n"
        "pair card: every reviewer's label, note and time spent, your own earlier label\n"
        "flagged.\n\nKeys: s match, d non-match, h hold (each then asks for a short reason),\n"
        "z undo, [ ] your adjudications, a agreement, g quality, ? help, q quit.\n\n"
        "Only reviewers with the adjudicator role may adjudicate; add one with\n"
        "  docket reviewers PROJECT add NAME --role adjudicator",
        "docket adjudicate vets.docket --reviewer ines --blind --mask email,phone", adjudicate)
    p.add_argument("project")
    p.add_argument("--reviewer", metavar="NAME",
                   help="the adjudicator; defaults to $DOCKET_REVIEWER, then your user name")
    p.add_argument("--blind", action="store_true",
                   help="hide reviewers' names: show reviewer 1, reviewer 2... instead")
    p.add_argument("--mask", metavar="COL,...", help="show these columns partly masked")


def adjudicate(args: argparse.Namespace) -> int:
    from docket.core import DocketError

    from .commands import default_reviewer
    from .masking import parse_mask
    try:
        from .adjudicate_app import run_adjudicate
    except ImportError as exc:  # pragma: no cover - a broken install
        raise DocketError(f"the adjudication screen could not load ({exc})") from None
    run_adjudicate(Path(args.project), default_reviewer(args.reviewer), args.blind,
                   parse_mask(args.mask))
    return 0
