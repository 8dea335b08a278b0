"""lone(col): nearest neighbours for the records no shared word pairs, against outside values."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core.errors import DocketError
from docket.core.pairs import blocking
from docket.core.pairs.lone import alone
from docket.core.pairs.neighbours import LONE_K, near_pairs
from docket.core.records import text_vectors
from docket.core.types import FieldSpec
from docket.tui.cli import main

NAME = [FieldSpec("name", "name", "name", "name")]
# Invented eateries: 'cafe' and 'grill' are held by many records (more than 1 % of them, so
# no key), each stem by one place and its copy; two copies carry a typo in their stem.
PLACES = ([f"{stem} {kind}" for stem, kind in
           zip(["Torvenka", "Lumbrisor", "Dalmekfin", "Ravpolqua", "Zenharmor", "Lisbertan"],
               ["Cafe", "Grill"] * 3, strict=True)] +
          ["Torvenka Cafe", "Lumrbisor Grill", "Dalmkefin Cafe"] +
          [f"Cafe {i}" if i % 2 else f"Grill {i}" for i in range(20)])


def _pairs(rule: str, left: pd.DataFrame, right: pd.DataFrame | None) -> set[tuple[int, int]]:
    li, ri = blocking.rule_pairs(blocking.parse_rule(rule, NAME), left, right, NAME, 10_000)
    return set(zip(li.tolist(), ri.tolist(), strict=True))


def test_lone_finds_the_copies_a_typo_hides_from_the_words() -> None:
    table = pd.DataFrame({"name": PLACES})
    words = _pairs("tokens(name)", table, None)
    assert (0, 6) in words  # the copy written alike shares its stem
    assert (1, 7) not in words and (2, 8) not in words  # a typo: no word in common
    lone = _pairs("lone(name)", table, None)
    assert {(1, 7), (2, 8)} <= lone
    asking, _ = alone("name", table, None, NAME)
    # records 0 and 6 share 'torvenka': they ask for no neighbours, nor meet any but as found
    assert not asking[0] and not asking[6] and asking[1] and asking[7]
    assert all(asking[a] or asking[b] for a, b in lone)
    assert len(lone) <= LONE_K * int(asking.sum())


def test_lone_in_a_link_asks_from_both_sides() -> None:
    filler = PLACES[9:]  # 'cafe' and 'grill' on both sides, too common to be keys
    left = pd.DataFrame({"name": ["Lumbrisor Grill", "Torvenka Cafe", "Zenharmor Grill",
                                  *filler]})
    right = pd.DataFrame({"name": ["Torvenka Cafe", "Zenhramor Grill", "Lumrbisor Grill",
                                   *filler]})
    got = _pairs("lone(name)", left, right)
    assert {(0, 2), (2, 1)} <= got
    assert (1, 0) not in got  # both hold 'torvenka': the words pair them, lone leaves them


def test_lone_neighbours_are_the_nearest_by_scikit_learn_cosine() -> None:
    # Reference: sklearn.neighbors.NearestNeighbors(metric="cosine", algorithm="brute") over
    # the same character 3-gram TF-IDF rows: each asking record's pairs are its LONE_K nearest.
    from sklearn.neighbors import NearestNeighbors

    values = pd.Series(PLACES)
    texts = [v.lower() for v in PLACES]
    asking = np.zeros(len(PLACES), dtype=bool)
    asking[[1, 2, 7, 8]] = True
    li, ri = near_pairs(values, None, k=LONE_K, floor=-1.0, queries=(asking, asking))
    got = set(zip(li.tolist(), ri.tolist(), strict=True))
    vec = text_vectors.vectors(texts, texts, "char", 0.1)
    ref = NearestNeighbors(n_neighbors=LONE_K + 1, metric="cosine",
                           algorithm="brute").fit(vec.left)
    dist, idx = ref.kneighbors(vec.left[np.flatnonzero(asking)])
    for row, (d, near) in zip(np.flatnonzero(asking), zip(dist, idx, strict=True), strict=True):
        others = [(float(x), int(j)) for x, j in zip(d, near, strict=True) if j != row]
        cut = sorted(others)[LONE_K - 1][0]
        ours = {b if a == row else a for a, b in got if row in (a, b)}
        # the records nearer to it than its LONE_K-th nearest (ties aside) are all paired
        assert {j for x, j in others if x < cut - 1e-6} <= ours
        assert len(ours) >= LONE_K


def test_lone_stands_alone_and_refuses_the_distributed_engine() -> None:
    fields = [*NAME, FieldSpec("town", "town", "town", "text")]
    with pytest.raises(DocketError, match=r"lone\(\.\.\.\) stands alone"):
        blocking.parse_rule("lone(name) & town", fields)
    rule = blocking.parse_rule("lone(name)", fields)
    table = pd.DataFrame({"name": PLACES, "town": "x"})
    with pytest.raises(DocketError, match="runs in this process only"):
        blocking.rule_keys(rule, table, None, fields, 1000)


def test_the_build_names_records_no_word_pairs(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    csv = tmp_path / "places.csv"
    pd.DataFrame({"id": [f"e{i}" for i in range(len(PLACES))], "name": PLACES}).to_csv(
        csv, index=False)
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(csv), "--id", "id",
                 "--block", "tokens(name)"]) == 0
    out = capsys.readouterr().out
    assert "are in no candidate pair and share no uncommon word of name" in out
    assert "--block 'tokens(name)' --block 'lone(name)'" in out
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(csv), "--id", "id",
                 "--block", "tokens(name)", "--block", "lone(name)"]) == 0
    out = capsys.readouterr().out
    assert "no uncommon word" not in out
    assert "lone(name)" in out
