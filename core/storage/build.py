"""Creating a project: records -> candidate pairs -> comparison -> model -> queue -> file.

Everything is built in a temporary file beside the target and renamed into place at the end,
so a failed or cancelled build leaves no project file and never touches an existing one.
"""

from __future__ import annotations

import hashlib
import os
import threading
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import Cancelled, DocketError
from ..matching import decision_rule, random_pairs, scoring, together
from ..matching.explain import LogOddsTable
from ..matching.model import FSModel, fit_em
from ..ordering import queue, sampling
from ..pairs import blocking, candidates
from ..pairs.candidates import possible_pairs, width_of
from ..pairs.pair_files import open_pairs
from ..records import fields as fieldmod
from ..records.same_records import copy_warning
from ..records.sources import Table, load_table, read_frame
from ..types import FieldSpec
from . import file_health, spilled, store
from .build_files import refuse_if_in_use, remove_stale_builds, replace_project_file
from .pair_stream import ChunkScorer, InProcess, levels_of, similarities
from .pattern_room import check_room

Progress = Callable[[str, int, int], None]


MAX_FIELDS = 2000 - 13  # SQLite's column limit less the pairs table's own columns


@dataclass
class NewProject:
    """What ``docket new`` was asked to build."""

    path: Path
    left: Path
    right: Path | None = None
    id_column: str | None = None
    left_id: str | None = None
    right_id: str | None = None
    column_map: dict[str, str] = field(default_factory=dict)
    kinds: dict[str, str] = field(default_factory=dict)
    keep_placeholders: bool = False  # compare 'N/A', 'XX1 1XX' as written, not as missing
    together: list[str] | None = None  # fields read as one home (None: found by name; ["none"])
    compare: list[str] | None = None  # the columns compared (None: all the tables share)
    pairs_file: Path | None = None
    rules: list[str] = field(default_factory=list)
    audit: int | None = None
    overlap: float = 0.2
    overlap_reviewers: int = 2  # how many different reviewers decide each overlap pair
    one_to_one: bool = False
    max_pairs: int = blocking.DEFAULT_MAX_PAIRS
    threshold: float = 0.5
    seed: int = 0
    refit_every: int = 25
    force: bool = False
    name: str | None = None
    sample_above: int = sampling.DEFAULT_SAMPLE_ABOVE  # more pairs than this: keep a sample
    engine: str = "in-process"  # or "dask"
    workers: int | None = None  # scoring processes (all cores); Dask: cluster size (2)
    scheduler: str | None = None  # an existing Dask scheduler instead


@dataclass
class Built:
    """What was built, for the report the CLI prints."""

    path: Path
    mode: str
    n_left: int
    n_right: int
    fields: list[FieldSpec]
    blocking: blocking.BlockingReport
    model: FSModel
    audit_size: int
    overlap_pairs: int
    id_columns: tuple[str, str | None] = ("", None)  # (left, right); right None in dedupe mode
    ids_guessed: tuple[bool, bool] = (False, False)  # chosen by docket, not given by the user
    sampling: dict[str, Any] | None = None  # how a sampled project was drawn; None: all pairs
    one_to_one_hint: decision_rule.OneToOneHint | None = None
    crowding: decision_rule.Crowding | None = None  # predicted matches per record


