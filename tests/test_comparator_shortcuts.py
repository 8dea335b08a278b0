"""The shortcuts the scorer takes give exactly what the plain computation gives: each is
checked against rapidfuzz called directly, or against the slower path it replaces."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from rapidfuzz import process
from rapidfuzz.distance import OSA

from docket.core.matching import compare, word_match
from docket.core.records import normalise

CODES = st.text(st.sampled_from(list("ab1-9 éß")), min_size=1, max_size=9)
NAMES = st.lists(st.sampled_from(["ann", "anne", "li", "bo", "lee", "zoë", "o", "marie"]),
                 min_size=1, max_size=4).map(" ".join)


@settings(max_examples=150, deadline=None)
@given(st.lists(st.tuples(CODES, CODES), min_size=1, max_size=30))
def test_code_similarity_from_one_distance_pass_is_rapidfuzzs(pairs: list) -> None:
    a, b = [x for x, _ in pairs], [y for _, y in pairs]
    sim, dist = compare._code_similarity(a, b)
    want = process.cpdist(a, b, scorer=OSA.normalized_similarity, dtype=np.float32)
    assert np.array_equal(sim, want)  # bit for bit, not merely close
    assert np.array_equal(dist, process.cpdist(a, b, scorer=OSA.distance))


@settings(max_examples=150, deadline=None)
@given(st.lists(st.tuples(NAMES, NAMES), min_size=1, max_size=30))
def test_names_split_by_arrow_score_as_split_by_python(pairs: list) -> None:
    a, b = [x for x, _ in pairs], [y for _, y in pairs]
    corpus = list(dict.fromkeys(a + b))
    at = {v: i for i, v in enumerate(corpus)}
    ia = np.array([at[v] for v in a])
    ib = np.array([at[v] for v in b])
    arrow = word_match.best_match(word_match.name_words(corpus, spaced=True), ia, ib)
    python = word_match.best_match(word_match.name_words(corpus), ia, ib)
    assert np.array_equal(arrow, python)
    assert np.array_equal(python, word_match.word_best_match(a, b))


@settings(max_examples=100, deadline=None)
@given(st.lists(st.tuples(NAMES, NAMES), min_size=1, max_size=20), st.sampled_from(
    ["name", "code", "text", "longtext"]))
def test_equal_values_skip_scoring_but_not_their_level(pairs: list, kind: str) -> None:
    # Equal values are level 0 at 1.0 without being scored; the others as when scored alone.
    a = np.array([normalise.NORMALISERS[kind](x) for x, _ in pairs], dtype=object)
    b = np.array([normalise.NORMALISERS[kind](y) for _, y in pairs], dtype=object)
    sim, lv = compare.compare_values(kind, a, b)
    same = a == b
    assert (lv[same] == 0).all() and (sim[same] == 1.0).all()
    assert (lv[~same] > 0).all() and (sim[~same] < 1.0).all()
