"""The Arrow path of normalising gives what each value's own normaliser gives."""

from __future__ import annotations

import numpy as np
import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.records import normalise
from docket.core.records.normalise_arrow import apply
from tests.conftest import SAMPLE

ASCII = st.text(st.sampled_from(list("aZ09_ -./()+&;@,\t\n\x0b\x0c\r\x1c\x1f'")), max_size=14)
ANY = st.one_of(ASCII, st.text(max_size=8), st.sampled_from(["Zoë Ångström", "&amp;Co", "１２３"]))
FUNCS = (normalise.words, normalise.name, normalise.code, normalise.date)
DATES = st.one_of(
    st.builds(lambda y, m, d, sep, tail: f"{sep}{y:04d}-{m:0{len(str(m))}d}-{d:02d}{tail}",
              st.integers(0, 9999), st.integers(0, 13), st.integers(0, 32),
              st.sampled_from(["", " ", "\t"]), st.sampled_from(["", " ", "T10:00", "x", "5"])),
    st.sampled_from(["31/12/1990", "12/31/1990", "03.04.1990", "now", "1990", "2020-1-2",
                     "Jan 5 2001", "2020-02-30", "1900-02-29", "2000-02-29", "0000-01-01"]))


@settings(max_examples=80, deadline=None)
@given(st.lists(ANY, min_size=1, max_size=25, unique=True))
def test_arrow_path_matches_each_value(values: list[str]) -> None:
    uniques = np.array(values, dtype=object)
    for func in FUNCS:
        assert apply(uniques, func) == [func(v) for v in values], func.__name__


@settings(max_examples=80, deadline=None)
@given(st.lists(DATES, min_size=1, max_size=25, unique=True))
def test_arrow_dates_match_each_value(values: list[str]) -> None:
    assert apply(np.array(values, dtype=object), normalise.date) == [normalise.date(v)
                                                                     for v in values]


def test_iso_days_are_the_calendars() -> None:
    # datetime.date (the standard library's proleptic Gregorian calendar) as the reference
    import datetime as dt

    assert apply(np.array(["1970-01-01", "2000-02-29", "0001-01-01", "9999-12-31"],
                          dtype=object), normalise.date) == [
        0.0, float(dt.date(2000, 2, 29).toordinal() - 719163),
        float(dt.date(1, 1, 1).toordinal() - 719163),
        float(dt.date(9999, 12, 31).toordinal() - 719163)]


def test_phone_like_codes_keep_their_last_nine_digits() -> None:
    values = np.array(["+44 20 7946 0958", "020-7946-0958", "123456", "12 34 567", "AB1 2CD"],
                      dtype=object)
    got = apply(values, normalise.code)
    assert got == [normalise.code(v) for v in values]
    assert got[:4] == ["079460958", "079460958", "123456", "1234567"]  # worked by hand


def test_sample_values_normalise_alike() -> None:
    frame = pd.read_csv(SAMPLE / "practice_north.csv", dtype=str, keep_default_na=False)
    for col in frame.columns:
        uniques = np.array(frame[col].unique(), dtype=object)
        for func in FUNCS:
            assert apply(uniques, func) == [func(v) for v in uniques], (col, func.__name__)


def test_other_normalisers_and_mixed_values_take_the_value_path() -> None:
    assert apply(np.array(["2020-01-02"], dtype=object), normalise.number) is None
    assert apply(np.array(["a", 1], dtype=object), normalise.words) is None


def _fold_by_definition(value: str) -> str:
    """Invisible format characters dropped (tested on their own below), then every character
    of nonzero combining class after NFKD, then case-folded."""
    import unicodedata

    decomposed = unicodedata.normalize("NFKD", normalise.visible(value))
    return "".join(ch for ch in decomposed if not unicodedata.combining(ch)).casefold()


def test_invisible_format_characters_are_dropped_before_comparing() -> None:
    # Copying from web pages and documents leaves characters a reviewer cannot see: 'QX1234'
    # and 'QX12<zero-width space>34' looked equal on the card and compared as two codes. Each
    # below is a default-ignorable code point of Unicode's DerivedCoreProperties.txt and of
    # category Cf (format), checked against unicodedata.
    import unicodedata

    invisible = ["\u00ad", "\u200b", "\u200c", "\u200d", "\u200e", "\u200f", "\u202a",
                 "\u2060", "\ufeff", "\U000e0041"]
    assert all(unicodedata.category(ch) == "Cf" for ch in invisible)
    for ch in invisible:
        assert normalise.code(f"QX12{ch}34") == "qx1234"
        assert normalise.words(f"Ann{ch}a Smith") == "anna smith"
        assert normalise.number(f"1{ch}299") == 1299.0
        assert normalise.date(f"{ch}2001-02-03") == normalise.date("2001-02-03")
    # what shows stays: letters of other scripts, the combining grapheme joiner (kept by fold)
    assert normalise.words("Zoë \u0645\u0631\u0648\u0629") == "zoe \u0645\u0631\u0648\u0629"


@settings(max_examples=300, deadline=None)
@given(st.one_of(st.text(max_size=12),
                 st.text(st.sampled_from(list("aeoAZ ßøŁ\u0301\u0308\u034f\u0489\u05b0\u1dc0"
                                              "éÅñçǅﬁ")), max_size=12)))
def test_fold_strips_exactly_the_combining_marks(value: str) -> None:
    # The fast removal of U+0300-U+036F (U+034F kept) must change nothing but speed.
    assert normalise.fold(value) == _fold_by_definition(value)


def test_a_column_of_few_values_normalises_as_a_column_of_many() -> None:
    # Below distinct.SMALL values the per-value path runs instead of Arrow: same answer.
    from docket.core.records import distinct

    few = ["Zoë  Ångström", "A-B/C", "x", None, "&amp;Co", "Kasia Nowak", "12.5"]
    many = few + [f"filler {i}" for i in range(distinct.SMALL)]
    for func in FUNCS:
        assert distinct.per_distinct(few, func).tolist() == \
            distinct.per_distinct(many, func)[:len(few)].tolist(), func.__name__


def test_a_code_written_with_or_without_its_separator_is_one_word() -> None:
    # worked by hand: a separator beside a digit inside a word is dropped ('DC-3716' is the
    # code dc3716, as product codes and house numbers are written either way; common practice),
    # a separator between letters ('Over-Ear') or standing alone keeps the words apart
    values = ["Kamek Blender DC-3716", "KAMEK blender dc3716", "KDL-40V4100 Over-Ear",
              "1.7L Kettle", "x - 3", "Jean-Luc", "a-1-b-2"]
    got = [normalise.words(v) for v in values]
    assert got == ["kamek blender dc3716", "kamek blender dc3716", "kdl40v4100 over ear",
                   "17l kettle", "x 3", "jean luc", "a1b2"]
    assert apply(np.array(values, dtype=object), normalise.words) == got
