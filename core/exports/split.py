"""The train/test split of gold pairs: by record cluster (the default) or by pair.

``record`` (default): the records named by gold pairs are joined by every gold pair, match or
non-match, into connected components; a whole component goes to one side, drawn by a seeded
hash of its smallest record. No record appears on both sides, so a model tested on the test
side has never seen any of its records in training. The price: when a new label joins two
components that lay on different sides, the smaller one's pairs move with the other.

``pair``: a seeded hash of the pair id alone, so a pair keeps its side however many labels
arrive later and however files are merged; a record may then sit on both sides.

Either way each side gets the test share in expectation, not exactly: an exact count would
have to move pairs between sides as labels arrive.
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable, Sequence

import numpy as np

from ..errors import DocketError
from ..ordering import queue
from . import clusters as clustering

SPLIT_SALT = 0x7E57_5917  # keeps the split's hash stream apart from the overlap and the audit
SPLIT_BY = ("record", "pair")


def check_share(test_share: float) -> None:
    if not 0.0 <= test_share < 1.0:
        raise DocketError(f"--test-share {test_share}: give a share from 0 up to (not) 1")


def split_of(pair_ids: Iterable[int] | np.ndarray, test_share: float = 0.2,
             seed: int = 0) -> np.ndarray:
    """'train' or 'test' per pair: a pure function of pair id and seed (``pair`` split)."""
    check_share(test_share)
    ids = np.asarray(list(pair_ids) if not isinstance(pair_ids, np.ndarray) else pair_ids,
                     dtype=np.int64)
    u = queue.unit_hash(ids, (int(seed) * 0x9E3779B1) ^ SPLIT_SALT)
    return np.where(u < test_share, "test", "train").astype(object)


def _unit(node: str, seed: int) -> float:
    digest = hashlib.blake2b(f"{seed}\x1f{SPLIT_SALT}\x1f{node}".encode(), digest_size=8).digest()
    return (int.from_bytes(digest, "big") >> 11) / float(1 << 53)


def record_split(ends: Sequence[tuple[str, str]], test_share: float = 0.2,
                 seed: int = 0) -> np.ndarray:
    """'train' or 'test' per pair given its two record nodes, whole components to one side.

    ``ends`` holds each gold pair's two nodes, already told apart by side in link mode.
    """
    check_share(test_share)
    nodes = {n for pair in ends for n in pair}
    cluster_of = clustering.clusters(nodes, ends)
    smallest: dict[int, str] = {}
    for node in sorted(nodes):
        smallest.setdefault(cluster_of[node], node)
    side = {c: "test" if _unit(node, seed) < test_share else "train"
            for c, node in smallest.items()}
    return np.array([side[cluster_of[a]] for a, _ in ends], dtype=object)


def split(pair_ids: Sequence[int], ends: Sequence[tuple[str, str]], test_share: float,
          seed: int, by: str = "record") -> np.ndarray:
    if by not in SPLIT_BY:
        raise DocketError(f"--split-by {by}: use record or pair")
    if by == "pair":
        return split_of(pair_ids, test_share, seed)
    return record_split(ends, test_share, seed)
