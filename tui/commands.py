"""What each ``docket`` command does: call the core facade, print the result."""

from __future__ import annotations

import argparse
import getpass
import os
import shlex
import sys
from importlib import resources
from pathlib import Path
from typing import Any

from .terminal import json_text


def version() -> str:
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as v
    try:
        return v("docket")
    except PackageNotFoundError:  # running from a source tree
        return "0+unknown"


def default_reviewer(given: str | None) -> str:
    name = given or os.environ.get("DOCKET_REVIEWER") or getpass.getuser()
    return name.strip()


def warn_line(message: Warning | str, category: type, *rest: Any, **kw: Any) -> None:
    """How the command line shows a warning: one line, no source excerpt."""
    print(f"docket: warning: {message}", file=sys.stderr)


def _open(path: str, readonly: bool = False) -> Any:
    from docket.core import Project
    return Project.open(path, readonly=readonly)


def _ratio(value: float) -> str:
    """Enough decimals that a ratio of 0.99998 does not print as 1.0000."""
    digits = 4
    while digits < 9 and round(value, digits) == 1.0 and value < 1.0:
        digits += 1
    return f"{value:.{digits}f}"


def _print_built(built: Any) -> None:
    r = built.blocking
    how = "chosen from the data" if r.auto else "given"
    print(f"created {built.path} ({built.mode} mode): {built.n_left:,} left and "
          f"{built.n_right:,} right records" if built.mode == "link" else
          f"created {built.path} (dedupe mode): {built.n_left:,} records")
    print(_ids_line(built))
    print("fields compared: " + ", ".join(f"{f.name} ({f.kind})" for f in built.fields))
    print(f"blocking rules ({how}):")
    for rule, n in r.per_rule.items():
        print(f"  {rule:<40} {n:>10,} pairs")
    print(f"candidate pairs: {r.pairs:,} of {r.possible:,} possible "
          f"(reduction ratio {_ratio(r.reduction_ratio)}; "
          f"{100 * r.pairs / max(1, r.possible):.3g} % of all pairs)")
    print(f"model: prior {built.model.prior:.4g} after {built.model.iterations} EM iterations; "
          f"audit slice {built.audit_size:,} pairs; overlap {built.overlap_pairs:,} pairs")
    from docket.core.report import CAUTION
    print(f"note: {CAUTION}")


def _ids_line(built: Any) -> str:
    left, right = built.id_columns
    how = ["chosen by docket" if g else "given" for g in built.ids_guessed]
    if right is None:
        line = f"id column: {left} ({how[0]})"
    elif left == right and how[0] == how[1]:
        line = f"id column: {left} in both tables ({how[0]})"
    else:
        line = f"id columns: {left} on the left ({how[0]}), {right} on the right ({how[1]})"
    if any(built.ids_guessed):
        line += "; pass --id (or --left-id / --right-id) to use another"
    return line


def new(args: argparse.Namespace) -> int:
    from docket.core import NewProject, Project
    from docket.core.records.fields import parse_kinds, parse_map

    from .progress import progress_bar
    if args.id_column and (args.left_id or args.right_id):
        from docket.core import DocketError
        raise DocketError("give --id, or --left-id and --right-id, not both")
    spec = NewProject(
        path=Path(args.project), left=Path(args.left),
        right=Path(args.right) if args.right else None, id_column=args.id_column,
        left_id=args.left_id, right_id=args.right_id, column_map=parse_map(args.map),
        kinds=parse_kinds(args.field), pairs_file=Path(args.pairs) if args.pairs else None,
        rules=args.block or [], audit=args.audit, overlap=args.overlap,
        overlap_reviewers=args.overlap_reviewers,
        one_to_one=args.one_to_one, max_pairs=args.max_pairs, threshold=args.threshold,
        seed=args.seed, force=args.force)
    with progress_bar() as update:
        built = Project.create(spec, progress=update)
    _print_built(built)
    where = shlex.quote(str(built.path))
    print(f"next: docket review {where}   (or: docket next {where} --reviewer NAME; "
          f"docket status {where})")
    return 0


