"""Names compared word by word: symmetric Monge–Elkan with Jaro–Winkler inside.

Each distinct name is split once (:func:`name_words`, done once per field for all chunks of
pairs), each distinct pair of words is scored once by rapidfuzz, and every pair's grid of word
pairs is laid out with numpy, so the Python work grows with the distinct names and words, not
with the pairs.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import chain

import numpy as np
import pandas as pd
from rapidfuzz import process
from rapidfuzz.distance import JaroWinkler


@dataclass
class NameWords:
    """The words of distinct names: name ``i`` holds ``count[i]`` words, coded from
    ``code[start[i]]`` on, each code a position in ``vocab``."""

    count: np.ndarray
    start: np.ndarray
    code: np.ndarray
    vocab: np.ndarray  # object: each distinct word once
    length: np.ndarray  # per word of ``vocab``: its length in characters
    first: np.ndarray  # per word of ``vocab``: a code of its first character
    generation: np.ndarray  # per name: which generational suffix it carries (-1: none)


# An initial and a name it could stand for ('j', 'jana') are 'similar' (between the name cuts
# 0.80 and 0.92): Jaro–Winkler gives them 0.775, below one with a letter in three changed.
INITIAL = np.float32(0.82)
# Generational suffixes, one code per generation: a parent and a child of one name in one home
# differ only there ('Hale Sr', 'Hale Jr'), and one person is never both.
GENERATIONS = {"sr": 0, "snr": 0, "senior": 0, "jr": 1, "jnr": 1, "junior": 1, "ii": 2,
               "iii": 3, "iv": 4}


def name_words(values: list[str], spaced: bool = False) -> NameWords:
    """Split distinct names into words. ``spaced``: the names are words one space apart (what
    ``normalise.name`` gives), so Arrow splits and codes them without a Python string per word.
    """
    if spaced and values:
        import pyarrow as pa
        import pyarrow.compute as pc

        parts = pc.split_pattern(pa.array(values, type=pa.large_string()), " ")
        count = pc.list_value_length(parts).to_numpy().astype(np.int64)
        encoded = pc.dictionary_encode(pc.list_flatten(parts))
        code = encoded.indices.to_numpy().astype(np.int64)
        vocab = np.asarray(encoded.dictionary.to_pylist(), dtype=object)
        length = pc.utf8_length(encoded.dictionary).to_numpy(zero_copy_only=False)
        first = pc.dictionary_encode(pc.utf8_slice_codeunits(encoded.dictionary, 0, 1))
        first_code = first.indices.to_numpy(zero_copy_only=False)
    else:
        split = [v.split() for v in values]
        count = np.fromiter((len(w) for w in split), np.int64, len(split))
        code, words = pd.factorize(pd.Series(list(chain.from_iterable(split)), dtype=object))
        code = code.astype(np.int64)
        vocab = np.asarray(words, dtype=object)
        length = np.fromiter(map(len, vocab), np.int64, len(vocab))
        first_code = pd.factorize(pd.Series([w[:1] for w in vocab], dtype=object))[0]
    start = np.zeros(len(count), dtype=np.int64)
    np.cumsum(count[:-1], out=start[1:])
    word_generation = np.fromiter((GENERATIONS.get(w, -1) for w in vocab), np.int64,
                                  len(vocab))
    generation = np.full(len(count), -1, dtype=np.int64)
    worded = np.flatnonzero(count > 0)
    if len(worded) and len(code):
        generation[worded] = np.maximum.reduceat(word_generation[code], start[worded])
    return NameWords(count, start, code, vocab, np.asarray(length, dtype=np.int64),
                     np.asarray(first_code, dtype=np.int64), generation)


def generations_apart(words: NameWords, ia: np.ndarray, ib: np.ndarray) -> np.ndarray:
    """Whether names ``ia[k]`` and ``ib[k]`` both carry a generational suffix, and not the same
    one: 'hale sr' and 'hale jr' are two people. One suffix alone says nothing: clerks drop
    them."""
    ga, gb = words.generation[ia], words.generation[ib]
    return (ga >= 0) & (gb >= 0) & (ga != gb)


def initials(words: NameWords, ia: np.ndarray, ib: np.ndarray) -> np.ndarray:
    """Whether names ``ia[k]`` and ``ib[k]`` are one word each, one of them a single letter
    that begins the other: 'j' and 'jana', not 'j' and 'kai' nor 'j' and 'j'."""
    one = (words.count[ia] == 1) & (words.count[ib] == 1)
    if not one.any():
        return one
    wa = words.code[np.where(one, words.start[ia], 0)]
    wb = words.code[np.where(one, words.start[ib], 0)]
    la, lb = words.length[wa], words.length[wb]
    return one & (words.first[wa] == words.first[wb]) & (np.minimum(la, lb) == 1) & \
        (np.maximum(la, lb) > 1)


def best_match(words: NameWords, ia: np.ndarray, ib: np.ndarray, workers: int = -1
               ) -> np.ndarray:
    """Symmetric Monge–Elkan of names ``ia[k]`` and ``ib[k]`` of ``words`` (see
    :func:`word_best_match`), for every k."""
    if not len(ia):
        return np.zeros(0, dtype=np.float32)
    na, nb = words.count[ia], words.count[ib]
    cells = na * nb
    # Pair k's cells are its na x nb grid, row after row, from offset[k] on.
    offset = np.zeros(len(ia), dtype=np.int64)
    np.cumsum(cells[:-1], out=offset[1:])
    owner = np.repeat(np.arange(len(ia)), cells)
    local = np.arange(int(cells.sum())) - offset[owner]
    row, col = local // nb[owner], local % nb[owner]
    left = words.code[words.start[ia][owner] + row]
    right = words.code[words.start[ib][owner] + col]
    width = len(words.vocab)
    inverse, word_pairs = pd.factorize(left * width + right)  # each word pair scored once
    scored = process.cpdist(words.vocab[word_pairs // width].tolist(),
                            words.vocab[word_pairs % width].tolist(),
                            scorer=JaroWinkler.normalized_similarity, workers=workers,
                            dtype=np.float32)
    sim = scored[inverse]
    by_column = np.empty_like(sim)
    by_column[offset[owner] + col * na[owner] + row] = sim
    return (_mean_of_best(sim, na, nb) + _mean_of_best(by_column, nb, na)) / np.float32(2.0)


def word_best_match(a: list, b: list, workers: int = -1) -> np.ndarray:
    """Symmetric Monge–Elkan over words with Jaro–Winkler inside: each word of one name scored
    by its best counterpart in the other, averaged, then both directions averaged.

    Sorting the words makes 'Nowak, Kasia' equal 'Kasia Nowak', but one typo in a first letter
    can move a word to the other end ('Alan Blake' and 'Clan Blake' sort differently), which
    costs whole-string Jaro–Winkler a lot; word by word it costs one letter of one word."""
    codes, names = pd.factorize(pd.Series([*a, *b], dtype=object))
    codes = codes.astype(np.int64)
    return best_match(name_words(list(names)), codes[:len(a)], codes[len(a):], workers)


def _mean_of_best(grid: np.ndarray, rows: np.ndarray, width: np.ndarray) -> np.ndarray:
    """Per pair, the mean over its ``rows`` of each row's maximum (rows laid end to end)."""
    row_len = np.repeat(width, rows)
    best = np.maximum.reduceat(grid, np.concatenate([[0], np.cumsum(row_len)[:-1]]))
    per_pair = np.add.reduceat(best, np.concatenate([[0], np.cumsum(rows)[:-1]]))
    return (per_pair / rows).astype(np.float32)
