"""``--engine dask``: blocking joins and scoring as Dask DataFrame partitions.

Every partition runs the same pure functions as the in-process path (``pair_files.keys_of``,
``blocking.rule_keys`` for each record's keys, ``ChunkScorer.codes``, ``sampling.pick``), so
both engines give the same pairs, levels and probabilities. Only pattern counts and the
kept sample come back to this process; the pairs stay on the workers.

Dask and distributed are an optional extra: ``pip install 'docket[dask]'``.
"""

from __future__ import annotations

import logging
import os
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager, suppress
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching import compare
from ..matching.rule_classes import RuleRows
from ..ordering.sampling import SamplePlan, pick
from ..pairs import blocking
from ..pairs.candidates import possible_pairs, rules_for, width_of
from ..pairs.pair_files import _text, id_batches, keys_of, open_pairs, refuse_headless
from ..records.sources import Table
from ..types import FieldSpec
from .pair_stream import CHUNK, ChunkScorer, Kept, order_kept

INSTALL = ("--engine dask needs Dask, an optional extra: pip install 'docket[dask]' "
           "(or pip install 'dask[dataframe]' distributed)")


def _modules() -> tuple[Any, Any]:
    try:
        import dask
        import dask.dataframe as dd
        import distributed  # noqa: F401 - the scheduler the engine runs on
    except ImportError:
        raise DocketError(INSTALL) from None
    return dask, dd


def connect(workers: int, scheduler: str | None) -> tuple[Any, Any]:
    """A client on ``scheduler``, or on a new local cluster of ``workers`` processes."""
    _modules()
    from distributed import Client, LocalCluster
    if scheduler:
        try:
            return Client(scheduler, timeout="10s"), None
        except (OSError, TimeoutError) as exc:
            raise DocketError(f"--scheduler {scheduler}: cannot reach it ({exc}); check the "
                              "address and that the scheduler is running") from None
    if workers < 1:
        raise DocketError(f"--workers {workers}: give 1 or more")
    # a task that fails comes back to the client as its exception, which the command words
    # in one line; the worker's own ERROR log printed it first, with a traceback
    from distributed.deploy.spec import SpecCluster
    before = set(SpecCluster._instances)
    try:
        with _workers_write_nowhere():
            cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                                   dashboard_address=":0", silence_logs=logging.CRITICAL)
    except BaseException:
        _drop_half_started(before)
        raise
    # a Ctrl-C ends the client's pending gathers, and asyncio logs each with a traceback
    # ('Task exception was never retrieved ... AllExit') before the command's one line
    logging.getLogger("asyncio").setLevel(logging.CRITICAL)
    # the scheduler, here in this process, times every garbage collection from a callback,
    # which swallows a KeyboardInterrupt raised in it ('Exception ignored in ... GCDiagnosis');
    # a Ctrl-C or SIGTERM was lost so, and a 'new --force' went on to replace the project.
    # Its only use is a log line, silenced above.
    from distributed.gc import disable_gc_diagnosis
    disable_gc_diagnosis(force=True)
    return Client(cluster), cluster


@contextmanager
def _workers_write_nowhere() -> Iterator[None]:
    """Start the worker processes with standard error sent to the null device, which they
    inherit and keep. The terminal sends Ctrl-C to every process of the command, and each
    worker printed its tracebacks (up to 99 lines) before docket's own line; their logs are
    silenced already, and a task's failure comes back to this process as its exception.
    (Ignoring Ctrl-C while they started dropped a Ctrl-C pressed meanwhile: a 'new --force'
    then went on and replaced the project.)"""
    sys.stderr.flush()
    saved, nowhere = os.dup(2), os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(nowhere, 2)
        yield
    finally:
        os.dup2(saved, 2)
        os.close(saved)
        os.close(nowhere)


def _drop_half_started(before: set) -> None:
    # a stop signal during the start left a cluster half made (never handed back to be
    # closed), which distributed's exit hook then failed to close, with a traceback
    # ('AssertionError: Status.init') after the command's line. Only the one begun here:
    # closing every cluster of the process also closed a caller's own
    from distributed.deploy.spec import SpecCluster
    for cluster in set(SpecCluster._instances) - before:
        with suppress(Exception):
            cluster.close(timeout=5)
        cluster.shutdown_on_close = False


