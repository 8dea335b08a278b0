"""The ``missed`` command: true matches that no candidate pair holds, recorded by their ids.

What it prints goes through the terminal door (``terminal``) like every other command.

Argument parsing and printing only; the work is done by ``docket.core.reviewing.missed``.
"""

from __future__ import annotations

import argparse
import shlex

from .cli_base import command, default_reviewer, open_project
from .terminal import json_text, padded


def register(sub: argparse._SubParsersAction) -> None:
    p = command(sub, "missed", "Record true matches that blocking did not make candidates.",
                 "add LEFT RIGHT records that the two records (by id: left then right table; "
                 "in dedupe mode, any two ids of the table) are the same entity although no "
                 "candidate pair holds them. They are counted apart from the gold labels: "
                 "status and evaluate show how many the candidates lack (a rough view of what "
                 "blocking lost), and export --what missed writes them out.\nremove LEFT RIGHT "
                 "takes one back; list shows them.",
                 "docket missed vets.docket add N-00412 S-11877 --reviewer maya "
                 "--note 'same owner, moved'", missed)
    p.add_argument("project", help="the project file (made by docket new)")
    # prog: the actions' usage and errors read 'docket missed project add', as if to be typed
    actions = p.add_subparsers(dest="action", metavar="ACTION", required=True,
                               prog="docket missed PROJECT")
    a = actions.add_parser("add", help="record a missed match by its two record ids",
                           description="Record a true match that is not a candidate pair.")
    _ids(a)
    a.add_argument("--reviewer", metavar="NAME",
                   help="who found it (default $DOCKET_REVIEWER, then your user name)")
    a.add_argument("--note", default="", help="why they are the same entity")
    r = actions.add_parser("remove", help="take back a missed match recorded by mistake",
                           description="Take back a missed match recorded by mistake.")
    _ids(r)
    b = actions.add_parser("list", help="list the missed matches",
                           description="List the recorded missed matches, oldest first.")
    b.add_argument("--json", action="store_true", help="machine-readable output")


def _ids(p: argparse.ArgumentParser) -> None:
    for side in ("left", "right"):
        p.add_argument(f"{side}_id", metavar=side.upper(),
                       help=f"record id in the {side} table (dedupe: any id of the table)")


def missed(args: argparse.Namespace) -> int:
    if args.action == "add":
        reviewer = default_reviewer(args.reviewer)
        with open_project(args.project) as project:
            found = project.record_missed(args.left_id, args.right_id, reviewer, args.note)
            total = len(project.missed_matches())
        print(f"missed match {(found.left_id)} ↔ {(found.right_id)} "
              f"recorded by {(found.reviewer)}; {total:,} in all "
              f"(see: docket status {shlex.quote(args.project)})")
        return 0
    if args.action == "remove":
        with open_project(args.project) as project:
            gone = project.remove_missed(args.left_id, args.right_id)
        print("removed" if gone else "no such missed match; nothing changed")
        return 0
    with open_project(args.project, readonly=True) as project:
        found_all = project.missed_matches()
    if args.json:
        print(json_text([m.to_dict() for m in found_all]))
        return 0
    if not found_all:
        print("(no missed matches recorded)")
    for m in found_all:
        print(f"{padded(m.left_id, 22)} {padded(m.right_id, 22)} "
              f"{padded(m.reviewer, 14)} {m.recorded_at[:10]}  {m.note}")
    return 0
