"""A pairs file too large to hold: its keys spread over bucket files on disk, one bucket at a time.

Memory must not grow with the pairs: a file of a hundred million pairs would otherwise hold
18 bytes per pair (key, rule, pattern code) and the sort copies of finding repeats. Each pair key
goes to the bucket its hash names, so every sighting of a pair lands in the same bucket and
repeats are found bucket by bucket, exactly. Scoring reads one bucket, writes its pattern codes
beside it and counts them; the sample keeps each stratum's lowest hashes, and the bottom-k of a
bucket's bottom-k joined with the others' is the global one (see ``ordering.sampling``), so the
kept pairs are those an in-memory build keeps, in the same order. Held in memory at any time:
one bucket (about ``BUCKET`` pairs), the kept sample and the similarities the scoring pass holds
for it. The buckets live in a hidden folder beside the project file and are removed at the end.
"""

from __future__ import annotations

import os
import shutil
from collections.abc import Callable, Iterator
from contextlib import ExitStack, contextmanager
from pathlib import Path

import numpy as np

from ..errors import DocketError
from ..ordering.queue import unit_hash
from ..ordering.sampling import Held, SamplePlan, held_for, pick
from ..pairs.candidates import GivenReader, Step, first_seen
from ..pairs.pair_files import PairSource
from ..records.sources import Table
from .file_health import no_room
from .pair_stream import ChunkScorer, Kept, held_or_compared, order_kept
from .score_pool import score_all, workers_for

BUCKET = 2_000_000  # pairs per bucket, read at most twice as large by chance
BUCKET_SALT = 0xB0C4E7


def spill_folder(target: Path) -> Path:
    return target.with_name(f".{target.name}.{os.getpid()}.spill")


def bucket_of(keys: np.ndarray, n: int) -> np.ndarray:
    """A bucket per key, spread evenly whatever the keys' pattern (the pair hash of the queue,
    with a salt of its own so that buckets do not follow the sample's hash)."""
    return (unit_hash(keys, BUCKET_SALT) * n).astype(np.int64)


