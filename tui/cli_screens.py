"""The commands that open a screen: ``review``, ``demo`` and ``adjudicate``.

``adjudicate`` opens the adjudication screen (and, from it, agreement and quality). The role
check runs before any screen opens, so a reviewer who is not an adjudicator gets the core's
one-line message and exit code 2 from ``cli.main``.
"""

from __future__ import annotations

import argparse
import shlex
from importlib import resources
from pathlib import Path
from typing import Any

from .built_text import print_built
from .cli_base import MASK_HELP, command, default_reviewer, open_project, refuse_to_discard
from .cli_project import status
from .figures import many
from .terminal import need_terminal

DEMO_SECOND_REVIEWER = "ines"


def register(sub: argparse._SubParsersAction) -> None:
    """Add review, demo and adjudicate to the command's sub-parsers."""
    p = command(sub, "review", "Open the review screen on a reviewer's queue.",
                 "Keys: s match, d non-match, h hold, z undo, e note, [ ] history, / find, "
                 "c other candidates, x columns not compared, w full values, ? help, q quit. "
                 "Every decision is saved as it is made.",
                 "docket review vets.docket --reviewer maya --mask email,phone", review)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--reviewer", metavar="NAME",
                   help="defaults to $DOCKET_REVIEWER, then your user name")
    p.add_argument("--mask", action="append", metavar="COL,...", help=MASK_HELP)

    p = command(sub, "demo", "Build the demo project from the bundled invented sample.",
                 "Two invented veterinary practices merging their client registers. The project "
                 "is built once in DIR and opened in the review screen.",
                 "docket demo --dir /tmp/docket-demo", demo)
    p.add_argument("--dir", default="docket-demo",
                   help="folder for the demo (default ./docket-demo)")
    p.add_argument("--fresh", action="store_true",
                   help="rebuild the demo project from scratch (refused while it holds "
                        "decisions, unless --discard-decisions)")
    p.add_argument("--discard-decisions", action="store_true",
                   help="with --fresh: rebuild even though the decisions made in it are lost")
    p.add_argument("--no-open", action="store_true", help="build only; do not open the screen")
    p.add_argument("--reviewer", metavar="NAME", help="who reviews (default: your user name)")

    p = command(
        sub, "adjudicate", "Open the adjudication screen: settle the pairs reviewers differ on.",
        # newlines only between paragraphs: each line is wrapped to the terminal on its own,
        # so a line broken by hand for one width ('Beside the') broke again at another
        "The queue holds pairs whose reviewers disagree, pairs with a hold, and gold "
        "non-matches that a chain of gold matches contradicts (cluster conflicts). Beside the "
        "pair card: every reviewer's label, note and time spent, your own earlier label "
        "flagged.\n\nKeys: s match, d non-match, h hold (each then asks for a short reason), "
        "z undo, [ ] your adjudications, x columns, w full values, a agreement, g quality, "
        "r look again (pairs reviewers sent since), ? help, q quit.\n\n"
        "Only reviewers with the adjudicator role may adjudicate; add one with\n"
        "  docket reviewers PROJECT add NAME --role adjudicator",
        # lee, as in the README's quickstart, where ines is a reviewer and this is refused
        "docket adjudicate vets.docket --reviewer lee --blind --mask email,phone", adjudicate)
    p.add_argument("project", help="the project file (made by docket new)")
    p.add_argument("--reviewer", metavar="NAME",
                   help="the adjudicator; defaults to $DOCKET_REVIEWER, then your user name")
    p.add_argument("--blind", action="store_true",
                   help="hide reviewers' names: show reviewer 1, reviewer 2... instead")
    p.add_argument("--mask", action="append", metavar="COL,...", help=MASK_HELP)


def adjudicate(args: argparse.Namespace) -> int:
    from docket.core import DocketError

    from .masking import parse_mask
    try:
        from .team_app import run_adjudicate
    except ImportError as exc:  # pragma: no cover - a broken install
        raise DocketError(f"the adjudication screen could not load ({exc})") from None
    run_adjudicate(Path(args.project), default_reviewer(args.reviewer), args.blind,
                   parse_mask(args.mask))
    return 0


