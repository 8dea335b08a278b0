"""Finding matcher rows among the candidate pairs: any order, either way round in one table,
Parquet or CSV, ids holding the joining character."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core import NewProject, Project
from docket.core.matchers import catalogue
from docket.core.matchers.importing import import_matchers
from docket.core.storage.pair_keys import lookup, pair_keys
from tests.conftest import SAMPLE
from tests.matchers_support import candidates

ids = st.text(alphabet="ab\x1f\x1e", max_size=3)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(ids, ids), unique=True, max_size=12), st.booleans(),
       st.randoms(use_true_random=False))
def test_every_candidate_is_found_and_nothing_else(pairs, link, rnd) -> None:
    if not link:  # one table: a pair is one unordered set of two ids
        pairs = list({frozenset(p): p for p in pairs if p[0] != p[1]}.values())
    conn = sqlite3.connect(":memory:")
    conn.execute("CREATE TABLE pairs (pair_id INTEGER PRIMARY KEY, left_id TEXT, right_id TEXT)")
    pair_ids = rnd.sample(range(1, 100), len(pairs))  # ids need not follow insertion order
    conn.executemany("INSERT INTO pairs VALUES (?, ?, ?)",
                     [(i, a, b) for i, (a, b) in zip(pair_ids, pairs, strict=True)])
    index = pair_keys(conn, link)
    rank = {pid: r for r, pid in enumerate(sorted(pair_ids))}
    asked = [*pairs, ("zz", "zz"), ("a\x1f", "b"), ("a", "\x1fb")]
    if not link:
        asked += [(b, a) for a, b in pairs]
    want = {**{p: rank[i] for i, p in zip(pair_ids, pairs, strict=True)},
            **({} if link else {(b, a): rank[i] for i, (a, b) in zip(pair_ids, pairs,
                                                                     strict=True)})}
    got = lookup(index, pa.array([a for a, _ in asked]), pa.array([b for _, b in asked]))
    assert got.tolist() == [want.get(p, -1) for p in asked]


def test_files_in_any_order_and_format_store_the_same_scores(tmp_path: Path) -> None:
    path = tmp_path / "one.docket"
    Project.create(NewProject(path=path, left=SAMPLE / "practice_north.csv",
                              id_column="client_id", rules=["postcode"]))
    with Project.open(path) as p:
        frame = candidates(p)
        score = np.random.default_rng(3).random(len(frame))
        rows = pd.DataFrame({"left_id": frame.left_id, "right_id": frame.right_id,
                             "score": score})
        rows.to_csv(tmp_path / "same_order.csv", index=False)
        shuffled = rows.sample(frac=1.0, random_state=1)
        swap = np.arange(len(shuffled)) % 2 == 1  # one table: either way round
        shuffled.loc[swap, ["left_id", "right_id"]] = \
            shuffled.loc[swap, ["right_id", "left_id"]].to_numpy()
        shuffled.to_parquet(tmp_path / "shuffled.parquet", index=False)
        read = import_matchers(p, [tmp_path / "same_order.csv", tmp_path / "shuffled.parquet"])
        assert [m.given for m in read] == [len(frame)] * 2
        stored = catalogue.load_scores(p.connection)
    # CSV text keeps 17 significant digits, but pandas 2's default parser may round the last
    # binary digit; the Parquet file holds the floats themselves
    assert np.allclose(stored["same_order"], score, rtol=1e-15, atol=0)
    assert np.array_equal(stored["shuffled"], score)
