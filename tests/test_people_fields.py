"""Registers of people: the fields they hold are read as the kinds that compare them well."""

from __future__ import annotations

import datetime as dt
import random

import pandas as pd

from docket.core.records import normalise
from docket.core.records.fields import detect_kind


def _ids(rng: random.Random, n: int) -> list[str]:
    return [f"Q{rng.choice('ABCX')}{rng.randint(0, 999999):06d}{rng.choice('ABCD')}"
            for _ in range(n)]


def test_an_identifier_written_with_or_without_spaces_is_a_code() -> None:
    # An invented national number, plain in one register and grouped in pairs in the other. It
    # was read as text (or, grouped alone, as long text: five words), where 'QX 12 34 56 C'
    # and 'QX123456C' are 'different'; as a code they are one value.
    rng = random.Random(3)
    plain = _ids(rng, 300)
    spaced = [f"{v[:2]} {v[2:4]} {v[4:6]} {v[6:8]} {v[8]}" for v in plain]
    assert detect_kind("national_id", pd.Series(plain[:150] + spaced[150:])) == "code"
    assert detect_kind("national_id", pd.Series(spaced)) == "code"
    assert detect_kind("ref", pd.Series([v.replace(" ", "-") for v in spaced])) == "code"
    assert normalise.code(spaced[0]) == normalise.code(plain[0])
    # a phone in a column whose name says nothing of phones
    assert detect_kind("contact", pd.Series([f"0{rng.randint(1000, 7999)} "
                                             f"{rng.randint(100000, 999999)}"
                                             for _ in range(300)])) == "code"


def test_addresses_names_and_postcodes_stay_what_they_were() -> None:
    rng = random.Random(4)
    streets = pd.Series([f"{rng.randint(1, 240)} {rng.choice(['Brolen', 'Kethmar', 'Sel'])} "
                         f"{rng.choice(['Lane', 'Road', 'Row'])}" for _ in range(300)])
    assert detect_kind("address", streets) == "text"
    # letters and digits, but fewer digits than letters: an area code, not an identifier
    areas = pd.Series([f"{rng.choice(['WL', 'KT', 'BA'])}{rng.randint(1, 29)} "
                       f"{rng.randint(1, 9)}{rng.choice(['ZY', 'AB', 'EE'])}"
                       for _ in range(300)])
    assert detect_kind("area", areas) == "text"
    assert detect_kind("given_name", pd.Series(["Torvena", "Brisel", "K.", "Polan"] * 80)) == \
        "name"


def test_a_two_digit_year_keeps_the_day_first_and_lies_in_the_past() -> None:
    # '07/03/84' went to the general parser, which reads the US order: 3 July, where
    # '07/03/1984' in the same column is 7 March; and it put '12/05/40' in 2040, so a birth
    # written short never met the other register's '1940-05-12'.
    assert normalise.date("07/03/84") == normalise.date("07/03/1984") == \
        normalise.date("1984-03-07")
    assert normalise.date("7.3.84") == normalise.date("07/03/84")
    assert normalise.date("03/13/84") == normalise.date("13/03/84")  # 13 cannot be a month
    assert normalise.date("31/02/84") is None
    assert normalise.date("12/05/40") == normalise.date("1940-05-12")
    # the century is the latest not after this year, in any year the test runs
    this = dt.date.today().year
    for year in (this, this - 99):
        assert normalise.date(f"01/01/{year % 100:02d}") == normalise.date(f"{year}-01-01")
    short = pd.Series([f"{d:02d}/{m:02d}/{y:02d}" for d, m, y in
                       zip(range(1, 29), [1, 5, 9, 12] * 7, range(40, 96, 2), strict=True)] * 4)
    assert detect_kind("dob", short) == "date"


def test_whole_numbers_that_identify_are_codes() -> None:
    # common practice: an identifier's digits are compared as a code (a typo is one edit), not
    # as a quantity where two ids within 1 % are 'near'
    ids = pd.Series([str(1_000_000 + i * 7919) for i in range(200)])
    assert detect_kind("soc_sec_id", pd.Series(["1234567", "2345678"] * 50)) == "code"
    assert detect_kind("member_no", pd.Series(["1", "2", "3"] * 50)) == "code"
    assert detect_kind("patientId", pd.Series(["12", "2", "3"] * 50)) == "code"
    assert detect_kind("c4", ids) == "code"  # by shape: seven digits, every one different
    # quantities and counts stay numbers, whatever their size
    assert detect_kind("amount", ids) == "number"
    assert detect_kind("no_of_pets", pd.Series(["1", "2", "3"] * 50)) == "number"
    assert detect_kind("number of children", pd.Series(["1", "2", "3"] * 50)) == "number"
    assert detect_kind("year", pd.Series(["1999", "2001"] * 50)) == "number"
    assert detect_kind("paid", pd.Series(["12", "13", "140"] * 50)) == "number"
    assert detect_kind("price", pd.Series(["12.50", "13.99"] * 50)) == "number"
