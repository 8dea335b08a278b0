"""Scoring chunks of pairs on every core: forked worker processes that share the scorer.

The scorer (normalised values, prepared per-record work) is built once in this process; the
workers are forked after it, so they read it copy-on-write and nothing is pickled but each
chunk's bounds and its results. Each pair's result depends on that pair alone, so chunks may
be scored in any process and in any size: the pool's output equals one process's, byte for
byte (tests check it). Where fork is not the way processes start (or for a small build, where
starting workers costs more than it saves), the chunks run here, one after the other.
"""

from __future__ import annotations

import gc
import multiprocessing
import os
import signal
import sys
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..matching import compare, scoring
from ..ordering.queue import unit_hash
from ..ordering.sampling import Held

POOL_FROM = 200_000  # fewer pairs than this: one process (a pool saves less than it costs)
TASK = 250_000  # at most this many pairs per task; fewer when there are few per worker


def cores() -> int:
    """The cores this process may run on."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not offered on this platform
        return os.cpu_count() or 1


def can_fork() -> bool:
    # fork is safe with numpy and the string scorer on Linux; elsewhere (macOS system
    # libraries, Windows) the workers would have to start afresh and rebuild the scorer
    return sys.platform.startswith("linux") and "fork" in multiprocessing.get_all_start_methods()


@dataclass
class Scored:
    """One chunk's results: pattern codes of all its pairs, similarities of the held ones."""

    start: int
    codes: np.ndarray
    held: np.ndarray  # positions within the chunk whose similarities are in ``sims``
    sims: np.ndarray


def score_chunk(scorer: Any, keys: np.ndarray, start: int, held: Held) -> Scored:
    sims, levels = scorer.compare(keys)
    codes = scoring.pattern_codes(levels, scorer.radix)
    if held.all:
        return Scored(start, codes, np.arange(len(keys)), sims)
    if held.below <= 0.0:
        return Scored(start, codes, np.zeros(0, dtype=np.int64), sims[:0])
    ix = np.flatnonzero(unit_hash(keys, held.salt) < held.below)
    return Scored(start, codes, ix, sims[ix])


_JOB: dict[str, Any] = {}  # the scorer and keys, set before the workers are forked


def _start_worker() -> None:
    # Ctrl-C is the build's to handle (it ends the pool); a worker would print a traceback
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    # the pool ends its workers with SIGTERM: the front end's handler, forked with them, would
    # turn that into a KeyboardInterrupt and a traceback from each
    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), signal.SIG_DFL)
    compare.use_threads(1)  # the pool has a process per core already


def _work(bounds: tuple[int, int]) -> Scored:
    start, stop = bounds
    return score_chunk(_JOB["scorer"], _JOB["keys"][start:stop], start, _JOB["held"])


def chunks(n: int, workers: int) -> list[tuple[int, int]]:
    size = TASK if workers <= 1 else max(1, min(TASK, -(-n // (4 * workers))))
    return [(s, min(n, s + size)) for s in range(0, n, size)]


def workers_for(n: int, workers: int | None) -> int:
    """How many processes score ``n`` pairs: ``workers`` (default every core), one when the
    build is small or processes cannot be forked here."""
    wanted = cores() if workers is None else max(1, int(workers))
    return wanted if wanted > 1 and n >= POOL_FROM and can_fork() else 1


def score_all(scorer: Any, keys: np.ndarray, held: Held, workers: int,
              progress: Callable[[int, int], None] | None = None) -> Iterator[Scored]:
    """Every chunk's results in order of position, on ``workers`` processes."""
    n = len(keys)
    bounds = chunks(n, workers)
    if workers <= 1:
        for start, stop in bounds:
            yield score_chunk(scorer, keys[start:stop], start, held)
            if progress:
                progress(stop, n)
        return
    _JOB.update(scorer=scorer, keys=keys, held=held)
    gc.freeze()  # the workers' collector then leaves the shared objects (and their pages) alone
    try:
        with multiprocessing.get_context("fork").Pool(workers, initializer=_start_worker) as pool:
            for part in pool.imap(_work, bounds):
                yield part
                if progress:
                    progress(part.start + len(part.codes), n)
    finally:
        gc.unfreeze()
        _JOB.clear()
