"""A JSON file holding half of a UTF-16 pair (an escape \\uD800 .. \\uDFFF without its other half:
an emoji cut in two by a program that counts UTF-16 units) is read with U+FFFD in its place and
a warning naming the first; it ended 'docket new' in a traceback (UnicodeEncodeError)."""

from __future__ import annotations

import json
import sqlite3
import warnings
from pathlib import Path

import pytest

from docket.core.records.sources import read_frame
from docket.tui.cli import main

# U+1F600 is the UTF-16 pair D83D DE00 (Unicode Standard, section 3.9, UTF-16); json.loads joins a
# whole pair, as RFC 8259 section 7 writes characters outside the BMP, and keeps a half alone
WHOLE, HALF = "\\ud83d\\ude00", "\\ud83d"


@pytest.mark.parametrize("shape", ["lines", "array"])
def test_half_a_pair_is_read_as_the_replacement_character(tmp_path: Path, shape: str) -> None:
    records = [f'{{"id": "a", "name": "{WHOLE} ok"}}', f'{{"id": "b", "name": "{HALF} cut"}}',
               f'{{"id": "c{HALF}", "{HALF}k": "x"}}']
    path = tmp_path / ("t.jsonl" if shape == "lines" else "t.json")
    path.write_text("\n".join(records) + "\n" if shape == "lines" else
                    "[" + ", ".join(records) + "]", encoding="utf-8")
    with warnings.catch_warnings(record=True) as seen:
        warnings.simplefilter("always")
        frame = read_frame(path)
    assert frame["name"].tolist() == ["\U0001F600 ok", "\ufffd cut", None]
    assert frame["id"].tolist() == ["a", "b", "c\ufffd"]
    assert "\ufffdk" in frame.columns
    assert [str(w.message) for w in seen] == [
        f"{path}: record 2, 'name' holds half of a UTF-16 pair (an escape \\uD800 to \\uDFFF "
        "without its other half), which is no character; read as U+FFFD (3 such values in all)"]
    json.loads(frame.to_json())  # each value is text UTF-8 can hold


def test_new_builds_from_such_a_file(tmp_path: Path, capsys) -> None:
    path = tmp_path / "people.jsonl"
    path.write_text("".join(f'{{"id": "{i}", "name": "{n}"}}\n' for i, n in
                            enumerate(["ann vale", f"ann vale{HALF}", "bo moor", "cy ford"])),
                    encoding="utf-8")
    target = tmp_path / "p.docket"
    assert main(["new", str(target), "--left", str(path), "--id", "id"]) == 0
    assert "half of a UTF-16 pair" in capsys.readouterr().err
    with sqlite3.connect(target) as conn:
        names = {n for (n,) in conn.execute("SELECT name FROM left_records")}
    conn.close()
    assert "ann vale\ufffd" in names
