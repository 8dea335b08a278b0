"""Clusters from matches and conflicts with gold non-matches."""

from __future__ import annotations

import random
from collections import deque

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from docket.core.exports.clusters import Conflict, cluster_members, clusters, conflicts

IDS = [f"r{i:02d}" for i in range(25)]
edges = st.lists(st.tuples(st.sampled_from(IDS), st.sampled_from(IDS)), max_size=40)


def bfs_components(ids: list[str], matches: list[tuple[str, str]]) -> set[frozenset[str]]:
    """A plain breadth-first reference, written independently of the union–find."""
    nbrs: dict[str, set[str]] = {i: set() for i in ids}
    for a, b in matches:
        nbrs[a].add(b)
        nbrs[b].add(a)
    seen: set[str] = set()
    out = set()
    for start in ids:
        if start in seen:
            continue
        comp, todo = {start}, deque([start])
        while todo:
            for n in nbrs[todo.popleft()] - comp:
                comp.add(n)
                todo.append(n)
        seen |= comp
        out.add(frozenset(comp))
    return out


def as_sets(cluster_of: dict[str, int]) -> set[frozenset[str]]:
    return {frozenset(m) for m in cluster_members(cluster_of).values()}


def test_small_example() -> None:
    got = clusters(["d", "a", "c", "b", "e"], [("c", "a"), ("e", "d")])
    # numbered by each cluster's smallest id in sorted order: {a, c} 0, {b} 1, {d, e} 2
    assert got == {"a": 0, "b": 1, "c": 0, "d": 2, "e": 2}
    assert conflicts(got, [("a", "b"), ("c", "a"), ("a", "c"), ("e", "d")]) == [
        Conflict(0, ("a", "c"), (("a", "c"),)),
        Conflict(2, ("d", "e"), (("d", "e"),)),
    ]


def test_link_mode_prefixes_keep_the_sides_apart() -> None:
    ids = ["L:1", "L:2", "R:1", "R:2"]
    got = clusters(ids, [("L:1", "R:2")])
    assert got["L:1"] == got["R:2"] and got["L:1"] != got["R:1"]
    with pytest.raises(ValueError, match="not in record_ids"):
        clusters(ids, [("L:1", "2")])  # an unprefixed id is caught, not silently added
    with pytest.raises(ValueError, match="not clustered"):
        conflicts(got, [("L:1", "x")])


@settings(max_examples=100, deadline=None)
@given(matches=edges)
def test_every_match_lies_inside_one_cluster(matches: list[tuple[str, str]]) -> None:
    got = clusters(IDS, matches)
    assert set(got) == set(IDS)
    assert all(got[a] == got[b] for a, b in matches)


@settings(max_examples=100, deadline=None)
@given(matches=edges)
def test_clusters_are_the_connected_components(matches: list[tuple[str, str]]) -> None:
    got = clusters(IDS, matches)
    assert as_sets(got) == bfs_components(IDS, matches)
    # reference library: scipy.sparse.csgraph.connected_components
    index = {r: i for i, r in enumerate(IDS)}
    rows = [index[a] for a, _ in matches]
    cols = [index[b] for _, b in matches]
    graph = coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(len(IDS), len(IDS)))
    n, labels = connected_components(graph, directed=False)
    assert len(set(got.values())) == n
    same = {(a, b) for a in IDS for b in IDS if labels[index[a]] == labels[index[b]]}
    assert same == {(a, b) for a in IDS for b in IDS if got[a] == got[b]}


@settings(max_examples=100, deadline=None)
@given(matches=edges)
def test_ids_count_up_from_the_smallest_member(matches: list[tuple[str, str]]) -> None:
    members = cluster_members(clusters(IDS, matches))
    assert list(members) == list(range(len(members)))
    firsts = [m[0] for m in members.values()]
    assert firsts == sorted(firsts)


@settings(max_examples=100, deadline=None)
@given(matches=edges, non_matches=edges, seed=st.integers(0, 2**32 - 1))
def test_order_of_the_input_does_not_matter(
    matches: list[tuple[str, str]], non_matches: list[tuple[str, str]], seed: int
) -> None:
    rng = random.Random(seed)
    shuffled = [(b, a) if rng.random() < 0.5 else (a, b) for a, b in matches]
    rng.shuffle(shuffled)
    ids = list(IDS)
    rng.shuffle(ids)
    first, second = clusters(IDS, matches), clusters(ids, shuffled)
    assert first == second
    flipped = [(b, a) for a, b in reversed(non_matches)]
    assert conflicts(first, non_matches) == conflicts(second, flipped)


@settings(max_examples=100, deadline=None)
@given(matches=edges, non_matches=edges)
def test_conflicts_are_exactly_the_clusters_holding_a_non_match(
    matches: list[tuple[str, str]], non_matches: list[tuple[str, str]]
) -> None:
    got = clusters(IDS, matches)
    found = conflicts(got, non_matches)
    expected = {got[a] for a, b in non_matches if got[a] == got[b]}
    assert [c.cluster for c in found] == sorted(expected)
    members = cluster_members(got)
    for c in found:
        assert c.members == members[c.cluster]
        wanted = {tuple(sorted(p)) for p in non_matches if got[p[0]] == got[p[1]] == c.cluster}
        assert set(c.non_matches) == wanted and len(c.non_matches) == len(wanted)
