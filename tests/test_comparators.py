"""docket's comparators against published string-similarity values.

Jaro–Winkler values from Winkler's published examples as reproduced on Wikipedia and in
jellyfish's test data; Levenshtein / OSA values from their textbook definitions; each tagged
with its source beside it.
"""

from __future__ import annotations

import jellyfish
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.matching import compare
from docket.core.records import distinct, normalise

JW = compare.SCORERS["name"]
LEV = compare.SCORERS["text"]

# (s1, s2, Jaro–Winkler p=0.1, source)
JW_CASES = [
    ("MARTHA", "MARHTA", 0.9611, "Wikipedia [S via jellyfish testdata]"),
    ("DWAYNE", "DUANE", 0.8400, "Wikipedia [S]"),
    ("DIXON", "DICKSONX", 0.8133, "Wikipedia [S]"),
    ("CRATE", "TRACE", 0.7333, "Wikipedia text [S]"),
    ("William", "Williams", 0.9750, "jellyfish testdata [S]"),
    ("SHACKLEFORD", "SHACKELFORD", 0.9818, "Winkler table, from memory [M]"),
    ("DUNNINGHAM", "CUNNIGHAM", 0.8963, "Winkler table, from memory [M]"),
    ("NICHLESON", "NICHULSON", 0.9556, "Winkler table, from memory [M]"),
    ("JONES", "JOHNSON", 0.8324, "Winkler table, from memory [M]"),
    ("MASSEY", "MASSIE", 0.9333, "Winkler table, from memory [M]"),
    ("ABROMS", "ABRAMS", 0.9222, "Winkler table, from memory [M]"),
    ("JULIES", "JULIUS", 0.9333, "Winkler table, from memory [M]"),
    ("TANYA", "TONYA", 0.8800, "Winkler table, from memory [M]"),
    ("SEAN", "SUSAN", 0.8050, "Winkler table, from memory [M]"),
    ("JON", "JOHN", 0.9333, "Winkler table, from memory [M]"),
]


@pytest.mark.parametrize(("a", "b", "expected", "source"), JW_CASES)
def test_jaro_winkler_published(a: str, b: str, expected: float, source: str) -> None:
    assert JW([a], [b])[0] == pytest.approx(expected, abs=1e-4), source


def test_jaro_winkler_boost_threshold() -> None:
    # Winkler (1990): the prefix bonus applies only above Jaro 0.7 (Winkler's program,
    # rapidfuzz and jellyfish); ABCDEF/ABXYZW stays at Jaro 0.5556 [C].
    assert JW(["ABCDEF"], ["ABXYZW"])[0] == pytest.approx(0.5556, abs=1e-4)


def test_levenshtein_published() -> None:
    # kitten/sitting = 3 edits [S, Wikipedia mirrors]: normalised 1 - 3/7 = 0.5714 [C].
    assert LEV(["kitten"], ["sitting"])[0] == pytest.approx(0.5714, abs=1e-4)
    # Saturday/Sunday = 3 edits [S]: 1 - 3/8.
    assert LEV(["Saturday"], ["Sunday"])[0] == pytest.approx(1 - 3 / 8, abs=1e-4)


def test_code_levels_use_osa_transpositions() -> None:
    # fish/ifsh: OSA distance 1 [S, jellyfish docs] -> the "one edit" level; CA/ABC: OSA 3 [S].
    a = np.array(["fish", "ca", "ab12"], dtype=object)
    b = np.array(["ifsh", "abc", "ab12"], dtype=object)
    _, lv = compare.compare_values("code", a, b)
    names = compare.level_names("code")
    assert [names[i] for i in lv] == ["one edit", "different", "exact"]


@settings(max_examples=60, deadline=None)
@given(st.text(alphabet="abcdefgh", min_size=1, max_size=12),
       st.text(alphabet="abcdefgh", min_size=1, max_size=12))
def test_jaro_winkler_agrees_with_jellyfish(a: str, b: str) -> None:
    # jellyfish is an independent implementation (reference library, test-only).
    assert JW([a], [b])[0] == pytest.approx(jellyfish.jaro_winkler_similarity(a, b), abs=1e-5)


