"""Column names a spreadsheet writes, brackets, an ampersand, a comma, work as any other."""

from __future__ import annotations

import csv
from pathlib import Path

import pytest

from docket.core import DocketError
from docket.core.pairs.blocking import Key, parse_rule
from docket.core.types import FieldSpec
from docket.tui.cli import main
from docket.tui.cli_project import parse_together

NAMES = ["First Name", "town (home)", "a&b", "last, name"]
FIELDS = [FieldSpec(n, n, n, "text") for n in NAMES]


def _table(path: Path) -> Path:
    firsts, lasts = ["Anna", "Jon", "Kari", "Per"], ["Berg", "Dahl", "Lund"]
    towns = ["Oslo", "Bergen"]
    with path.open("w", encoding="utf-8", newline="") as f:
        out = csv.writer(f)
        out.writerow(["id", *NAMES])
        for i in range(60):
            out.writerow([i, firsts[i % 4], towns[i % 2], "xy"[i % 3 == 0], lasts[i % 3]])
    return path


@pytest.mark.parametrize("rule, keys", [
    ("town (home)", [Key("value", "town (home)")]),
    ("tokens(town (home)) & a&b", [Key("tokens", "town (home)"), Key("value", "a&b")]),
    ("a&b[:1] & First Name", [Key("prefix", "a&b", 1), Key("value", "First Name")]),
    ("near( last, name )", [Key("near", "last, name")]),
])
def test_a_rule_on_a_field_whose_name_holds_brackets_or_an_ampersand_is_read(
        rule: str, keys: list[Key]) -> None:
    assert list(parse_rule(rule, FIELDS).keys) == keys
    assert str(parse_rule(rule, FIELDS)) == " & ".join(str(k) for k in keys)


def test_a_rule_that_is_no_key_is_still_refused() -> None:
    with pytest.raises(DocketError, match="cannot read 'town \\(home'"):
        parse_rule("town (home", FIELDS)
    with pytest.raises(DocketError, match="no compared field 'a'"):
        parse_rule("a & First Name", FIELDS)


def test_blocking_chosen_from_the_data_reads_its_own_rules(tmp_path: Path, capsys) -> None:
    # docket chose 'tokens(town (home))' and then refused it: 'cannot read', exit 2
    table = _table(tmp_path / "people.csv")
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(table), "--id", "id"]) == 0
    assert "chosen from the data" in capsys.readouterr().out


def test_together_takes_a_quoted_name_that_holds_a_comma(tmp_path: Path, capsys) -> None:
    # --together split 'last, name' at its comma: no way to name that field
    assert parse_together('"last, name", First Name') == ["last, name", "First Name"]
    assert parse_together("street,town , postcode") == ["street", "town", "postcode"]
    assert parse_together("none") == ["none"] and parse_together(None) is None
    table = _table(tmp_path / "people.csv")
    project = tmp_path / "p.docket"
    assert main(["new", str(project), "--left", str(table), "--id", "id",
                 "--together", '"last, name",First Name']) == 0
    capsys.readouterr()
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(table), "--id", "id",
                 "--together", '"last, name,First Name']) == 2
    assert "a quote is not closed" in capsys.readouterr().err
    # '--together "$COLS"' with COLS unset turned the home grouping off, unsaid
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(table), "--id", "id",
                 "--together", " , "]) == 2
    assert "--together ' , ' names no field" in capsys.readouterr().err


def test_columns_named_alike_in_two_unicode_forms_are_one_field(tmp_path: Path,
                                                                capsys) -> None:
    # 'Prénom' composed in one table, its accent a mark of its own in the other: not paired,
    # and the warning offered "--map 'Prénom=Prénom'", two names that look the same
    left, right = tmp_path / "l.csv", tmp_path / "r.csv"
    left.write_text("id,Pr\u00e9nom,town\n1,Anna,Oslo\n2,Bo,Vik\n3,Cy,Vik\n", encoding="utf-8")
    right.write_text("id,PRE\u0301NOM,town\na,Anna,Oslo\nb,Bo,Vik\nc,Di,Vik\n", encoding="utf-8")
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(left), "--right", str(right),
                 "--id", "id"]) == 0
    out, err = capsys.readouterr()
    assert "fields compared: Pr\u00e9nom (name), town" in out
    assert "not compared" not in err
