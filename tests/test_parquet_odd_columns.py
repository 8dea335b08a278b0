"""Parquet columns a CSV cannot hold (lists, structs, bytes, zoned times, decimals) are kept as
readable text, and a Parquet file's records are numbered as records, not as rows under a header."""

from __future__ import annotations

import datetime
import decimal
import json
from pathlib import Path

import numpy as np
import pandas as pd
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


BIG = [12345678901234567, None, 12345678901234568, 18446744073709551615]


@pytest.mark.parametrize("suffix", [".parquet", ".jsonl", ".json"])
def test_large_integers_beside_a_missing_value_are_read_exactly(tmp_path: Path,
                                                                suffix: str) -> None:
    # pandas took a column of integers with a gap through a float: 12345678901234567 was read
    # as ...568, so two records agreed on a number neither holds; JSON lines refused a number
    # past 64 bits as "cannot be read as JSON lines"
    path = tmp_path / f"big{suffix}"
    ids = ["1", "2", "3", "4"]
    if suffix == ".parquet":
        pq.write_table(pa.table({"id": ids, "nr": pa.array(BIG, pa.uint64()),
                                 "small": pa.array([1, None, -3, 4], pa.int8())}), path)
    else:
        rows = [{"id": i, "nr": n, "small": s} for i, n, s in zip(ids, BIG, [1, None, -3, 4],
                                                                  strict=True)]
        if suffix == ".jsonl":
            rows[2]["nr"] = 10 ** 30  # past 64 bits
        path.write_text("\n".join(map(json.dumps, rows)) if suffix == ".jsonl"
                        else json.dumps(rows), encoding="utf-8")
    frame = load_table(path, "id").frame
    big = [None if n is None else str(n) for n in BIG]
    if suffix == ".jsonl":
        big[2] = str(10 ** 30)
    assert frame["nr"].tolist() == big
    assert frame["small"].tolist() == ["1", None, "-3", "4"]


def test_json_numbers_keep_every_digit(tmp_path: Path) -> None:
    # pandas' JSON reader parsed 0.26633056045725956 as 0.266330560457259
    path = tmp_path / "f.jsonl"
    path.write_text('{"id": 1, "x": 0.26633056045725956}\n{"id": 2, "x": 1.5}\n',
                    encoding="utf-8")
    assert load_table(path, "id").frame["x"].tolist() == ["0.26633056045725956", "1.5"]


def test_an_id_that_pandas_wrote_as_the_index_is_a_column(tmp_path: Path) -> None:
    # df.set_index('id').to_parquet(...) was refused: "no column 'id'; columns are name"
    path = tmp_path / "indexed.parquet"
    pd.DataFrame({"id": ["a1", "b2"], "name": ["Tove", "Ivo"]}).set_index("id").to_parquet(path)
    table = load_table(path, "id")
    assert table.frame.index.tolist() == ["a1", "b2"]
    assert table.frame["name"].tolist() == ["Tove", "Ivo"]
    unnamed = tmp_path / "filtered.parquet"  # an unnamed index stays out of the columns
    pd.DataFrame({"id": ["a1", "b2", "c3"], "name": ["Tove", "Ivo", "Siv"]}).iloc[[0, 2]] \
        .to_parquet(unnamed)
    assert load_table(unnamed, "id").columns == ["name"]


def test_half_floats_are_read_as_numbers(tmp_path: Path) -> None:
    # a float16 column (Arrow's halffloat) ended 'docket new' in a traceback: "float16
    # indexes are not supported". 65504 is float16's largest value (IEEE 754 binary16);
    # numpy's shortest text for it is '6.55e+04', for 0.1 '0.1' (its float64 is 0.09997...)
    path = _table(tmp_path / "half.parquet",
                  # from numpy's float16: pyarrow 16 (the declared floor) takes no Python floats
                  x=pa.array(np.array([0.1, 0.0, 65504.0], dtype=np.float16),
                             mask=np.array([False, True, False])))
    frame = load_table(path, "id").frame
    assert frame["x"].tolist() == ["0.1", None, "65504"]
