"""The ``supplement`` command: a second audit sample, stratified on one matcher's own score.

Argument parsing and printing only; the facade draws it (``Project.draw_supplement``).
"""

from __future__ import annotations

import argparse
import shlex

from .cli_base import command, open_project
from .cli_checks import at_least
from .figures import many
from .terminal import json_text


def register(sub: argparse._SubParsersAction) -> None:
    p = command(
        sub, "supplement", "Draw a second audit sample stratified on a matcher's own scores.",
        "The audit slice is stratified on the project's model, so a matcher that errs where "
        "the model is sure has its errors in large, thinly sampled strata and its figures "
        "come out wide. A supplement is a second stratified random sample of the candidate "
        "pairs, drawn independently on the matcher's scores (0…1, or a label column) and "
        "stored with its strata and inclusion probabilities. Its pairs join the audit share "
        "of every reviewer's queue; once they are reviewed, 'docket evaluate --predictions "
        "FILE --supplement' judges the matcher from them and the audit slice together "
        "(design-based, as the audit slice judges the model). One supplement per set of "
        "scores.",
        "docket supplement vets.docket --predictions matcher.csv --size 400", supplement)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--predictions", metavar="FILE", required=True,
                   help="the matcher's output (left_id, right_id, score or label), as for "
                        "'docket evaluate --predictions'")
    p.add_argument("--size", type=int, metavar="N",
                   help="pairs to draw (default: as the audit slice, 5%% of the candidate "
                        "pairs, 50 to 1,000)")
    p.add_argument("--seed", type=at_least(0), metavar="S",
                   help="seed of the draw (default: taken from the scores, so it repeats)")
    p.add_argument("--json", action="store_true", help="machine-readable output")


def supplement(args: argparse.Namespace) -> int:
    with open_project(args.project) as project:
        made = project.draw_supplement(args.predictions, args.size, args.seed)
    if args.json:
        print(json_text(made))
        return 0
    strata = ", ".join(f"{h}: {n:,} of {big:,}"
                       for h, (big, n) in sorted(made["strata"].items(), key=lambda v: int(v[0])))
    print(f"drew {many(made['size'], 'candidate pair')} stratified on the scores of {made['file']} "
          f"(stratum: drawn of pairs — {strata}; seed {made['seed']})")
    print("they come in the audit share of every reviewer's queue; once reviewed: "
          f"docket evaluate {shlex.quote(args.project)} --predictions "
          f"{shlex.quote(made['file'])} --supplement")
    return 0