def test_missing_is_its_own_level_never_a_disagreement() -> None:
    a = np.array(["anna", None, "x"], dtype=object)
    b = np.array([None, "anna", "y"], dtype=object)
    sim, lv = compare.compare_values("name", a, b)
    missing = len(compare.level_names("name")) - 1
    assert list(lv[:2]) == [missing, missing] and np.isnan(sim[:2]).all()
    assert lv[2] != missing


def test_dates_detect_day_month_swap_across_formats() -> None:
    a = np.array([normalise.date("1981-04-07")], dtype=object)
    b = np.array([normalise.date("04/07/1981")], dtype=object)  # day/month/year: 4 July
    _, lv = compare.compare_values("date", a, b)
    assert compare.level_names("date")[lv[0]] == "day/month swapped"


def test_normalise_each_distinct_value_once() -> None:
    calls: list[str] = []

    def spy(v: str) -> str:
        calls.append(v)
        return v.lower()

    out = distinct.per_distinct(["A", "B", "A", None, "A"], spy)
    assert list(out) == ["a", "b", "a", None, "a"] and sorted(calls) == ["A", "B"]


def test_every_kind_has_a_comparison_rule() -> None:
    # types.KINDS is what field mapping accepts; compare.KINDS says how each is compared
    from docket.core import types

    assert set(compare.KINDS) == set(types.KINDS)


def test_numbers_are_judged_pair_by_pair() -> None:
    # One non-integer elsewhere in the chunk must not turn 2000 vs 2019 (years: 19 apart, far
    # beyond one unit) into "within 1 %". Common practice: integers such as years differ by units.
    names = compare.level_names("number")
    alone = compare.compare_values("number", np.array([2000.0]), np.array([2019.0]))[1]
    mixed = compare.compare_values("number", np.array([2000.0, 12.5]),
                                   np.array([2019.0, 12.5]))[1]
    assert names[alone[0]] == names[mixed[0]] == "roughly"


def test_numbers_a_few_percent_apart_have_a_level_of_their_own() -> None:
    # Common practice: a price or weight taken at another time or shop differs by a few percent,
    # which says more than a number of another size altogether. Worked by hand.
    names = compare.level_names("number")
    a = np.array([100.5, 100.5, 100.5, 100.5, 1299.0, 40.0])
    b = np.array([100.5, 101.0, 108.0, 125.0, 1300.0, 4.0])
    got = [names[x] for x in compare.compare_values("number", a, b)[1]]
    assert got == ["exact", "near", "roughly", "different", "near", "different"]


def test_dates_far_ahead_and_in_the_us_order() -> None:
    iso = normalise.date("1990-12-31")
    assert normalise.date("31/12/1990") == iso
    assert normalise.date("12/31/1990") == iso  # 31 cannot be a month: the US order
    assert normalise.date("03/04/1990") == normalise.date("1990-04-03")  # ambiguous: day first
    assert normalise.date("now") is None and normalise.date("today") is None
    # 9999-12-31, a common "no end date" value, compares like any other day
    far = np.array([normalise.date("9999-12-31")])
    assert compare.compare_values("date", far, far)[1][0] == 0


def test_an_amount_with_a_decimal_comma_is_no_date() -> None:
    # pandas read "2.132,07" as 0001-02-07, so a column of such amounts was compared as dates
    # ("day/month swapped x27" on money)
    import pandas as pd

    from docket.core.records.fields import detect_kind
    assert normalise.date("2.132,07") is None and normalise.date("9.000,10") is None
    assert normalise.date("3 March 1990") == normalise.date("1990-03-03")
    amounts = pd.Series([f"{k}.{k % 1000:03d},{k % 100:02d}" for k in range(1, 300)])
    assert detect_kind("betrag", amounts) == "number"
    assert detect_kind("datum", pd.Series(["04.12.2024", "31.01.2023"] * 50)) == "date"
    # a column whose name says nothing is a date by the shape of its values, months in words
    # too (one register writes '3 Mar 1980', another 1980-03-03; common practice)
    mixed = pd.Series(["3 Mar 1980", "1980-03-03", "03/03/1980", "March 3, 1980"] * 30)
    assert detect_kind("c3", mixed) == "date"
    assert detect_kind("c5", pd.Series(["12 Mill Lane", "4 Marsh Road"] * 60)) != "date"


