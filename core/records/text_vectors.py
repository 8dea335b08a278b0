"""TF-IDF vectors of a field's distinct values: cosine similarity of pairs and nearest neighbours.

Both sides' distinct values share one vocabulary and one set of inverse document frequencies,
so a word (or character n-gram) that many records hold counts little and a rare one counts
much. scikit-learn builds the character n-gram vectors (imported here only, so opening a
project never loads it); the word vectors are the same as its word vectoriser's, worked out
here from one regular-expression pass per value and whole-array counting, because its Python
loop over each value's words was 40 % of comparing a 56,000-pair link. Rows are
L2-normalised, so the cosine of two values is the dot product of their rows.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from itertools import chain
from typing import Any

import numpy as np

WORD = re.compile(r"(?u)\b\w+\b")  # scikit-learn's token pattern, keeping one-letter words
CHUNK = 20_000  # values whose words are held at once as strings (bounds word_rows' memory)
NGRAM = (3, 3)  # character 3-grams inside word boundaries
BLOCK = 20_000_000  # similarities held at once by the neighbour search (bounds its memory)


@dataclass
class Vectors:
    """Row ``i`` of ``left`` is the vector of distinct left value ``i`` (likewise ``right``)."""

    left: Any  # scipy CSR, one L2-normalised row per value
    right: Any


def _char_vectorizer(max_df: float | int) -> Any:
    from sklearn.feature_extraction.text import TfidfVectorizer

    return TfidfVectorizer(analyzer="char_wb", ngram_range=NGRAM, sublinear_tf=True,
                           dtype=np.float32, max_df=max_df)


def _found_words(values: list[str]) -> tuple[np.ndarray, list[str], np.ndarray]:
    """Each word found in the values: its code in the list of distinct words (in order of first
    appearance), that list, and the value it came from."""
    import pandas as pd

    words = [WORD.findall(v.lower()) for v in values]
    codes, terms = pd.factorize(pd.Series(list(chain.from_iterable(words)), dtype=object))
    doc = np.repeat(np.arange(len(words), dtype=np.int64), [len(w) for w in words])
    return codes, list(terms), doc


def _spaced_words(values: list[str]) -> tuple[np.ndarray, list[str], np.ndarray]:
    """:func:`_found_words` for words one space apart, split and counted by Arrow without
    making a Python string of each word (three times faster on titles)."""
    import pyarrow as pa
    import pyarrow.compute as pc

    parts = pc.split_pattern(pa.array(values, type=pa.large_string()), " ")
    flat = pc.list_flatten(parts)
    doc = pc.list_parent_indices(parts)
    kept = pc.not_equal(flat, "")  # str.split() finds no word in an empty value
    encoded = pc.dictionary_encode(flat.filter(kept))
    return (encoded.indices.to_numpy().astype(np.int64), encoded.dictionary.to_pylist(),
            doc.filter(kept).to_numpy().astype(np.int64))


def word_rows(corpus: list[str], max_df: float | int = 1.0, spaced: bool = False) -> Any:
    """What ``TfidfVectorizer(token_pattern=WORD, sublinear_tf=True, max_df=max_df)`` gives
    (lower case; smooth idf ln((1 + n) / (1 + df)) + 1; 1 + ln tf; unit rows), with the
    columns in another order. Raises ValueError when no term is left, as it does.

    ``spaced``: the values are already lower-case words one space apart (what
    ``normalise.words`` gives), so Arrow splits and counts them (see :func:`_spaced_words`).
    """
    from scipy import sparse

    n = len(corpus)
    vocabulary: dict[str, int] = {}
    cells_of = []
    for start in range(0, n, CHUNK):  # a chunk's words at once, never the whole corpus's
        part = corpus[start:start + CHUNK]
        codes, terms, doc = (_spaced_words(part) if spaced else _found_words(part))
        ids = np.array([vocabulary.setdefault(t, len(vocabulary)) for t in terms],
                       dtype=np.int64)
        doc += start
        # a value's words all lie in its chunk: the chunk's cells sorted are its CSR rows
        cells, times = np.unique(doc << 32 | ids[codes], return_counts=True)
        cells_of.append(((cells >> 32).astype(np.int32), (cells & 0xFFFFFFFF).astype(np.int32),
                         times.astype(np.int32)))
    if not vocabulary:
        raise ValueError("empty vocabulary")
    row, col, counts = (np.concatenate(part) for part in zip(*cells_of, strict=True))
    del cells_of
    df = np.bincount(col, minlength=len(vocabulary))
    kept = df <= (max_df if isinstance(max_df, int) else max_df * n)
    if not kept.any():
        raise ValueError("after pruning, no terms remain")
    keep = kept[col]
    row, col, tf = row[keep], (np.cumsum(kept, dtype=np.int32) - 1)[col[keep]], counts[keep]
    del counts, keep
    idf = (np.log((1.0 + n) / (1.0 + df[kept])) + 1.0).astype(np.float32)
    val = (np.float32(1.0) + np.log(tf.astype(np.float32))) * idf[col]
    norm = np.sqrt(np.bincount(row, weights=val * val, minlength=n)).astype(np.float32)
    val /= norm[row]
    indptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(row, minlength=n), out=indptr[1:])
    return sparse.csr_matrix((val, col, indptr), shape=(n, int(kept.sum())))


def corpus_rows(corpus: list[str], analyzer: str, max_share: float = 1.0,
                spaced: bool = False) -> Any:
    """TF-IDF rows of distinct values, row ``i`` for ``corpus[i]`` ("word" or "char" analyzer);
    terms held by more than ``max_share`` of the values are left out. ``spaced`` as for
    :func:`word_rows`."""
    from scipy import sparse

    if not corpus:
        return sparse.csr_matrix((0, 1), dtype=np.float32)
    try:
        # A small corpus keeps every term: in ten values, each is held by a tenth of them.
        max_df = 1.0 if max_share >= 1.0 else max(10, int(max_share * len(corpus)))
        return (word_rows(corpus, max_df, spaced) if analyzer == "word" else
                _char_vectorizer(max_df).fit_transform(corpus).tocsr())
    except ValueError:  # nothing but stop characters: no vocabulary at all
        return sparse.csr_matrix((len(corpus), 1), dtype=np.float32)


def vectors(left: list[str], right: list[str], analyzer: str, max_share: float = 1.0,
            spaced: bool = False) -> Vectors:
    """TF-IDF rows for each side's distinct values over one shared vocabulary (see
    :func:`corpus_rows`)."""
    corpus = list(dict.fromkeys([*left, *right]))
    rows = corpus_rows(corpus, analyzer, max_share, spaced)
    if not corpus:
        return Vectors(rows, rows)
    at = {v: i for i, v in enumerate(corpus)}
    return Vectors(rows[[at[v] for v in left]], rows[[at[v] for v in right]])


def row_cosine(a: Any, b: Any, ia: np.ndarray, ib: np.ndarray) -> np.ndarray:
    """Cosine of row ``ia[k]`` of ``a`` with row ``ib[k]`` of ``b``, for every k (float32)."""
    if len(ia) == 0:
        return np.zeros(0, dtype=np.float32)
    prod = a[ia].multiply(b[ib])
    out = np.asarray(prod.sum(axis=1), dtype=np.float32).reshape(-1)
    return np.clip(out, 0.0, 1.0)


def neighbours(a: Any, b: Any | None, k: int, floor: float
               ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """For each row of ``a``: its ``k`` most similar rows of ``b`` (of ``a`` itself when ``b``
    is None, never the row itself) with cosine at least ``floor``; (rows of a, rows of b, cos).

    Exact, by blocks of sparse products, so the result does not depend on any random start.
    """
    other = a if b is None else b
    out_a, out_b, out_s = [], [], []
    other_t = other.T.tocsc()
    step = max(1, BLOCK // max(1, other.shape[0]))
    for start in range(0, a.shape[0], step):
        block = (a[start:start + step] @ other_t).toarray()
        if b is None:
            rows = np.arange(block.shape[0])
            block[rows, rows + start] = -1.0
        kk = min(k, block.shape[1])
        if kk <= 0:
            continue
        top = np.argpartition(-block, kk - 1, axis=1)[:, :kk]
        sims = np.take_along_axis(block, top, axis=1)
        keep = sims >= floor
        rows = np.repeat(np.arange(block.shape[0]) + start, kk).reshape(block.shape[0], kk)
        out_a.append(rows[keep])
        out_b.append(top[keep])
        out_s.append(sims[keep])
    if not out_a:
        z = np.zeros(0, dtype=np.int64)
        return z, z, np.zeros(0, dtype=np.float32)
    return (np.concatenate(out_a).astype(np.int64), np.concatenate(out_b).astype(np.int64),
            np.concatenate(out_s).astype(np.float32))