def _check(spec: NewProject) -> None:
    file_health.check_new(spec.path, spec.force,
                          [Path(p) for p in (spec.left, spec.right, spec.pairs_file) if p],
                          ours=store.APPLICATION_ID)
    if spec.force:  # asked now, before the build, and again when its file takes the place
        refuse_if_in_use(spec.path)
    if not 0.0 <= spec.overlap <= 1.0:
        raise DocketError(f"--overlap {spec.overlap}: give a share between 0 and 1")
    if spec.overlap_reviewers < 2:
        raise DocketError(f"--overlap-reviewers {spec.overlap_reviewers}: give 2 or more")
    if spec.audit is not None and spec.audit < 0:
        raise DocketError(f"--audit {spec.audit}: give a number of pairs, 0 or more")
    if spec.pairs_file and spec.rules:
        raise DocketError("give either --pairs or --block, not both")
    if spec.sample_above < 100:
        raise DocketError(f"--sample-above {spec.sample_above}: give 100 pairs or more")
    if spec.engine not in ("in-process", "dask"):
        raise DocketError(f"--engine {spec.engine}: use in-process or dask")
    if spec.right is not None and file_health.same_file(Path(spec.left), Path(spec.right)):
        raise DocketError(f"{spec.right}: given as both --left and --right; to find the "
                          "duplicates within one table give it as --left alone")
    if spec.one_to_one and spec.right is None:
        raise DocketError("--one-to-one needs two tables (--left and --right)")


def _tables(spec: NewProject) -> tuple[Table, Table | None]:
    def fix(option: str) -> str:
        return f"pass the right one with {option}"
    left = load_table(spec.left, spec.left_id or spec.id_column,
                      fix("--left-id" if spec.left_id else "--id"))
    if spec.right is None:
        if len(left) < 2:  # else blocking is blamed for the pairs that cannot be
            raise DocketError(f"{spec.left}: one record, so no pair to review; deduplicating "
                              "needs two or more (or give --right to link two tables)")
        return left, None
    right = load_table(spec.right, spec.right_id or spec.id_column or
                       (left.id_column if left.id_column in read_frame(spec.right).columns
                        else None), fix("--right-id"))
    copy = copy_warning(left, right)
    if copy:
        warnings.warn(copy, UserWarning, stacklevel=3)
    return left, right


def fingerprint(left: Table, right: Table | None, li: np.ndarray, ri: np.ndarray) -> str:
    h = hashlib.sha256()
    for table in (left, right):
        if table is not None:
            h.update("\x1f".join(table.frame.index.tolist()).encode())
            h.update(b"\x1e")
    h.update(np.ascontiguousarray(li, dtype=np.int64).tobytes())
    h.update(np.ascontiguousarray(ri, dtype=np.int64).tobytes())
    return h.hexdigest()[:32]