# -- per-partition functions (module level: the workers import them) -------------------------
def _keys_part(frame: pd.DataFrame, lindex: pd.Index, rindex: pd.Index, dedupe: bool,
               where: str, names: tuple[str, str]) -> pd.DataFrame:
    a, b = _text(frame.iloc[:, 0]).reset_index(drop=True), _text(frame.iloc[:, 1])
    keys = keys_of(where, a, b.reset_index(drop=True), lindex, rindex, dedupe, *names)
    return pd.DataFrame({"key": keys, "rule": np.zeros(len(keys), dtype=np.int16)})


def _joined_part(frame: pd.DataFrame, dedupe: bool, width: int, rule: int) -> pd.DataFrame:
    li = frame["pos_l"].to_numpy(np.int64)
    ri = frame["pos_r"].to_numpy(np.int64)
    if dedupe:
        keep = li < ri
        li, ri = li[keep], ri[keep]
    return pd.DataFrame({"key": li * np.int64(width) + ri,
                         "rule": np.full(len(li), rule, dtype=np.int16)})


def _codes_part(frame: pd.DataFrame, scorer: ChunkScorer) -> pd.DataFrame:
    with compare.one_thread():  # Dask runs a task per core already
        return frame.assign(code=scorer.codes(frame["key"].to_numpy()))


def _pick_part(frame: pd.DataFrame, plan: SamplePlan) -> pd.DataFrame:
    return frame.iloc[pick(frame["key"].to_numpy(), frame["code"].to_numpy(), plan)]


SHUFFLE = "tasks"  # the task-based shuffle: no extra services needed on the workers
KEY_META = pd.DataFrame({"key": pd.Series(dtype="int64"), "rule": pd.Series(dtype="int16")})