class Spilled:
    """The engine of ``pair_stream.InProcess`` for given pairs, with the pairs on disk."""

    name = "in-process"

    def __init__(self, source: PairSource, left: Table, right: Table | None, target: Path,
                 sample_above: int, seed: int, workers: int | None, step: Step,
                 bucket: int | None = None) -> None:
        reader = GivenReader(source, left, right)
        self.folder = spill_folder(target)
        shutil.rmtree(self.folder, ignore_errors=True)
        self.folder.mkdir(mode=0o700)  # pairs of personal records: the owner's alone
        try:
            self.n_buckets = max(1, -(-reader.source.rows // (bucket or BUCKET)))
            with self._room():
                self._spread(reader, step)
                self.n = self._dedupe(reader)
        except BaseException:
            self.close()
            raise
        self.report, self.rule_names = reader.report(self.n), ["given"]
        self.held: Held = held_for(self.n, sample_above, seed)
        self.workers = workers_for(self.n, workers)
        self.held_keys = np.zeros(0, dtype=np.int64)
        self.held_sims: np.ndarray | None = None

    @contextmanager
    def _room(self) -> Iterator[None]:
        # numpy's 'OSError: 118591 requested and 68608 written' ended a build in a traceback
        try:
            yield
        except OSError as exc:
            why = ("the disk is full" if no_room(exc) or "requested and" in str(exc)
                   else f"{exc.strerror or exc}")
            raise DocketError(f"{self.folder.parent}: cannot set the pairs aside beside the "
                              f"project ({why}; they take 16 bytes a pair while read); nothing "
                              "was saved; free some space and try again") from None

    def _file(self, b: int, what: str) -> Path:
        return self.folder / f"{b}.{what}"

    def _spread(self, reader: GivenReader, step: Step) -> None:
        with ExitStack() as files:
            outs = [(files.enter_context(open(self._file(b, "keys"), "wb")),
                     files.enter_context(open(self._file(b, "read"), "wb")))
                    for b in range(self.n_buckets)]
            for keys, read in reader.batches(step):
                which = bucket_of(keys, self.n_buckets)
                order = np.argsort(which, kind="stable")  # row order kept within a bucket
                bounds = np.searchsorted(which[order], np.arange(self.n_buckets + 1))
                for b, (kf, rf) in enumerate(outs):
                    sl = order[bounds[b]:bounds[b + 1]]
                    keys[sl].tofile(kf)
                    read[sl].tofile(rf)

    def _dedupe(self, reader: GivenReader) -> int:
        """Each bucket's distinct keys, sorted, in place of its sightings; the repeats named."""
        n = n_again = 0
        again_rows: list[int] = []
        for b in range(self.n_buckets):
            keys = np.fromfile(self._file(b, "keys"), dtype=np.int64)
            read = np.fromfile(self._file(b, "read"), dtype=np.int64)
            distinct, again = first_seen(keys, read)
            n_again += len(again)
            again_rows = sorted(again_rows + again[:5].tolist())[:5]
            distinct.tofile(self._file(b, "keys"))
            self._file(b, "read").unlink()
            n += len(distinct)
        if not n:  # said as the in-memory build says it, not as blocking that found nothing
            raise reader.nothing_left()
        reader.warn(n_again, again_rows)
        return n

    def __len__(self) -> int:
        return self.n

    def rule_rows(self, codes: np.ndarray, keys: list[list[str]]) -> None:
        """Given pairs have no rule: EM reads them as one population."""
        return None

    def _keys(self, b: int) -> np.ndarray:
        return np.fromfile(self._file(b, "keys"), dtype=np.int64)

    def score(self, scorer: ChunkScorer, progress: Callable[[int, int], None] | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
        """Distinct pattern codes (sorted) and how many pairs have each, over every bucket."""
        found: dict[int, int] = {}
        held_keys, held_sims = [], []
        done = 0
        for b in range(self.n_buckets):
            keys = self._keys(b)
            codes = np.empty(len(keys), dtype=np.int64)

            def step(d: int, _t: int, base: int = done) -> None:
                if progress:
                    progress(base + d, self.n)

            for part in score_all(scorer, keys, self.held, self.workers, step):
                codes[part.start:part.start + len(part.codes)] = part.codes
                held_keys.append(keys[part.start + part.held])
                held_sims.append(part.sims)
            with self._room():
                codes.tofile(self._file(b, "codes"))
            for c, k in zip(*np.unique(codes, return_counts=True), strict=True):
                found[int(c)] = found.get(int(c), 0) + int(k)
            done += len(keys)
        if held_keys:
            hk = np.concatenate(held_keys)
            order = np.argsort(hk)
            self.held_keys = hk[order]
            self.held_sims = np.concatenate(held_sims)[order]
        codes_out = np.array(sorted(found), dtype=np.int64)
        return codes_out, np.array([found[c] for c in codes_out.tolist()], dtype=np.int64)

    def keep(self, plan: SamplePlan, scorer: ChunkScorer | None = None,
             progress: Callable[[int, int], None] | None = None) -> Kept:
        """The global sample, picked bucket by bucket with the picks so far (never more than
        twice the sample in memory), with the similarities the scoring pass held."""
        keys = np.zeros(0, dtype=np.int64)
        codes = np.zeros(0, dtype=np.int64)
        for b in range(self.n_buckets):
            keys = np.concatenate([keys, self._keys(b)])
            codes = np.concatenate([codes, np.fromfile(self._file(b, "codes"), dtype=np.int64)])
            ix = pick(keys, codes, plan)
            keys, codes = keys[ix], codes[ix]
        order = np.argsort(keys)
        keys, codes = keys[order], codes[order]
        sims = None if scorer is None else held_or_compared(
            self.held_keys, self.held_sims, keys, keys, scorer, progress, self.workers)
        self.held_sims = None
        return order_kept(keys, np.zeros(len(keys), dtype=np.int16), codes, sims)

    def close(self) -> None:
        shutil.rmtree(self.folder, ignore_errors=True)


def worth_spilling(source: PairSource, sample_above: int) -> bool:
    """More rows than a project keeps: Parquet only (a text file of pairs is read whole)."""
    return source.is_parquet and source.rows > sample_above
