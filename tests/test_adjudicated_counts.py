"""After adjudication, and a reviewer's label that comes later: every export format holds the
adjudicated label, and status, the gold exports and evaluate agree on the counts."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from docket.core import Project

from .team_support import run, tiny_project


@pytest.fixture
def tiny(tmp_path: Path) -> Path:
    """Eight candidate pairs and no decision yet (gold_fixtures' tiny has labels already)."""
    return tiny_project(tmp_path)


def settle(path: Path) -> list[int]:
    with Project.open(path) as p:
        pids = [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs ORDER BY pair_id")]
        a, b, c = pids[:3]
        for pid in (a, b, c):
            p.decide(pid, "maya", "match")
        p.decide(a, "ravi", "non-match")  # a disagreement
        p.decide(b, "ravi", "hold")  # a hold
        p.decide(c, "ravi", "match")  # unanimous
        p.add_reviewer("lee", "adjudicator")
        p.adjudicate(a, "lee", "non-match", "different birth year")
        p.adjudicate(b, "lee", "match", "same household, same pet")
        # later than the adjudication: the latest adjudication decides (reviewing/labels.py)
        p.decide(a, "omar", "match")
    return [a, b, c]


def test_status_lists_the_adjudications_so_its_lines_add_up(tiny: Path, capsys) -> None:
    settle(tiny)
    capsys.readouterr()
    assert run(["status", str(tiny), "--json"]) == 0
    dec = json.loads(capsys.readouterr().out)["decisions"]
    # maya 3, ravi 3 and omar 1 reviewer labels, lee 2 adjudications: counted by hand above
    assert dec["current_labels"] == 9
    assert dec["per_adjudicator"] == {"lee": {"match": 1, "non-match": 1}}
    shown = sum(n for who in (dec["per_reviewer"], dec["per_adjudicator"])
                for c in who.values() for k, n in c.items() if k != "role")
    assert shown == dec["current_labels"]
    assert run(["status", str(tiny)]) == 0
    assert "  lee              adjudicated  match 1, non-match 1" in capsys.readouterr().out


def test_every_gold_format_holds_the_adjudicated_label(tiny: Path, tmp_path: Path,
                                                       capsys) -> None:
    a, b, c = settle(tiny)
    want = {a: ("non-match", "adjudicated"), b: ("match", "adjudicated"),
            c: ("match", "unanimous")}
    read = {"csv": lambda f: pd.read_csv(f, dtype=str, keep_default_na=False),
            "parquet": pd.read_parquet,
            "jsonl": lambda f: pd.read_json(f, lines=True, dtype=False)}
    for fmt, reader in read.items():
        out = tmp_path / f"gold.{fmt}"
        assert run(["export", str(tiny), "--what", "gold", "-o", str(out)]) == 0
        rows = reader(out)
        assert {int(r.pair_id): (r.label, r.how) for r in rows.itertuples()} == want, fmt
    capsys.readouterr()
    assert run(["status", str(tiny), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["gold_labels"] == 3
    assert run(["evaluate", str(tiny), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["gold_labels"] == 3


def test_a_label_after_the_adjudication_is_kept_in_reviews(tiny: Path, tmp_path: Path) -> None:
    # README: the latest adjudication decides; a later reviewer's label stays in `reviews`
    settle(tiny)
    out = tmp_path / "gold.jsonl"
    assert run(["export", str(tiny), "--what", "gold", "-o", str(out)]) == 0
    rows = [json.loads(line) for line in out.read_text().splitlines()]
    later = [r for r in rows if "omar" in json.dumps(r.get("reviews"))]
    assert len(later) == 1 and later[0]["label"] == "non-match"