def status(args: argparse.Namespace) -> int:
    from docket.core.report import status as get_status
    with _open(args.project, readonly=True) as project:
        info = get_status(project)
    if args.json:
        print(json_text(info))
        return 0
    rec, pairs, dec, model = info["records"], info["pairs"], info["decisions"], info["model"]
    print(f"{info['name']} · {info['mode']} mode · {info['project']}")
    print(f"records      left {rec['left']:,}" + (f", right {rec['right']:,}"
                                                  if info["mode"] == "link" else ""))
    print(f"pairs        {pairs['candidates']:,} candidates, {pairs['open']:,} still queued, "
          f"audit slice {pairs['audit']:,}, overlap {pairs['overlap']:,}")
    print(f"blocking     {'; '.join(info['blocking']['rules'])} "
          f"(reduction ratio {_ratio(info['blocking']['reduction_ratio'])})")
    print(f"decisions    {dec['current_labels']:,} standing labels on {dec['pairs_decided']:,} "
          f"pairs ({dec['log_entries']:,} log entries, {dec['retractions']:,} retractions)")
    for name, c in dec["per_reviewer"].items():
        counts = ", ".join(f"{k} {v:,}" for k, v in c.items() if k != "role")
        print(f"  {name:<16} {c['role']:<12} {counts}")
    print(f"model        ranker {model['ranker']} ({model['ranker_note']}); prior "
          f"{model['prior']:.4g}; threshold {model['threshold']}"
          + ("; one-to-one" if model["one_to_one"] else ""))
    print("match weights (log2 m/u) per field and level:")
    for f in model["fields"]:
        levels = "  ".join(f"{lv['level']} {lv['weight']:+.2f}" for lv in f["levels"])
        print(f"  {f['field']:<14} {f['kind']:<9} {levels}")
    pol = info["gold_policy"]
    print(f"gold labels  {info['gold_labels']:,} (policy: at least {pol['min_reviews']} "
          f"review(s); {pol['rules']})")
    m = info["missed_matches"]
    if m["count"]:
        print(f"missed       {m['count']:,} true matches that are not candidates (docket missed); "
              f"the candidates hold {m['reach']:.1%} of the {m['gold_matches'] + m['count']:,} "
              "matches known")
    return 0


def next_pairs(args: argparse.Namespace) -> int:
    reviewer = default_reviewer(args.reviewer)
    with _open(args.project) as project:
        project.ensure_reviewer(reviewer)
        items = project.next_pairs(reviewer, max(0, args.n))
    if args.json:
        print(json_text([i.to_dict() for i in items]))
        return 0
    print(f"{'pair_id':>8}  {'left_id':<22} {'right_id':<22} {'probability':>11}  why")
    for i in items:
        print(f"{i.pair_id:>8}  {i.left_id:<22} {i.right_id:<22} {i.probability:>11.4f}  "
              f"{i.reason}")
    if not items:
        print("(the queue is empty for this reviewer)")
    return 0


def label(args: argparse.Namespace) -> int:
    from docket.core.reviewing.bulk import apply_rows, read_rows
    reviewer = default_reviewer(args.reviewer)
    with _open(args.project) as project:
        project.ensure_reviewer(reviewer)
        rows = read_rows(project, Path(args.source))
        n = apply_rows(project, reviewer, rows)
        result = project.refit()
    print(f"recorded {n:,} decisions for {reviewer}; refit: ranker {result.ranker}, "
          f"{result.labels:,} labelled pairs used")
    return 0


