"""The header found again by one test on each row's first cell, then every cell: what keying
every cell of every row found, and nothing more."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core.errors import DocketError
from docket.core.records.text_tables import check_widths


@pytest.mark.parametrize("again", [
    "id,name", "ID,Name", " id , name ", "\ufeffid,name", "Id,NAME",  # the header again
    "id,other", "idx,name", "ıd,name", "İD,name", "x,id",  # rows that are not
])
def test_a_repeated_header_is_found_as_when_every_cell_was_keyed(tmp_path: Path,
                                                                 again: str) -> None:
    path = tmp_path / "t.csv"
    path.write_text(f"id,name\n1,anna\n{again}\n2,jon\n", encoding="utf-8")
    # keyed as the project keys names: trimmed, no mark, ASCII letters only in lower case
    key = [c.strip().lstrip("\ufeff").strip() for c in again.split(",")]
    is_header = ["".join(ch.lower() if ch.isascii() else ch for ch in c) for c in key] == \
        ["id", "name"]
    if is_header:
        with pytest.raises(DocketError, match="line 3 repeats the header"):
            check_widths(path, "utf-8", ",")
    else:
        check_widths(path, "utf-8", ",")  # read as a record


def test_a_header_with_a_non_ascii_first_name_is_found_again(tmp_path: Path) -> None:
    # 'İ'.lower() is two characters, and the project tells 'İd' from 'id': the first test
    # lowers both sides alike
    path = tmp_path / "t.csv"
    path.write_text("İd,name\n1,anna\nİd,NAME\n", encoding="utf-8")
    with pytest.raises(DocketError, match="line 3 repeats the header"):
        check_widths(path, "utf-8", ",")
    path.write_text("İd,name\n1,anna\nid,name\n", encoding="utf-8")
    check_widths(path, "utf-8", ",")