def build(spec: NewProject, progress: Progress | None = None,
          cancel: threading.Event | None = None) -> Built:
    """Create the project described by ``spec``; see the module docstring for the guarantees."""
    def step(name: str, done: int = 1, total: int = 1) -> None:
        if cancel is not None and cancel.is_set():
            raise Cancelled(name)
        if progress:
            progress(name, done, total)

    _check(spec)
    step("reading records", 0, 2)
    left, right = _tables(spec)
    step("reading records", 2, 2)
    fields = fieldmod.resolve_fields(left.frame, None if right is None else right.frame,
                                     str(left.path), None if right is None else str(right.path),
                                     spec.column_map, spec.kinds, spec.keep_placeholders,
                                     spec.compare)
    if len(fields) > MAX_FIELDS:
        raise DocketError(f"{left.path}: {len(fields):,} fields to compare, more than the "
                          f"{MAX_FIELDS:,} a project can hold; name the columns worth comparing "
                          "with --compare COLS, or skip some with --field COL:skip")
    # compared with placeholders missing; the file keeps each value as written, for reviewers
    seen_left = _as_compared(left, fields, "left")
    seen_right = None if right is None else _as_compared(right, fields, "right")
    engine = open_engine(spec, seen_left, seen_right, fields, step)
    try:
        if len(engine) == 0 and spec.pairs_file is not None:  # Dask: self pairs dropped there
            raise DocketError(f"{spec.pairs_file}: holds no pair of two different records; "
                              "give rows of a left id and a right id, one pair per row")
        if len(engine) == 0:
            raise DocketError("no candidate pairs: the blocking rules matched no records; "
                              "try a looser rule with --block")
        step("comparing", 0, 1)
        lnorm = scoring.normalised(fields, seen_left.frame, "left")
        rnorm = lnorm if seen_right is None else scoring.normalised(fields, seen_right.frame,
                                                                    "right")
        step("measuring chance agreement")
        n_l, width = len(left), width_of(left, right)
        prepared = scoring.prepare(fields, lnorm, rnorm)
        base = random_pairs.baseline(fields, lnorm, rnorm, n_l, width, right is None,
                                     spec.seed + 7, prepared=prepared,
                                     together=together.choose_group(fields, spec.together, lnorm))
        scorer = ChunkScorer(fields, lnorm, rnorm, width, base.frequent, prepared)
        check_room([f.name for f in fields], scorer.radix, str(left.path))
        codes, counts = engine.score(scorer, lambda d, t: step("comparing", d, t))
        step("fitting the model")
        patterns = levels_of(codes, scorer.radix)
        possible = possible_pairs(left, right)
        by_rule = engine.rule_rows(codes, candidates.rule_fields(engine.rule_names, fields))
        model = fit_em(patterns, counts, base.level_names, [f.name for f in fields],
                       u_random=base.u, population=possible, together=base.together,
                       joint_u=base.joint_u, by_rule=by_rule)
        model.population = possible
        model.sampled_pairs = base.sampled
        model.frequent = base.frequent
        table = LogOddsTable.from_fs(model)
        weight, prob = table.log_odds(patterns), table.probability(patterns)
        plan = sampling.make_plan(codes, counts, prob, spec.sample_above, spec.seed)
        step("drawing the sample" if not plan.keeps_all else "drawing the audit slice")
        kept = engine.keep(plan, scorer, lambda d, t: step("comparing the kept pairs", d, t))
    finally:
        engine.close()
    sims = kept.sims if kept.sims is not None else similarities(
        scorer, kept.keys, lambda d, t: step("comparing the kept pairs", d, t))
    li, ri = scorer.positions(kept.keys)
    pattern_ix = np.searchsorted(codes, kept.codes)
    yes = prob[pattern_ix] >= spec.threshold
    hint = None if right is None or spec.one_to_one else decision_rule.one_to_one_hint(
        lnorm, rnorm, li, ri, yes)
    # over the kept pairs: a sampled project's figure is low, so it warns less, never wrongly
    crowd = None if spec.one_to_one else decision_rule.crowding(li, ri, yes, right is not None)
    if not plan.keeps_all:
        left, right, li, ri = _named_records(left, right, li, ri)

    step("drawing the audit slice")
    seed = spec.seed
    fp = fingerprint(left, right, li, ri)
    n = len(li)
    rng = np.random.default_rng(seed)
    pair_ids = rng.permutation(n) + 1  # random ids: pairs of equal priority come in random order
    # a sampled project's slice is sized for all its pairs: the estimates are of them all
    audit_n = (min(queue.default_audit_size(plan.total), n) if spec.audit is None
               else min(spec.audit, n))
    audit = sampling.weighted_to_population(
        queue.draw_audit(prob[pattern_ix], audit_n, seed + 1), plan)
    drawn = int(audit.selected.sum())
    if spec.audit is not None and drawn < spec.audit:
        unit = "pair" if drawn == 1 else "pairs"
        warnings.warn(f"--audit {spec.audit:,}: capped at {drawn:,} {unit} (the audit slice "
                      f"takes at most half of each stratum of the {n:,} candidate pairs)",
                      UserWarning, stacklevel=2)
    overlap = queue.overlap_flags(pair_ids, spec.overlap, int(fp[:8], 16))

    tmp = spec.path.with_name(f".{spec.path.name}.{os.getpid()}.building")
    remove_stale_builds(spec.path)
    for extra in ("", "-wal", "-shm", "-journal"):
        Path(f"{tmp}{extra}").unlink(missing_ok=True)
    try:
        conn = store.create_file(tmp, [f.name for f in fields])
        from .writer import write_project
        write_project(conn, spec=spec, left=left, right=right, fields=fields, li=li, ri=ri,
                      rule_ix=kept.rule_ix, rule_names=engine.rule_names, sims=sims,
                      patterns=patterns, pattern_ix=pattern_ix, counts=counts, weight=weight,
                      prob=prob, model=model, pair_ids=pair_ids, audit=audit, overlap=overlap,
                      fingerprint=fp, report=engine.report, step=step)
        sampled = plan.describe(spec.sample_above) if not plan.keeps_all else None
        store.set_meta(conn, sampling=sampled, engine=engine.name,
                       **({} if hint is None else {"one_to_one_hint": hint.to_dict()}),
                       **({} if crowd is None else {"crowding": crowd.to_dict()}))
        step("building indexes")
        store.finish_file(conn)
        step("building indexes", 1, 1)
        replace_project_file(tmp, spec.path)
    finally:
        for extra in ("", "-wal", "-shm", "-journal"):
            Path(f"{tmp}{extra}").unlink(missing_ok=True)
    n_left = engine.n_left
    return Built(spec.path, "dedupe" if right is None else "link", n_left,
                 n_left if right is None else engine.n_right, fields, engine.report, model,
                 int(audit.selected.sum()), int(overlap.sum()),
                 (left.id_column, None if right is None else right.id_column),
                 (not (spec.left_id or spec.id_column),
                  right is not None and not (spec.right_id or spec.id_column)), sampled, hint,
                 crowd)


