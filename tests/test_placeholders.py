"""Placeholders ('N/A', 'unknown', '-', '0', 'XX1 1XX') that fill a share of a column are
compared as missing, not as agreement, and new says so naming the column and the values."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import Project
from docket.core.records import placeholders
from docket.tui.cli import main

FILLERS = ["N/A", "unknown", "-", "0"]


@pytest.mark.parametrize("value", ["N/A", "n/a", "#N/A", "Unknown", "NULL", "-", "?", "0",
                                   "0000", "9999999", "XX1 1XX", "x0x 0x0", "tbc", "XX",
                                   "1900-01-01", "01/01/1900", "9999-12-31"])
def test_what_looks_like_a_placeholder(value: str) -> None:
    assert placeholders.looks_like_placeholder(value)


@pytest.mark.parametrize("value", ["1", "12", "X", "M", "Brantovel", "1900-01-02", "AB1 2CD",
                                   "07123456789", "1984-03-07", "1900"])
def test_what_does_not(value: str) -> None:
    assert not placeholders.looks_like_placeholder(value)


@pytest.mark.parametrize("value", ["Москва", "Ελένη", "東京都", "محمد عبد الله", "שרה כהן",
                                   "김민준", "Иванов 0", "東京都9"])
def test_a_value_in_another_script_is_a_value(value: str) -> None:
    # letters were a-z alone: each of these was 'punctuation alone', a placeholder
    assert not placeholders.looks_like_placeholder(value)


def test_a_frequent_town_in_cyrillic_is_compared(tmp_path: Path, capsys) -> None:
    # 'Москва' in a third of the column was read as missing, and a column of towns written
    # in Cyrillic alone was left out as 'only placeholders'
    towns = ["Москва", "Москва", "Москва", "Тверь", "Казань", "Омск"] * 5
    frame = pd.DataFrame({"id": [f"r{i}" for i in range(30)], "town": towns,
                          "name": [f"Иван Петров{i}" for i in range(30)]})
    frame.to_csv(tmp_path / "t.csv", index=False)
    assert main(["new", str(tmp_path / "t.docket"), "--left", str(tmp_path / "t.csv"),
                 "--id", "id", "--block", "town"]) == 0
    assert "placeholder" not in capsys.readouterr().err
    with Project.open(tmp_path / "t.docket") as project:
        assert [f.name for f in project.fields] == ["town", "name"]


def test_a_date_for_none_in_a_column_of_births() -> None:
    births = pd.Series([f"19{40 + i % 50}-0{1 + i % 9}-1{i % 10}" for i in range(190)] +
                       ["1900-01-01"] * 10)
    assert placeholders.for_kind(placeholders.found(births), "date") == {"1900-01-01": 0.05}


def test_kind_keeps_its_own_values() -> None:
    shares = {"0": 0.3, "N/A": 0.1, "Na": 0.05}
    assert placeholders.for_kind(shares, "number") == {"N/A": 0.1, "Na": 0.05}
    assert placeholders.for_kind(shares, "name") == {"0": 0.3, "N/A": 0.1}
    assert placeholders.for_kind(shares, "code") == shares


def _register(tmp: Path, n: int = 400) -> Path:
    # Invented people: a third of the phones are a filler, half the postcodes the form's
    # example, a fifth of the children counts 0; p0 and p1 alone live in Orvale, both 'N/A'.
    rng = np.random.default_rng(9)
    phone = [str(rng.choice(FILLERS)) if rng.random() < 0.3 else
             f"07{rng.integers(10**8, 10**9)}" for _ in range(n)]
    postcode = ["XX1 1XX" if rng.random() < 0.5 else
                f"KT{rng.integers(1, 99)} {rng.integers(1, 9)}QZ" for _ in range(n)]
    frame = pd.DataFrame({
        "id": [f"p{i}" for i in range(n)],
        "name": [f"{rng.choice(['Ilvan', 'Merot', 'Saqui', 'Tolbek'])} "
                 f"{rng.choice(['Drevan', 'Uskol', 'Phenmar'])}{i}" for i in range(n)],
        "town": [f"Town{i % 40}" for i in range(n)],
        "born": [("unknown" if rng.random() < 0.3 else
                  f"19{rng.integers(40, 99)}-0{rng.integers(1, 9)}-1{rng.integers(0, 9)}")
                 for _ in range(n)],
        "children": [str(rng.integers(0, 4)) for _ in range(n)],
        "phone": phone, "postcode": postcode})
    frame.loc[[0, 1], "town"] = "Orvale"
    frame.loc[[0, 1], "phone"] = "N/A"
    path = tmp / "people.csv"
    frame.to_csv(path, index=False)
    return path


def _new(tmp: Path, *extra: str) -> tuple[int, str]:
    return main(["new", str(tmp / "p.docket"), "--left", str(_register(tmp)), "--id", "id",
                 "--block", "town", *extra]), str(tmp / "p.docket")


def test_new_names_each_column_and_its_placeholders(tmp_path: Path, capsys) -> None:
    code, path = _new(tmp_path)
    assert code == 0
    err = capsys.readouterr().err
    phone = next(line for line in err.splitlines() if "column 'phone'" in line)
    assert "people.csv" in phone and "'N/A' (" in phone and "'0' (" in phone
    assert "compared as missing" in phone and "--keep-placeholders" in phone
    assert "column 'postcode': 'XX1 1XX' (" in err
    assert "column 'children'" not in err  # in a column of numbers 0 is a number
    with Project.open(path) as project:
        kinds = {f.name: f.kind for f in project.fields}
        missing = {f.name: set(f.missing) for f in project.fields}
        assert kinds["born"] == "date"  # 30 % 'unknown' no longer hides the dates
        assert missing["phone"] == set(FILLERS) and missing["postcode"] == {"XX1 1XX"}
        item = next(i for i in project.candidates_of("left", "p0") if "p1" in (i.left_id,
                                                                                 i.right_id))
        card = project.card(item.pair_id)
        phone_row = next(r for r in card.fields if r.field == "phone")
        # the card shows the value as written; the comparison found nothing to compare
        assert (phone_row.left, phone_row.right) == ("N/A", "N/A")
        assert phone_row.level_name == "missing" and phone_row.similarity is None


def test_keep_placeholders_compares_them_as_written(tmp_path: Path, capsys) -> None:
    code, path = _new(tmp_path, "--keep-placeholders")
    assert code == 0
    assert "compared as missing" not in capsys.readouterr().err
    with Project.open(path) as project:
        assert all(not f.missing for f in project.fields)
        item = next(i for i in project.candidates_of("left", "p0") if "p1" in (i.left_id,
                                                                                 i.right_id))
        phone_row = next(r for r in project.card(item.pair_id).fields if r.field == "phone")
        assert phone_row.level_name.startswith("exact")


def test_the_model_file_carries_them_and_older_fields_read_as_none(tmp_path: Path) -> None:
    code, path = _new(tmp_path)
    assert code == 0
    assert main(["export", path, "--what", "model", "-o", str(tmp_path / "m.json")]) == 0
    fields = {f["name"]: f for f in json.loads((tmp_path / "m.json").read_text())["fields"]}
    assert sorted(fields["phone"]["missing"]) == sorted(FILLERS)
    assert "missing" not in fields["name"]  # a field without any is written as before


def test_a_column_of_only_placeholders_is_left_out(tmp_path: Path, capsys) -> None:
    frame = pd.DataFrame({"id": ["a", "b", "c", "d"], "name": ["Ilvan Drevan", "Ilvan Drevan",
                                                               "Merot Uskol", "Saqui Phen"],
                          "email": ["N/A", "n/a", "N/A", "-"]})
    frame.to_csv(tmp_path / "t.csv", index=False)
    assert main(["new", str(tmp_path / "t.docket"), "--left", str(tmp_path / "t.csv"),
                 "--id", "id"]) == 0
    err = capsys.readouterr().err
    assert "column 'email' holds only placeholders" in err and "not compared" in err
    with Project.open(tmp_path / "t.docket") as project:
        assert [f.name for f in project.fields] == ["name"]


def test_a_link_says_each_field_once_with_both_sides_shares(tmp_path: Path, capsys) -> None:
    left = pd.DataFrame({"ref": [f"q{i}" for i in range(50)],
                         "name": [f"Ilvan Drevan{i}" for i in range(50)],
                         "phone": ["N/A" if i % 5 == 0 else f"0712{i:06d}" for i in range(50)]})
    right = pd.DataFrame({"pid": [f"p{i}" for i in range(80)],
                          "name": [f"Ilvan Drevan{i}" for i in range(80)],
                          "tel": ["N/A" if i % 4 == 0 else "-" if i % 4 == 1 else
                                  f"0712{i:06d}" for i in range(80)]})
    left.to_csv(tmp_path / "l.csv", index=False)
    right.to_csv(tmp_path / "r.csv", index=False)
    assert main(["new", str(tmp_path / "k.docket"), "--left", str(tmp_path / "l.csv"),
                 "--right", str(tmp_path / "r.csv"), "--left-id", "ref", "--right-id", "pid",
                 "--map", "phone=tel", "--block", "tokens(name)"]) == 0
    lines = [line for line in capsys.readouterr().err.splitlines() if "no value" in line]
    assert len(lines) == 1
    assert "l.csv, column 'phone' and " in lines[0] and "r.csv, column 'tel'" in lines[0]
    assert "'N/A' (20.0% and 25.0%)" in lines[0] and "'-' (none in " in lines[0]
