"""Parquet columns a CSV cannot hold (lists, structs, bytes, zoned times, decimals) are kept as
readable text, and a Parquet file's records are numbered as records, not as rows under a header."""

from __future__ import annotations

import datetime
import decimal
import json
from pathlib import Path

import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from docket.core.errors import DocketError
from docket.core.records.sources import load_table


def _table(path: Path, **columns: pa.Array) -> Path:
    pq.write_table(pa.table({"id": pa.array(["1", "2", "3"]), **columns}), path)
    return path


def test_nested_and_binary_values_are_json_and_hex_text(tmp_path: Path) -> None:
    zone = datetime.timezone(datetime.timedelta(hours=1))
    path = _table(
        tmp_path / "odd.parquet",
        tags=pa.array([["a", "ø"], [], None]),
        addr=pa.array([{"street": "Storgata", "no": 1}] * 3),
        blob=pa.array([b"\x00\xff", "å".encode(), None]),
        seen=pa.array([datetime.datetime(2020, 1, 1, 12, tzinfo=zone)] * 3,
                      pa.timestamp("s", tz="+01:00")),
        amount=pa.array([decimal.Decimal("12.30"), None, decimal.Decimal("-0.01")],
                        pa.decimal128(6, 2)))
    frame = load_table(path, "id").frame
    # each value read back by the standard json module (an outside reader)
    assert json.loads(frame.at["1", "tags"]) == ["a", "ø"]
    assert frame.at["2", "tags"] == "[]" and frame.at["3", "tags"] is None
    assert json.loads(frame.at["1", "addr"]) == {"street": "Storgata", "no": 1}
    assert frame.at["1", "blob"] == "0x00ff" and frame.at["2", "blob"] == "å"
    assert frame.at["1", "seen"] == "2020-01-01 12:00:00+01:00"
    assert frame.at["1", "amount"] == "12.30" and frame.at["3", "amount"] == "-0.01"


def test_a_parquet_file_names_the_record_not_a_header_row(tmp_path: Path) -> None:
    path = tmp_path / "gap.parquet"
    pq.write_table(pa.table({"id": pa.array(["1", None, "3"]), "name": ["a", "b", "c"]}), path)
    with pytest.raises(DocketError, match=r"gap.parquet: column 'id' is empty on record 2; "):
        load_table(path, "id")


def test_two_columns_of_one_name_are_named_as_such(tmp_path: Path) -> None:
    # a valid file, yet refused as "cannot read it as parquet (Multiple matches for
    # FieldRef.Name(name) ...); check the file type", as if it were damaged
    path = tmp_path / "twice.parquet"
    pq.write_table(pa.Table.from_arrays([pa.array(["1", "2"]), pa.array(["Ana", "Bo"]),
                                         pa.array(["x", "y"])], names=["id", "name", "name"]),
                   path)
    with pytest.raises(DocketError) as refused:
        load_table(path, "id")
    assert str(refused.value) == (f"{path}: columns 2 and 3 are both named 'name' (spaces at "
                                  "the ends do not count); rename one")