def open_engine(spec: NewProject, left: Table, right: Table | None, fields: list[FieldSpec],
                step: Progress) -> Any:
    """The pairs, counted and ready to score: in this process or on Dask."""
    engine: Any  # an InProcess, a Spilled or a DaskEngine: all offer the same verbs
    source = (open_pairs(spec.pairs_file) if spec.engine != "dask" and spec.pairs_file is not None
              else None)
    if spec.engine == "dask":
        from .dask_engine import open_dask
        engine = open_dask(spec, left, right, fields, step)
    elif source is not None and spilled.worth_spilling(source, spec.sample_above):
        engine = spilled.Spilled(source, left, right, spec.path, spec.sample_above, spec.seed,
                                 spec.workers, step)
    else:
        if source is not None:
            keys, report = candidates.given_keys(source, left, right, step)
            rule_ix = np.zeros(len(keys), dtype=np.int16)
            rule_names = ["given"]
        else:
            rules, auto = candidates.rules_for(spec.rules, left, right, fields, spec.max_pairs,
                                               step)
            keys, rule_ix, report = candidates.blocked_keys(rules, auto, left, right, fields,
                                                            spec.max_pairs, step)
            rule_names = [str(r) for r in rules]
        engine = InProcess(keys, rule_ix, sampling.held_for(len(keys), spec.sample_above,
                                                            spec.seed), spec.workers)
        engine.report, engine.rule_names = report, rule_names
    engine.n_left, engine.n_right = len(left), width_of(left, right)
    return engine


def _as_compared(table: Table, fields: list[FieldSpec], side: str) -> Table:
    return Table(table.path, table.id_column, fieldmod.masked(table.frame, fields, side))


def _named_records(left: Table, right: Table | None, li: np.ndarray, ri: np.ndarray
                   ) -> tuple[Table, Table | None, np.ndarray, np.ndarray]:
    """Only the records that kept pairs name go into a sampled project's file."""
    def subset(table: Table, used: np.ndarray) -> Table:
        return Table(table.path, table.id_column, table.frame.iloc[used])
    if right is None:
        used = np.unique(np.concatenate([li, ri]))
        return (subset(left, used), None, np.searchsorted(used, li), np.searchsorted(used, ri))
    lu, ru = np.unique(li), np.unique(ri)
    return (subset(left, lu), subset(right, ru), np.searchsorted(lu, li),
            np.searchsorted(ru, ri))
