"""Find: a number is both a pair id and a record id; words match from their start through the
full-text index; other text is a literal substring (wildcards, NULs and control characters
included); masked columns are never searched."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from docket.core import NewProject, Project


def _numeric_project(tmp_path: Path) -> Path:
    left = tmp_path / "left.csv"
    right = tmp_path / "right.csv"
    # record ids 1..40 on both sides, so "4" is a pair id and a record id at once
    left.write_text("id,name,note\n" + "".join(
        f"{i},Anna Berg{i},{'50% off' if i == 7 else 'plain_note'}\n"
        for i in range(1, 41)), encoding="utf-8")
    right.write_text("id,name,note\n" + "".join(
        f"{i},Anna Berg{i},x\n" for i in range(1, 41)), encoding="utf-8")
    path = tmp_path / "n.docket"
    Project.create(NewProject(path=path, left=left, right=right, left_id="id", right_id="id",
                              rules=["name"]))
    return path


def test_a_number_finds_the_pair_and_the_records_pairs(tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        rows = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs").fetchall()
        of_record_4 = {pid for pid, a, b in rows if "4" in (a, b)}
        assert of_record_4, "the fixture must give record 4 a pair"
        found = p.find("4", limit=500)
        assert found[0] == 4  # the pair id first...
        assert of_record_4 <= set(found)  # ...and every pair of record 4 too


def test_words_match_from_their_start_in_any_order(tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        rows = dict(((a, b), pid) for pid, a, b in p.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs"))
        want = {pid for (a, b), pid in rows.items() if a == "12" or b == "12"}
        assert want, "the fixture must give record 12 a pair"
        assert want <= set(p.find("berg12 ann", limit=500))
        assert p.find("zzzz") == []


def test_like_wildcards_are_literal(tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        pairs_of_7 = {pid for pid, a in p.connection.execute(
            "SELECT pair_id, left_id FROM pairs") if a == "7"}
        # "0%" is a substring of "50% off" only when % is taken literally; unescaped it would
        # match every note holding a 0 or nothing at all
        assert pairs_of_7
        assert set(p.find("0% o", limit=500)) == pairs_of_7
        assert p.find("n_t") == []  # "_" is not "any character": plain_note has no "n_t"


def test_masked_columns_are_not_searched_by_the_index(tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        assert p.find("50% off")
        assert p.find("50% off", skip={"NOTE"}) == []


def test_a_project_without_the_index_still_finds_text(tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    conn = sqlite3.connect(path)
    for (name,) in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table' AND "
                                "name LIKE '%records_fts'").fetchall():
        conn.execute(f"DROP TABLE {name}")
    conn.commit()
    conn.close()
    with Project.open(path) as p:
        assert p.find("erg12")  # substring match when there is no index


def test_a_pasted_search_longer_than_sqlite_s_like_limit_is_answered(tmp_path: Path) -> None:
    # SQLite refuses LIKE patterns over 50,000 bytes ("LIKE or GLOB pattern too complex",
    # its documented SQLITE_MAX_LIKE_PATTERN_LENGTH); a 100 kB paste into find met that
    long = "Lorem ipsum " * 6000
    left = tmp_path / "long.csv"
    left.write_text(f"id,name,note\n1,Anna,a{long}\n2,Anne,a{long}\n3,Jon,b\n", encoding="utf-8")
    path = tmp_path / "l.docket"
    Project.create(NewProject(path=path, left=left, left_id="id", rules=["note[:1]"]))
    with Project.open(path) as p:
        assert p.find("x" * 100_000) == []
        assert p.find(("A" + long[:59_999]).upper()) == [1]  # ASCII case folded, as LIKE does


def _control_project(tmp_path: Path) -> Path:
    left = tmp_path / "ctl.csv"
    # a NUL and a control character inside values, as a badly exported table can hold them
    left.write_text("id,name,note\n" + "".join(
        f"{i},Berit Lund{i},n\x00{i}\x01q\n" for i in range(1, 31)), encoding="utf-8")
    path = tmp_path / "ctl.docket"
    Project.create(NewProject(path=path, left=left, left_id="id", rules=["name[:5]"]))
    return path


def test_a_nul_in_the_search_text_is_matched_literally_not_as_the_end_of_it(
        tmp_path: Path) -> None:
    # SQLite's LIKE stopped its pattern at the NUL, so "\x00" was "%" and found every record
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        assert p.find("\x00") == []
        assert p.find("\x00zzzz") == []
        assert p.find("Anna\x00") == []
    path = _control_project(tmp_path)
    with Project.open(path) as p:
        rows = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs").fetchall()
        of_7 = {pid for pid, a, b in rows if "7" in (a, b)}
        assert of_7, "the fixture must give record 7 a pair"
        assert set(p.find("n\x007\x01", limit=500)) == of_7
        assert len(p.find("\x00", limit=500)) == len(rows)  # every value holds one


def test_text_of_control_characters_alone_matches_only_values_holding_them(
        tmp_path: Path) -> None:
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        for text in ("\x01", "\x01\x02", "\x1b[", "\x7f", "\x9b"):
            assert p.find(text) == [], repr(text)
    path = _control_project(tmp_path)
    with Project.open(path) as p:
        total = p.connection.execute("SELECT count(*) FROM pairs").fetchone()[0]
        assert len(p.find("\x01q", limit=500)) == total
        assert p.find("\x02") == []


def test_digits_that_are_no_pair_id_are_searched_as_text(tmp_path: Path) -> None:
    # a number past SQLite's integers raised OverflowError, and "²" (a digit to str.isdigit)
    # raised ValueError: the find screen fell over on either
    path = _numeric_project(tmp_path)
    with Project.open(path) as p:
        assert p.find("9" * 30) == [] and p.find("9" * 5000) == []
        assert p.find(str(2 ** 63)) == []
        assert p.find("²") == [] and p.find("٣") == []
        assert p.find("0004")[0] == 4  # leading zeros still name the pair
