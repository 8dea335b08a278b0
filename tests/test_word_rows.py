"""Word TF-IDF rows against scikit-learn's TfidfVectorizer on the same values."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.records.text_vectors import word_rows


def _reference(corpus: list[str], max_df: float | int = 1.0) -> np.ndarray:
    # Reference: scikit-learn's TfidfVectorizer with docket's token pattern and sublinear tf
    # (scikit-learn user guide, "Tf–idf term weighting": smooth idf, unit rows). Columns come
    # in another order, so the rows' cosines are compared.
    from sklearn.feature_extraction.text import TfidfVectorizer

    rows = TfidfVectorizer(token_pattern=r"(?u)\b\w+\b", sublinear_tf=True,
                           max_df=max_df).fit_transform(corpus)
    return (rows @ rows.T).toarray()


def _ours(corpus: list[str], max_df: float | int = 1.0) -> np.ndarray:
    rows = word_rows(corpus, max_df)
    return (rows @ rows.T).toarray()


def test_titles_give_scikit_learns_cosines() -> None:
    corpus = ["Query optimisation in parallel databases", "parallel database query query",
              "a survey of record-linkage", "x", "Ünïcode straße ÉTÉ 2024", "  spaced   out  ",
              "—"]
    assert _ours(corpus) == pytest.approx(_reference(corpus), abs=1e-6)


def test_common_words_are_left_out_as_scikit_learn_does() -> None:
    corpus = [f"the data {w}" for w in ("graph", "stream", "index", "cache", "join")]
    assert _ours(corpus, 3) == pytest.approx(_reference(corpus, 3), abs=1e-6)
    assert _ours(corpus, 0.5) == pytest.approx(_reference(corpus, 0.5), abs=1e-6)


def test_no_word_at_all_is_refused_like_scikit_learn() -> None:
    with pytest.raises(ValueError):
        word_rows(["  ", "--"])
    with pytest.raises(ValueError):
        word_rows(["a b", "a b"], 1)


@settings(max_examples=80, deadline=None)
@given(st.lists(st.text(alphabet=st.sampled_from("ab éZ\t-.ß_1²İ"), max_size=14), min_size=1,
                max_size=8, unique=True),
       st.sampled_from([1.0, 0.6, 2]))
def test_any_values_give_scikit_learns_cosines(corpus: list[str], max_df: float | int) -> None:
    try:
        expected = _reference(corpus, max_df)
    except ValueError:
        with pytest.raises(ValueError):
            word_rows(corpus, max_df)
        return
    assert _ours(corpus, max_df) == pytest.approx(expected, abs=1e-6)


def test_values_read_in_chunks_give_the_same_rows(monkeypatch: pytest.MonkeyPatch) -> None:
    from docket.core.records import text_vectors

    words = [f"record {i} of the {w} table" for i, w in enumerate("abcdefghij")]
    corpus = [*words[:3], "", "—", "  ", *words[3:]]  # the second chunk holds no word at all
    whole = _ours(corpus)
    monkeypatch.setattr(text_vectors, "CHUNK", 3)
    assert _ours(corpus) == pytest.approx(whole, abs=1e-7)
    assert whole == pytest.approx(_reference(corpus), abs=1e-6)


@settings(max_examples=80, deadline=None)
@given(st.lists(st.text(alphabet=st.sampled_from("aB éZ\t-.ß_1²İ&;"), max_size=14), min_size=1,
                max_size=8, unique=True))
def test_normalised_values_split_as_the_token_pattern_reads_them(raw: list[str]) -> None:
    # Values as normalise.words leaves them are read the same by a plain split.
    from docket.core.records.normalise import words

    corpus = list(dict.fromkeys(w for w in (words(v) for v in raw) if w))
    if not corpus:
        return
    assert (word_rows(corpus, spaced=True) != word_rows(corpus)).nnz == 0