def test_amounts_written_the_ways_shops_write_them() -> None:
    # Worked by hand. A decimal comma ('1.299,00', one or two digits after the comma) was read
    # with its comma dropped (2.132,07 -> 2.13207), and a currency sign or code made the value
    # no number at all, so one shop's '$1,299.00' never met another's '1299'.
    import pandas as pd

    from docket.core.records.fields import detect_kind
    same = ["1299", "1,299.00", "1.299,00", "$1,299", "1 299,00 EUR", "EUR 1299.00", "€1.299,00"]
    assert {normalise.number(v) for v in same} == {1299.0}
    assert [normalise.number(v) for v in ("2.132,07", "12,5", "10,000", "£ 3", "-3.5")] == [
        2132.07, 12.5, 10000.0, 3.0, -3.5]
    # letters that are no currency keep a code a code
    assert normalise.number("ABC123") is None and normalise.number("EUR") is None
    prices = pd.Series([f"${k},{k % 1000:03d}.{k % 100:02d}" for k in range(1, 300)])
    assert detect_kind("price", prices) == "number"



def test_negative_amounts_and_swiss_grouping_as_spreadsheets_write_them() -> None:
    # Worked by hand. A spreadsheet's accounting format writes -1,299.00 as '(1,299.00)', a
    # US export '-$1,299.00', a typeset one U+2212 for the minus, a Swiss one '1'299.00':
    # each was no number, so a refund met the other register's '-1299' as missing
    import pandas as pd

    from docket.core.records.fields import detect_kind
    same = ["-1299", "(1,299.00)", "($1,299.00)", "-$1,299.00", "$-1,299", "USD -1299",
            "\u22121299", "(1.299,00 EUR)", "-1'299.00", "-1\u2019299.00"]
    assert {v: normalise.number(v) for v in same} == dict.fromkeys(same, -1299.0)
    assert normalise.number("1'234'567.50") == 1234567.5
    # no number still: an unclosed or empty bracket, two signs, a phone, a bare sign or sign
    for value in ("(12", "()", "(-5)", "--12", "-(12)", "(555) 123-4567", "12'34", "-", "$",
                  "-$", "(inf)"):
        assert normalise.number(value) is None, value
    amounts = pd.Series([f"({k:,}.50)" if k % 4 == 0 else f"{k:,}.50" for k in range(900, 1200)])
    assert detect_kind("amount", amounts) == "number"

def test_patterns_with_many_levels_stay_distinct() -> None:
    from docket.core.matching.scoring import group_patterns

    rng = np.random.default_rng(4)
    for levels in (rng.integers(0, 20, size=(2000, 3)), rng.integers(0, 3, size=(500, 30))):
        patterns, index, _ = group_patterns(levels.astype(np.int8))
        assert len(patterns) == len(np.unique(levels, axis=0))
        assert (patterns[index] == levels).all()



def test_a_huge_value_is_no_date_and_is_read_at_once() -> None:
    # the date parser took 110 s over a value of 2,000,000 digits, and a build read it twice
    assert normalise.date("1" * 2_000_000) is None
    assert normalise.date(" 12 September 2024 ") == normalise.date("2024-09-12")


def test_one_huge_value_does_not_change_a_columns_kind() -> None:
    # a value of 2,000,000 characters among 2,000 names raised their mean length past a long
    # text's: the column was compared as longtext
    import pandas as pd

    from docket.core.records.fields import detect_kind
    names = [f"{first} {last}" for first in ("Anna", "Jon", "Kari", "Per", "Ola")
             for last in ("Berg", "Dahl", "Lund", "Moe", "Nilsen", "Haugen", "Bakke", "Lie")]
    column = pd.Series([*(names * 50)[:1999], "x" * 2_000_000])
    assert detect_kind("owner", column) == "name"
    assert detect_kind("born", pd.Series([*["1980-03-03"] * 1999, "1" * 2_000_000])) == "date"
