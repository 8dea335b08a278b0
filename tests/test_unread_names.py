"""When no chosen rule reads a name (its words alone pair too many records), `new` names a
narrower rule that would: a table of many people left 7 % of its true pairs out silently."""

from __future__ import annotations

import random
from pathlib import Path

import pandas as pd
import pytest

from docket.core.pairs import autoblock, blocking
from docket.core.types import FieldSpec
from docket.tui.cli import main

FIELDS = [FieldSpec("given", "given", "given", "name"),
          FieldSpec("family", "family", "family", "name"),
          FieldSpec("born", "born", "born", "date"),
          FieldSpec("phone", "phone", "phone", "code")]


def _people(n: int = 300, seed: int = 5) -> pd.DataFrame:
    # invented: ten given and ten family names, so each word is held by a tenth of the table
    rng = random.Random(seed)
    given = [f"Ana{c}" for c in "bcdfghjklm"]
    family = [f"Vesk{c}" for c in "bcdfghjklm"]
    rows = [{"id": f"r{i}", "given": rng.choice(given), "family": rng.choice(family),
             "born": f"19{rng.randint(40, 99)}-0{rng.randint(1, 9)}-1{rng.randint(0, 9)}",
             "phone": f"07{rng.randint(10**8, 10**9 - 1)}"} for i in range(n)]
    rows += [{**r, "id": r["id"] + "x"} for r in rows[:40]]  # copies sharing a phone
    return pd.DataFrame(rows)


def test_the_narrowest_join_of_two_names_is_named() -> None:
    table = _people()
    rules = autoblock.choose_rules(table, None, FIELDS, 2_000)
    assert [str(r) for r in rules] == ["phone", "born"]  # the names' words: too many pairs
    got = autoblock.unread_names(rules, table, None, FIELDS, 2_000)
    assert list(got) == ["tokens(given) & tokens(family)"]
    # the figure is the join's own size: pairs of records holding both words, a key held by
    # more than max(10, 1 % of the records) left out as the README says (worked here from the
    # table with pandas, apart from docket's key frames)
    groups = table.groupby(["given", "family"]).size()
    groups = groups[groups <= max(10, len(table) // 100)]
    assert got["tokens(given) & tokens(family)"] == int((groups * (groups - 1) // 2).sum())
    li, _ = blocking.rule_pairs(blocking.parse_rule("tokens(given) & tokens(family)", FIELDS),
                                table, None, FIELDS, 2_000)
    assert len(li) == got["tokens(given) & tokens(family)"]


def test_a_rule_reading_a_name_leaves_nothing_to_say() -> None:
    table = _people()
    rules = [blocking.parse_rule(r, FIELDS) for r in ("phone", "tokens(family) & year(born)")]
    assert autoblock.unread_names(rules, table, None, FIELDS, 2_000) == {}


def test_new_prints_the_rules_to_add(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    csv = tmp_path / "people.csv"
    _people().to_csv(csv, index=False)
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(csv), "--id", "id",
                 "--max-pairs", "2000", "--field", "given:name", "--field", "family:name",
                 "--field", "phone:code"]) == 0
    out = capsys.readouterr().out
    assert ("note: no rule reads a name: their words alone would pair too many records. "
            "--block phone --block born --block 'tokens(given) & tokens(family)' would add "
            "about") in out
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(csv), "--id", "id",
                 "--max-pairs", "2000", "--block", "phone"]) == 0
    assert "no rule reads a name" not in capsys.readouterr().out  # given rules: the user's
