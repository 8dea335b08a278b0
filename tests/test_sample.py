"""The committed demo scenario: reproducible byte for byte, and shaped as its README says."""

from __future__ import annotations

import csv
import importlib
import importlib.util
import re
import sys
from collections import Counter
from datetime import date, datetime
from pathlib import Path
from types import ModuleType

import pytest

SAMPLE = Path(__file__).resolve().parents[1] / "sample"
FILES = ("practice_north.csv", "practice_south.csv", "truth.csv")


def load_generator() -> ModuleType:
    spec = importlib.util.spec_from_file_location("make_sample", SAMPLE / "make_sample.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up while the class is built
    spec.loader.exec_module(module)
    return module


def read(folder: Path, name: str) -> list[dict[str, str]]:
    with (folder / name).open(newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


@pytest.fixture(scope="module")
def generator() -> ModuleType:
    return load_generator()


@pytest.fixture(scope="module")
def regenerated(generator: ModuleType, tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("sample")
    assert generator.main(["--out", str(out)]) == 0
    return out


@pytest.mark.parametrize("name", FILES)
def test_regenerating_reproduces_the_committed_file(regenerated: Path, name: str) -> None:
    assert (regenerated / name).read_bytes() == (SAMPLE / name).read_bytes()


def test_headers_and_counts() -> None:
    with (SAMPLE / "practice_north.csv").open(encoding="utf-8") as f:
        assert f.readline().strip() == (
            "client_id,owner,pet,species,street,town,postcode,phone,email,born")
    with (SAMPLE / "practice_south.csv").open(encoding="utf-8") as f:
        assert f.readline().strip() == (
            "ref,owner_name,pet,species,street,town,postcode,phone,email,date_of_birth")
    north, south = read(SAMPLE, FILES[0]), read(SAMPLE, FILES[1])
    truth = read(SAMPLE, FILES[2])
    assert (len(north), len(south), len(truth)) == (2000, 1800, 700)
    north_ids = {r["client_id"] for r in north}
    south_ids = {r["ref"] for r in south}
    assert len(north_ids) == 2000 and len(south_ids) == 1800
    assert all(re.fullmatch(r"N-\d{5}", i) for i in north_ids)
    assert all(re.fullmatch(r"S-1\d{4}", i) for i in south_ids)
    # one-to-one: neither register holds the same client twice
    assert {t["left_id"] for t in truth} <= north_ids
    assert {t["right_id"] for t in truth} <= south_ids
    assert len({t["left_id"] for t in truth}) == len({t["right_id"] for t in truth}) == 700


def test_no_row_repeats_within_a_file() -> None:
    for name in FILES[:2]:
        rows = [tuple(r.values())[1:] for r in read(SAMPLE, name)]
        assert len(set(rows)) == len(rows)


def test_contact_details_are_fictional(generator: ModuleType) -> None:
    words = importlib.import_module("sample_words")  # the generator put its folder on sys.path
    prefixes = tuple(p.replace(" ", "") for p in [words.MOBILE_PREFIX, *words.LANDLINE_PREFIXES])
    for name in FILES[:2]:
        for row in read(SAMPLE, name):
            if row["email"]:
                assert row["email"].rsplit("@", 1)[1] in words.DOMAINS, row
            if row["phone"]:
                digits = re.sub(r"[^\d+]", "", row["phone"].replace("(0)", ""))
                digits = "0" + digits[3:] if digits.startswith("+44") else digits
                assert digits.startswith(prefixes) and len(digits) == 11, row
            if row["postcode"]:
                assert re.fullmatch(r"[QVX][A-Z]\d ?\d[A-Z]{2}", row["postcode"].upper()), row


def parse_date(text: str) -> date:
    fmt = "%Y-%m-%d" if re.fullmatch(r"\d{4}-\d\d-\d\d", text) else "%d/%m/%Y"
    return datetime.strptime(text, fmt).date()


def test_dates_parse_in_each_register_format() -> None:
    north, south = read(SAMPLE, FILES[0]), read(SAMPLE, FILES[1])
    assert all(re.fullmatch(r"\d{4}-\d\d-\d\d", r["born"]) for r in north if r["born"])
    shapes = Counter("iso" if "-" in r["date_of_birth"] else "dmy"
                     for r in south if r["date_of_birth"])
    assert shapes["dmy"] > 10 * shapes["iso"] > 0  # mostly DD/MM/YYYY, a few ISO
    for text in [r["born"] for r in north] + [r["date_of_birth"] for r in south]:
        if text:
            assert date(1934, 1, 1) <= parse_date(text) <= date(2006, 12, 31)


def test_hard_cases_are_present() -> None:
    north, south = read(SAMPLE, FILES[0]), read(SAMPLE, FILES[1])
    truth = {(t["left_id"], t["right_id"]) for t in read(SAMPLE, FILES[2])}
    by_address: dict[tuple[str, str], list[str]] = {}
    for r in north:
        if r["street"]:
            by_address.setdefault((r["street"], r["town"]), []).append(r["client_id"])
    housemates = sum((left, r["ref"]) not in truth
                     for r in south for left in by_address.get((r["street"], r["town"]), []))
    assert housemates >= 150  # same address across files, different people
    owners = [r["owner"] for r in north] + [r["owner_name"] for r in south]
    non_latin = sum(bool(re.search(r"[\u0370-\u03ff\u0400-\u04ff\u4e00-\u9fff]", o))
                    for o in owners)
    assert 0.02 < non_latin / len(owners) < 0.10
    assert sum(bool(re.search(r"[éøłüñ]", o)) for o in owners) > 100
    text = "\n".join(",".join(r.values()) for r in north + south)
    for literal in ["O'Neill", "Flat [B]", "flat [b]", "[the 2nd]", '"Noodle"', "Ivo  Kessling"]:
        assert literal in text
    for row in north + south:  # no cell that a CSV reader would silently take for missing
        assert not set(row.values()) & {"NA", "N/A", "NULL", "None", "nan", "NaN", "null"}
