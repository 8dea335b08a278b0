"""Clusters of records joined by matches, and the clusters that contradict a gold non-match.

Matching is transitive once records are grouped: if a matches b and b matches c, all three are
taken as one entity, whether or not a and c were ever compared. A cluster is therefore a
connected component of the graph whose nodes are records and whose edges are matches. A gold
non-match whose two records land in the same cluster is a *conflict*: some chain of matches
says they are one entity while a reviewer said they are not.

Link mode: records from the two sides share one id space here, so the caller prefixes ids
before calling (for example "L:" + left id and "R:" + right id); otherwise a left record and a
right record with the same id would be merged.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass


@dataclass(frozen=True)
class Conflict:
    """A cluster holding at least one gold non-match between two of its members."""

    cluster: int
    members: tuple[str, ...]  # sorted
    non_matches: tuple[tuple[str, str], ...]  # each pair sorted, the list sorted, no repeats


class _UnionFind:
    def __init__(self, items: Iterable[str]) -> None:
        self.parent: dict[str, str] = {i: i for i in items}
        self.size: dict[str, int] = dict.fromkeys(self.parent, 1)

    def find(self, x: str) -> str:
        root = x
        while self.parent[root] != root:
            root = self.parent[root]
        while self.parent[x] != root:  # path compression keeps later finds near constant
            self.parent[x], x = root, self.parent[x]
        return root

    def union(self, a: str, b: str) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return
        if self.size[ra] < self.size[rb]:
            ra, rb = rb, ra
        self.parent[rb] = ra
        self.size[ra] += self.size[rb]


def clusters(record_ids: Iterable[str], matches: Iterable[tuple[str, str]]) -> dict[str, int]:
    """Cluster id of every record: the connected components of the match graph.

    Every record in ``record_ids`` gets an id; records in no match are singletons. Ids are
    0, 1, 2, ... in the sorted order of each cluster's smallest record id, so the result does
    not depend on the order of records or matches. A match naming a record missing from
    ``record_ids`` raises ValueError (in link mode this usually means a missing side prefix).
    """
    uf = _UnionFind(record_ids)
    for a, b in matches:
        for r in (a, b):
            if r not in uf.parent:
                raise ValueError(f"match ({a!r}, {b!r}) names record {r!r}, not in record_ids")
        uf.union(a, b)
    smallest: dict[str, str] = {}
    for r in uf.parent:
        root = uf.find(r)
        if root not in smallest or r < smallest[root]:
            smallest[root] = r
    number = {root: i for i, root in enumerate(sorted(smallest, key=smallest.__getitem__))}
    return {r: number[uf.find(r)] for r in sorted(uf.parent)}


def cluster_members(cluster_of: Mapping[str, int]) -> dict[int, tuple[str, ...]]:
    """Sorted members of each cluster, by cluster id."""
    members: dict[int, list[str]] = {}
    for r, c in cluster_of.items():
        members.setdefault(c, []).append(r)
    return {c: tuple(sorted(members[c])) for c in sorted(members)}


def conflicts(
    cluster_of: Mapping[str, int], non_matches: Iterable[tuple[str, str]]
) -> list[Conflict]:
    """Clusters that contain both records of some gold non-match, ordered by cluster id.

    A non-match naming a record missing from ``cluster_of`` raises ValueError.
    """
    offending: dict[int, set[tuple[str, str]]] = {}
    for a, b in non_matches:
        for r in (a, b):
            if r not in cluster_of:
                raise ValueError(f"non-match ({a!r}, {b!r}) names record {r!r}, not clustered")
        if cluster_of[a] == cluster_of[b]:
            pair = (a, b) if a <= b else (b, a)
            offending.setdefault(cluster_of[a], set()).add(pair)
    if not offending:
        return []
    members = cluster_members(cluster_of)
    return [Conflict(c, members[c], tuple(sorted(offending[c]))) for c in sorted(offending)]
