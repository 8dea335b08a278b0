"""Small tables with no blocking key: every pair is compared (the rule '*')."""

from __future__ import annotations

from itertools import combinations, product
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import DocketError, NewProject, Project
from docket.core.pairs.blocking import every_pair, parse_rule


def test_every_pair_is_each_pair_once() -> None:
    # Reference: itertools' combinations and product (all unordered / ordered pairs).
    li, ri = every_pair(7, None, 10_000)
    assert sorted(zip(li.tolist(), ri.tolist(), strict=True)) == list(combinations(range(7), 2))
    li, ri = every_pair(4, 5, 10_000)
    assert sorted(zip(li.tolist(), ri.tolist(), strict=True)) == list(product(range(4), range(5)))
    with pytest.raises(DocketError, match="over the cap of 20"):
        every_pair(7, None, 20)


def test_star_stands_alone() -> None:
    with pytest.raises(DocketError, match="stands alone"):
        parse_rule("a & *", [])


def test_small_table_without_keys_compares_every_pair(tmp_path: Path) -> None:
    # Numbers that no two records share: no key finds a pair, but 1,770 pairs are few.
    rng = np.random.default_rng(3)
    table = pd.DataFrame({"id": [str(i) for i in range(60)],
                          "a": rng.integers(1, 5, 60).astype(str),
                          "b": rng.random(60).round(6).astype(str)})
    table.to_csv(tmp_path / "nums.csv", index=False)
    path = tmp_path / "nums.docket"
    built = Project.create(NewProject(path=path, left=tmp_path / "nums.csv", id_column="id"))
    assert built.blocking.rules == ["*"]
    assert built.blocking.pairs == 60 * 59 // 2 == built.blocking.possible
    with Project.open(path) as project:
        ids = project.connection.execute("SELECT left_id, right_id FROM pairs").fetchall()
    assert len(set(map(frozenset, ids))) == 1770


def test_no_rule_says_why_and_names_a_field_of_the_table(tmp_path: Path) -> None:
    # it said only "give one with --block (for example --block 'tokens(name)')", to tables
    # without a name column and with every field mostly empty
    rng = np.random.default_rng(5)
    n = 1000
    table = pd.DataFrame({"id": [str(i) for i in range(n)],
                          "qty": np.where(rng.random(n) < 0.1, rng.integers(1, 9, n), -1),
                          "day": np.where(rng.random(n) < 0.1, "2025-01-02", "")})
    table["qty"] = table["qty"].astype(str).replace("-1", "")
    table.to_csv(tmp_path / "rare.csv", index=False)
    with pytest.raises(DocketError) as refused:
        Project.create(NewProject(path=tmp_path / "rare.docket", left=tmp_path / "rare.csv",
                                  id_column="id"))
    said = str(refused.value)
    assert "every compared field is empty in more than half of the records (qty " in said
    assert "--block 'qty'" in said and "--block '*' to compare all 499,500 pairs" in said
    assert "tokens(name)" not in said