def _run_review(path: Path, reviewer: str, mask: list[str]) -> int:
    try:
        from .review_app import run_review
    except ImportError as exc:  # pragma: no cover - a broken install
        from docket.core import DocketError
        raise DocketError(f"the review screen could not load ({exc})") from None
    run_review(path, reviewer, mask)
    return 0


def review(args: argparse.Namespace) -> int:
    from .masking import expand_mask, parse_mask
    mask = parse_mask(args.mask)
    with open_project(args.project) as project:  # fails cleanly before the screen starts
        expand_mask(project, mask)
        need_terminal("review")  # before the reviewer is registered
        reviewer = project.ensure_reviewer(default_reviewer(args.reviewer))
    return _run_review(Path(args.project), reviewer, mask)


def sample_dir() -> Path:
    return Path(str(resources.files("docket.sample")))


def demo_spec(folder: Path) -> Any:
    from docket.core import NewProject
    s = sample_dir()
    return NewProject(path=folder / "vet-clients.docket", left=s / "practice_north.csv",
                      right=s / "practice_south.csv", left_id="client_id", right_id="ref",
                      column_map={"owner": "owner_name", "born": "date_of_birth"},
                      name="vet-clients", force=True)


def demo(args: argparse.Namespace) -> int:
    from docket.core import DocketError, Project

    from .progress import progress_bar
    if not args.no_open:
        need_terminal("demo")  # (before the build: --no-open builds without a screen)
    if default_reviewer(args.reviewer).strip().casefold() == DEMO_SECOND_REVIEWER:
        # reviewing as the invented second reviewer would show their labels as one's own
        raise DocketError(f"{DEMO_SECOND_REVIEWER} is the demo's invented second reviewer; "
                          "pass --reviewer NAME with another name")
    if not args.dir.strip():  # Path("") is the current folder: the demo would land there unasked
        raise DocketError("--dir '': give the demo a folder (default ./docket-demo; '.' for the "
                          "current one)")
    folder = Path(args.dir)
    if folder.exists() and not folder.is_dir():
        raise DocketError(f"{folder}: a file, not a folder; give --dir a folder (it is made "
                          "if missing)")
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise DocketError(f"{folder}: cannot make the folder ({exc.strerror or exc}); give "
                          "--dir a folder you can write to") from None
    spec = demo_spec(folder)
    if spec.path.exists() and not args.fresh:
        from .folding import echo
        echo(f"using the existing demo project {spec.path} (pass --fresh to rebuild it)")
    else:
        if spec.path.exists() and not args.discard_decisions:
            refuse_to_discard(str(spec.path), "--fresh", keep=DEMO_SECOND_REVIEWER)
        with progress_bar() as update:
            built = Project.create(spec, progress=update)
        print_built(built)
        with Project.open(spec.path) as project:
            n = project.label_once(DEMO_SECOND_REVIEWER, sample_dir() / "second_reviewer.csv",
                                   default_reviewer(args.reviewer))
            from .cli_matchers import apply_demo_matchers
            names = apply_demo_matchers(project, sample_dir())
        from .folding import echo
        echo(f"second reviewer {DEMO_SECOND_REVIEWER}: {many(n, 'label')} on overlap pairs; "
             f"{default_reviewer(args.reviewer)} is an adjudicator")
        echo(f"invented matcher outputs stored: {', '.join(names)} "
             f"(docket evaluate {shlex.quote(str(spec.path))} --matchers, once the audit pairs "
             "have labels)")
    if args.no_open:
        return status(argparse.Namespace(project=str(spec.path), json=False))
    _run_review(spec.path, default_reviewer(args.reviewer), [])
    where = shlex.quote(str(spec.path))
    print(f"your decisions are saved in {spec.path}; next, try:\n"
          f"  docket status {where}\n  docket agreement {where}\n"
          f"  docket adjudicate {where}\n  docket evaluate {where}\n"
          f"  docket evaluate {where} --matchers\n"
          "(add --screen to agreement and evaluate to see them on a screen)")
    return 0
