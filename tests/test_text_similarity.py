"""TF-IDF cosine for long text and nearest-neighbour candidate pairs, against outside values."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.matching import compare
from docket.core.pairs import blocking
from docket.core.pairs.neighbours import near_pairs
from docket.core.pairs.word_keys import known_runs, word_keys
from docket.core.records import text_vectors
from docket.core.types import FieldSpec


def test_word_cosine_worked_example() -> None:
    # Worked by hand from scikit-learn's documented smooth idf, idf(t) = ln((1 + n) /
    # (1 + df(t))) + 1 (scikit-learn user guide, "Tf–idf term weighting"), with rows scaled to
    # unit length: "red apple" / "red pear", n = 2: idf(red) = 1, idf(apple) = idf(pear) =
    # ln(3 / 2) + 1, so the cosine is 1 / (1 + (ln 1.5 + 1)^2).
    vec = text_vectors.vectors(["red apple"], ["red pear"], "word")
    got = text_vectors.row_cosine(vec.left, vec.right, np.array([0]), np.array([0]))
    assert got[0] == pytest.approx(1 / (1 + (math.log(1.5) + 1) ** 2), rel=1e-5)


def test_row_cosine_agrees_with_scikit_learn() -> None:
    # Reference: sklearn.metrics.pairwise.cosine_similarity on the same TF-IDF rows.
    from sklearn.feature_extraction.text import TfidfVectorizer
    from sklearn.metrics.pairwise import cosine_similarity

    left = ["query optimisation in parallel databases", "mining association rules",
            "a survey of record linkage"]
    right = ["parallel database query optimization", "fast mining of association rules",
             "record linkage: a survey", "unrelated title"]
    vec = text_vectors.vectors(left, right, "char")
    ia, ib = np.repeat(np.arange(3), 4), np.tile(np.arange(4), 3)
    ours = text_vectors.row_cosine(vec.left, vec.right, ia, ib)
    ref = TfidfVectorizer(analyzer="char_wb", ngram_range=(3, 3), sublinear_tf=True)
    rows = ref.fit_transform(list(dict.fromkeys(left + right)))
    expected = cosine_similarity(rows[:3], rows[3:]).reshape(-1)
    assert ours == pytest.approx(expected, abs=1e-5)


def test_long_text_similarity_ranks_reworded_titles_above_others() -> None:
    a = np.array(["query optimisation in parallel databases"] * 2, dtype=object)
    b = np.array(["parallel database query optimization", "mining association rules"],
                 dtype=object)
    sim, _ = compare.compare_values("longtext", a, b)
    assert sim[0] > 0.5 > sim[1]


def test_neighbours_agree_with_scikit_learn_brute_force() -> None:
    # Reference: sklearn.neighbors.NearestNeighbors(metric="cosine", algorithm="brute").
    from sklearn.neighbors import NearestNeighbors

    rng = np.random.default_rng(3)
    words = ["data", "query", "index", "stream", "graph", "mining", "join", "cache", "xml"]
    texts = [" ".join(rng.choice(words, 4)) + f" w{i}" for i in range(40)]
    vec = text_vectors.vectors(texts, texts, "char")
    a, b, s = text_vectors.neighbours(vec.left, None, 3, -1.0)
    ref = NearestNeighbors(n_neighbors=4, metric="cosine", algorithm="brute").fit(vec.left)
    dist, idx = ref.kneighbors(vec.left)
    for row in range(40):
        ours = np.sort(s[a == row])[::-1]
        theirs = np.sort(1 - dist[row][idx[row] != row])[::-1][:3]
        assert ours == pytest.approx(theirs, abs=1e-5)
        assert row not in set(b[a == row])


def test_near_rule_finds_typos_that_share_no_word() -> None:
    left = pd.DataFrame({"title": ["Recursive qeury processing", "Spatial joins"]})
    right = pd.DataFrame({"title": ["Recursive query procesing", "Spatial join methods"]})
    fields = [FieldSpec("title", "title", "title", "longtext")]
    rule = blocking.parse_rule("near(title)", fields)
    li, ri = blocking.rule_pairs(rule, left, right, fields, 1000)
    assert {(0, 0), (1, 1)} <= set(zip(li.tolist(), ri.tolist(), strict=True))


def test_a_code_split_by_spaces_meets_its_joined_form() -> None:
    # worked by hand: 'kx 450 b' holds the runs 'kx450' and 'kx450b' (and '450b'), so it shares
    # a tokens(title) key with 'KX-450B' (one word, kx450b); long words are not joined, nor
    # words that meet letter to letter ('4k uhd') or with no digit ('big red ox'). A run is a
    # key only where a record holds it as a word ('55 led' meets '55LED', and only it).
    assert word_keys("drill kx 450 b") == (["450", "drill", "kx"], ["450b", "kx450", "kx450b"])
    assert word_keys("big red ox") == (["big", "ox", "red"], [])
    assert word_keys("cordless 18 volts") == (["18", "cordless", "volts"], [])
    assert word_keys("4k uhd tv") == (["4k", "tv", "uhd"], [])
    left = ([["55", "led"], ["ab", "12"]], [["55led"], ["ab12"]])  # (keys, runs) per record
    right = ([["55led", "tv"]], [[]])
    assert known_runs([left, right]) == [[["55", "led", "55led"], ["ab", "12"]], [["55led", "tv"]]]
    left = pd.DataFrame({"title": ["KX-450B", "pq 460 c", "Drill 55 LED"]})
    right = pd.DataFrame({"title": ["kx 450 b", "PQ460", "55LED tv"]})
    fields = [FieldSpec("title", "title", "title", "longtext")]
    rule = blocking.parse_rule("tokens(title)", fields)
    li, ri = blocking.rule_pairs(rule, left, right, fields, 1000, token_share=1.0)
    assert set(zip(li.tolist(), ri.tolist(), strict=True)) == {(0, 0), (1, 1), (2, 2)}


def test_near_stands_alone_and_empty_values_meet_nobody() -> None:
    fields = [FieldSpec("title", "title", "title", "longtext"),
              FieldSpec("year", "year", "year", "number")]
    with pytest.raises(blocking.DocketError, match="stands alone"):
        blocking.parse_rule("near(title) & year", fields)
    li, ri = near_pairs(pd.Series(["same words here", None, "same words here"]), None)
    assert set(zip(li.tolist(), ri.tolist(), strict=True)) == {(0, 2)}


def test_word_best_match_is_symmetric_monge_elkan_with_jaro_winkler() -> None:
    # Monge & Elkan (1996): the mean over one string's words of the best similarity to a word
    # of the other; made symmetric by averaging both directions. Inner measure from jellyfish.
    import jellyfish

    from docket.core.matching.word_match import word_best_match

    def reference(a: str, b: str) -> float:
        wa, wb = a.split(), b.split()

        def one_way(x: list[str], y: list[str]) -> float:
            return sum(max(jellyfish.jaro_winkler_similarity(p, q) for q in y) for p in x) / len(x)
        return (one_way(wa, wb) + one_way(wb, wa)) / 2

    a = ["alan blake", "blake clan", "kasia nowak", "bryn hallan", "ann marie lee", "yu"]
    b = ["blake clan", "alan blake", "kasia nowak", "bryn", "lee mary", "yu wen"]
    got = word_best_match(a, b)
    assert np.allclose(got, [reference(x, y) for x, y in zip(a, b, strict=True)], atol=1e-6)
    assert got[2] == 1.0


def test_an_initial_is_similar_to_the_names_it_could_stand_for() -> None:
    # Jaro-Winkler of 'j' and 'jana' is 0.775 (jellyfish gives the same), below the 'similar'
    # cut of 0.80, so a clerk's initial counted as a different name. Writing a given name as
    # its initial is common practice in registers; any other one-letter pair keeps its score.
    import jellyfish

    a = np.array(["j", "jana", "j", "j", "k", "jana"], dtype=object)
    b = np.array(["jana", "j", "kai", "jo", "k", "jan"], dtype=object)
    sim, lv = compare.compare_values("name", a, b)
    names = compare.level_names("name")
    assert [names[v] for v in lv] == ["similar", "similar", "different", "similar", "exact",
                                      "close"]
    assert jellyfish.jaro_winkler_similarity("j", "jana") == pytest.approx(0.775)
    assert sim[0] == pytest.approx(0.82) and sim[2] == 0.0
    assert sim[5] == pytest.approx(jellyfish.jaro_winkler_similarity("jana", "jan"), abs=1e-6)


def test_names_of_two_generations_are_different_names() -> None:
    # A parent and a child of one name in one home differ by a generational suffix only: that
    # they are two people is common practice in person matching. On invented people
    # (bench/invented_people.py) 77 of 497 false matches with no labels had two suffixes that
    # differ; no true pair did. One suffix alone is no evidence: clerks drop it.
    from docket.core.records import normalise

    pairs = [("Hale Sr", "Hale Jr"), ("Hale III", "Hale II"), ("Hale Jr", "Hale Junior"),
             ("Hale", "Hale Sr"), ("Hale Jr", "Jr Hale")]
    a = np.array([normalise.name(x) for x, _ in pairs], dtype=object)
    b = np.array([normalise.name(y) for _, y in pairs], dtype=object)
    sim, lv = compare.compare_values("name", a, b)
    names = compare.level_names("name")
    assert [names[v] for v in lv] == ["different", "different", "close", "similar", "exact"]
    assert sim[0] == 0.0 and sim[2] > 0.92


NAME_WORDS = ["j", "jana", "k", "kai", "hale", "sr", "jr", "iii", "ii", "junior", "nowak", "x"]


@settings(max_examples=200, deadline=None)
@given(st.lists(st.lists(st.sampled_from(NAME_WORDS), min_size=1, max_size=3), min_size=2,
                max_size=12))
def test_name_similarity_is_symmetric_and_in_range(names: list[list[str]]) -> None:
    # Whatever the initial and suffix rules add, comparing a with b is comparing b with a,
    # equal names are exact, and every similarity lies in [0, 1] (common practice for a
    # similarity measure).
    from docket.core.records import normalise

    values = [normalise.name(" ".join(words)) for words in names]
    a = np.array(values[:-1], dtype=object)
    b = np.array(values[1:], dtype=object)
    s_ab, l_ab = compare.compare_values("name", a, b)
    s_ba, l_ba = compare.compare_values("name", b, a)
    assert np.allclose(s_ab, s_ba, atol=1e-6) and (l_ab == l_ba).all()
    assert ((s_ab >= 0) & (s_ab <= 1)).all()
    same = a == b
    assert (l_ab[same] == 0).all()