class DaskEngine:
    """The candidate pairs as a persisted Dask DataFrame of (key, rule[, code])."""

    name = "dask"

    def __init__(self, client: Any, cluster: Any, frame: Any, report: blocking.BlockingReport,
                 rule_names: list[str]) -> None:
        self.client, self.cluster = client, cluster
        self.frame = frame.persist()
        self.n = int(self.frame.shape[0].compute())
        self.report, self.rule_names = report, rule_names
        self.report.pairs = self.n
        if report.per_rule.keys() == {"given"}:
            self.report.per_rule = {"given": self.n}

    def __len__(self) -> int:
        return self.n

    def score(self, scorer: ChunkScorer, progress: Callable[[int, int], None] | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
        meta = KEY_META.assign(code=pd.Series(dtype="int64"))
        shared = self.client.scatter(scorer, broadcast=True)  # once per worker, not per task
        self.frame = self.frame.map_partitions(_codes_part, shared, meta=meta).persist()
        counts = self.frame["code"].value_counts().compute().sort_index()
        if progress:
            progress(1, 1)
        return counts.index.to_numpy(np.int64), counts.to_numpy(np.int64)

    def rule_rows(self, codes: np.ndarray, keys: list[list[str]]) -> RuleRows | None:
        """After :meth:`score`: the pairs counted by pattern and by the rule that found them."""
        if len(keys) < 2:
            return None
        sizes = self.frame.groupby(["code", "rule"]).size().compute()
        joint = sizes.index.get_level_values(0).to_numpy(np.int64)
        rules = sizes.index.get_level_values(1).to_numpy(np.int64)
        return RuleRows.of(joint, rules, codes, keys, sizes.to_numpy())

    def keep(self, plan: SamplePlan, scorer: Any = None, progress: Any = None) -> Kept:
        """The kept pairs; their similarities are compared again by the caller."""
        part = self.frame.map_partitions(_pick_part, self.client.scatter(plan, broadcast=True),
                                         meta=self.frame._meta)
        got = part.compute()
        got = got.iloc[pick(got["key"].to_numpy(), got["code"].to_numpy(), plan)]
        return order_kept(got["key"].to_numpy(np.int64), got["rule"].to_numpy(np.int16),
                          got["code"].to_numpy(np.int64))

    def close(self) -> None:
        self.client.close()
        if self.cluster is not None:
            self.cluster.close()


def _partitions(rows: int, workers: int) -> int:
    return max(2 * max(1, workers), -(-rows // CHUNK))


def _given(spec: Any, left: Table, right: Table | None, dd: Any, client: Any,
           workers: int) -> Any:
    source = open_pairs(spec.pairs_file)
    other = left if right is None else right
    lindex, rindex = pd.Index(left.frame.index), pd.Index(other.frame.index)
    names = (left.path.name, other.path.name)
    if not source.is_parquet:  # a text file is read here; its keys are spread to the workers
        _, a, b = next(id_batches(source))
        refuse_headless(source, lindex, rindex)
        keys = _keys_part(pd.DataFrame({"a": a, "b": b}), lindex, rindex, right is None,
                          str(spec.pairs_file), names)
        frame = dd.from_pandas(keys, npartitions=_partitions(len(keys), workers))
    else:
        raw = dd.read_parquet([str(p) for p in source.parts], columns=list(source.columns))
        frame = raw.map_partitions(_keys_part, client.scatter(lindex, broadcast=True),
                                   client.scatter(rindex, broadcast=True), right is None,
                                   str(spec.pairs_file), names, meta=KEY_META)
    n = max(1, frame.npartitions)
    frame = frame.drop_duplicates(subset=["key"], split_out=n, shuffle_method=SHUFFLE)
    report = blocking.BlockingReport(["given"], False, 0, possible_pairs(left, right),
                                     {"given": 0})
    return frame, report, ["given"]


def _blocked(spec: Any, left: Table, right: Table | None, fields: list[FieldSpec], dd: Any,
             dask: Any, workers: int, step: Callable[..., None]) -> Any:
    rules, auto = rules_for(spec.rules, left, right, fields, spec.max_pairs, step)
    width = width_of(left, right)
    parts = []
    for i, rule in enumerate(rules):
        rframe = None if right is None else right.frame
        if rule.keys[0].func in ("near", "every"):  # found here: no key to join on
            li, ri = blocking.rule_pairs(rule, left.frame, rframe, fields, spec.max_pairs)
            near = pd.DataFrame({"pos_l": li, "pos_r": ri})
            parts.append(dd.from_pandas(_joined_part(near, False, width, i),
                                        npartitions=_partitions(len(near), workers)))
            step("blocking", i + 1, len(rules))
            continue
        lk, rk = blocking.rule_keys(rule, left.frame, rframe, fields, spec.max_pairs)
        lhs = dd.from_pandas(lk, npartitions=_partitions(len(lk), workers))
        joined = lhs.merge(lk if rk is None else rk, on="key", suffixes=("_l", "_r"))
        parts.append(joined.map_partitions(_joined_part, right is None, width, i,
                                           meta=KEY_META).drop_duplicates(subset=["key"],
                                                                          shuffle_method=SHUFFLE))
        step("blocking", i + 1, len(rules))
    parts = list(dask.persist(*parts))  # joined once; counted and unioned from memory
    per_rule = dask.compute(*[p.shape[0] for p in parts])
    whole = dd.concat(parts)
    frame = whole.groupby("key", sort=False)["rule"].min(
        split_out=_partitions(int(sum(per_rule)), workers), shuffle_method=SHUFFLE)
    frame = frame.reset_index().astype({"key": "int64", "rule": "int16"})
    report = blocking.BlockingReport([str(r) for r in rules], auto, 0,
                                     possible_pairs(left, right),
                                     {str(r): int(n) for r, n in zip(rules, per_rule,
                                                                     strict=True)})
    return frame, report, [str(r) for r in rules]


def open_dask(spec: Any, left: Table, right: Table | None, fields: list[FieldSpec],
              step: Callable[..., None]) -> DaskEngine:
    dask, dd = _modules()
    client, cluster = connect(2 if spec.workers is None else spec.workers, spec.scheduler)
    try:
        workers = max(1, len(client.scheduler_info().get("workers", {})))
        if spec.pairs_file is not None:
            step("reading candidate pairs")
            frame, report, names = _given(spec, left, right, dd, client, workers)
        else:
            frame, report, names = _blocked(spec, left, right, fields, dd, dask, workers, step)
        engine = DaskEngine(client, cluster, frame, report, names)
        if spec.pairs_file is None:
            blocking.check_total(engine.n, spec.max_pairs)
        return engine
    except BaseException:
        client.close()
        if cluster is not None:
            cluster.close()
        raise