def export(args: argparse.Namespace) -> int:
    from docket.core.exports.exporting import output_format, scores_frame, write_frame
    if not (args.for_lm and args.output == "-"):
        output_format(args.output, args.format)  # a bad target fails before any work
    if args.what != "scores":
        from . import cli_gold
        with _open(args.project, readonly=True) as project:
            result = cli_gold.export_other(project, args.what, args)
        cli_gold.write_export(result, args.output, args.format,
                              guard=getattr(args, "formula_guard", True))
        return 0
    with _open(args.project, readonly=True) as project:
        frame = scores_frame(project)
    write_frame(frame, args.output, args.format, guard=getattr(args, "formula_guard", True))
    if args.output != "-":
        print(f"wrote {len(frame):,} pairs to {args.output}", file=sys.stderr)
    return 0


def _run_review(path: Path, reviewer: str, mask: list[str]) -> int:
    try:
        from .app import run_review
    except ImportError as exc:  # pragma: no cover - a broken install
        from docket.core import DocketError
        raise DocketError(f"the review screen could not load ({exc})") from None
    run_review(path, reviewer, mask)
    return 0


def review(args: argparse.Namespace) -> int:
    from .masking import expand_mask, parse_mask
    mask = parse_mask(args.mask)
    with _open(args.project) as project:  # fails cleanly before the screen starts
        expand_mask(project, mask)
        project.ensure_reviewer(default_reviewer(args.reviewer))
    return _run_review(Path(args.project), default_reviewer(args.reviewer), mask)


def sample_dir() -> Path:
    return Path(str(resources.files("docket.sample")))


def demo_spec(folder: Path) -> Any:
    from docket.core import NewProject
    s = sample_dir()
    return NewProject(path=folder / "vet-clients.docket", left=s / "practice_north.csv",
                      right=s / "practice_south.csv", left_id="client_id", right_id="ref",
                      column_map={"owner": "owner_name", "born": "date_of_birth"},
                      name="vet-clients", force=True)


def _refuse_to_discard(path: Path) -> None:
    """--fresh over a demo that holds the user's own decisions needs saying so."""
    from docket.core import DocketError
    from docket.tui.cli_team import DEMO_SECOND_REVIEWER
    with _open(str(path), readonly=True) as project, project.reading() as conn:
        n, people = conn.execute(
            "SELECT count(*), count(DISTINCT reviewer) FROM decisions WHERE reviewer != ?",
            (DEMO_SECOND_REVIEWER,)).fetchone()
    if n:
        raise DocketError(f"{path} holds {n:,} decision(s) by {people} reviewer(s) that "
                          "--fresh would discard; copy the file to keep them, then pass "
                          "--fresh --discard-decisions")


def demo(args: argparse.Namespace) -> int:
    from docket.core import Project

    from .progress import progress_bar
    folder = Path(args.dir)
    folder.mkdir(parents=True, exist_ok=True)
    spec = demo_spec(folder)
    if spec.path.exists() and not args.fresh:
        print(f"using the existing demo project {spec.path} (pass --fresh to rebuild it)")
    else:
        if spec.path.exists() and not args.discard_decisions:
            _refuse_to_discard(spec.path)
        with progress_bar() as update:
            built = Project.create(spec, progress=update)
        _print_built(built)
        from .cli_team import DEMO_SECOND_REVIEWER, apply_second_reviewer
        with Project.open(spec.path) as project:
            n = apply_second_reviewer(project, sample_dir() / "second_reviewer.csv",
                                      adjudicator=args.reviewer)
        print(f"second reviewer {DEMO_SECOND_REVIEWER}: {n:,} labels on overlap pairs; "
              f"{default_reviewer(args.reviewer)} is an adjudicator")
    if args.no_open:
        return status(argparse.Namespace(project=str(spec.path), json=False))
    _run_review(spec.path, default_reviewer(args.reviewer), [])
    print(f"your decisions are saved in {spec.path}; next, try:\n"
          f"  docket status {spec.path}\n  docket agreement {spec.path}\n"
          f"  docket adjudicate {spec.path}\n  docket evaluate {spec.path}")
    return 0
