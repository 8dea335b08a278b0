"""A date column's order (day or month first) read from the dates that can only be read one way."""

from __future__ import annotations

import datetime as dt

import pandas as pd

from docket.core.matching.scoring import normalised
from docket.core.records import normalise
from docket.core.types import FieldSpec


def _days(y: int, m: int, d: int) -> float:
    return float((dt.date(y, m, d) - dt.date(1970, 1, 1)).days)


def test_a_month_first_column_reads_its_ambiguous_dates_month_first() -> None:
    us = ["03/04/1980", "12/25/1971", "07/19/1990", "01/02/2001"]
    read = normalise.date_reader(us)
    assert read is normalise.date_month_first
    assert read("03/04/1980") == _days(1980, 3, 4)
    assert read("12/25/1971") == _days(1971, 12, 25)
    assert read("25/12/1971") == _days(1971, 12, 25)  # can only be day first: read so
    assert read("1980-03-04") == _days(1980, 3, 4)


def test_day_first_stays_the_default() -> None:
    # one month-first date alone, or a column with both kinds, keeps the usual order
    assert normalise.date_reader(["03/04/1980", "12/25/1971"]) is normalise.date
    mixed = ["12/25/1971", "07/19/1990", "25/12/1971"]
    assert normalise.date_reader(mixed) is normalise.date
    assert normalise.date_reader(["25/12/1971", "03/04/1980"]) is normalise.date
    assert normalise.date("03/04/1980") == _days(1980, 4, 3)


def test_each_side_of_a_link_is_read_in_its_own_order() -> None:
    field = FieldSpec("born", "born", "born", "date")
    us = pd.DataFrame({"born": ["03/04/1980", "12/25/1971", "07/19/1990"] + [None] * 200})
    eu = pd.DataFrame({"born": ["04/03/1980", "25/12/1971", "19/07/1990"] + [None] * 200})
    left, right = normalised([field], us, "left")["born"], normalised([field], eu, "right")["born"]
    assert list(left[:3]) == list(right[:3]) == [_days(1980, 3, 4), _days(1971, 12, 25),
                                                 _days(1990, 7, 19)]
    # through Arrow (100 distinct values or more) as one by one
    many = [f"{m:02d}/{d:02d}/19{y}" for m in (1, 2, 3) for d in range(13, 29) for y in (60, 61)]
    frame = pd.DataFrame({"born": ["03/04/1980", *many]})
    assert normalised([field], frame, "left")["born"][0] == _days(1980, 3, 4)
