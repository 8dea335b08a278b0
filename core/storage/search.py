"""Finding pairs by pair id, record id or the words of a record.

Record tables get a full-text index when the project is built (SQLite FTS5 through
sqlite-utils, no triggers: records never change after the build). Text is matched word by
word from the start of each word, so "smi jo" finds "Jo Smith". A project built before the
index existed, or a search the index cannot answer, falls back to a literal substring match
(ASCII letters in either case, as SQLite's LIKE does), so "50%" means the characters 5, 0 and %.
Text holding a control character (a NUL, an escape) goes straight to the substring match: the
index's tokenizer reads those characters as gaps between words, so it cannot match them.
"""

from __future__ import annotations

import sqlite3
import unicodedata
from collections.abc import Collection

from .store import quote


def index_records(conn: sqlite3.Connection, table: str, columns: list[str]) -> None:
    """Full-text index over a record table's value columns (the id column is matched exactly)."""
    import sqlite_utils  # only building a project needs it

    # FTS5 keeps rowid, rank and its own table's name as hidden columns and refuses a column
    # so named; such a column is left out of the index (find still reaches it by substring)
    hidden = {"rowid", "rank", f"{table}_fts"}
    columns = [c for c in columns if c.casefold() not in hidden]
    if columns:
        sqlite_utils.Database(conn).table(table).enable_fts(
            columns, fts_version="FTS5", create_triggers=False,
            tokenize="unicode61 remove_diacritics 2")


def _has_index(conn: sqlite3.Connection, table: str) -> bool:
    return conn.execute("SELECT 1 FROM sqlite_master WHERE name = ?",
                        (f"{table}_fts",)).fetchone() is not None


def _fts_query(text: str, columns: list[str]) -> str:
    words = " ".join('"' + w.replace('"', '""') + '"*' for w in text.split())
    names = " ".join('"' + c.replace('"', '""') + '"' for c in columns)
    return f"{{{names}}} : ({words})"


def _has_control(text: str) -> bool:
    return any(unicodedata.category(ch) == "Cc" and not ch.isspace() for ch in text)


def _records_by_text(conn: sqlite3.Connection, table: str, key: str, columns: list[str],
                     text: str, limit: int) -> list[str]:
    if _has_index(conn, table) and not _has_control(text):
        indexed = {r[1] for r in conn.execute(f"PRAGMA table_info({quote(table + '_fts')})")}
        cols = [c for c in columns if c in indexed]
        if cols:
            try:
                hits = conn.execute(
                    f"SELECT {quote(key)} FROM {quote(table)} WHERE rowid IN "
                    f"(SELECT rowid FROM {quote(table + '_fts')} WHERE "
                    f"{quote(table + '_fts')} MATCH ? LIMIT ?)",
                    (_fts_query(text, cols), limit)).fetchall()
            except sqlite3.OperationalError:  # text the query language cannot take
                hits = []
            if hits:
                return [r[0] for r in hits]
    # instr, not LIKE: LIKE ends its pattern and each value at a NUL (so a NUL in the text
    # matched every record), refuses patterns past 50,000 bytes, and needs its wildcards escaped
    cond = " OR ".join(f"instr(lower({quote(c)}), lower(?)) > 0" for c in columns)
    return [r[0] for r in conn.execute(
        f"SELECT {quote(key)} FROM {quote(table)} WHERE {cond} LIMIT ?",
        (*([text] * len(columns)), limit))]


def find_pairs(conn: sqlite3.Connection, meta: dict, link: bool, text: str, limit: int = 50,
               skip: Collection[str] = ()) -> list[int]:
    """Pairs whose pair id is ``text``, then pairs of a record whose id is ``text``, then pairs
    of records holding the words of ``text``; never looking into the ``skip`` columns.

    A number is tried as both a pair id and a record id, since numeric record ids are common.
    """
    text = text.strip()
    if not text:
        return []
    found: list[int] = []
    # ASCII digits only ("²" is a digit to str.isdigit, not to int), and no more of them than
    # a pair id can have: SQLite refused a longer number with an OverflowError
    if text.isascii() and text.isdigit() and len(text) <= 19 and int(text) < 2 ** 63:
        found += [r[0] for r in conn.execute("SELECT pair_id FROM pairs WHERE pair_id = ?",
                                             (int(text),))]
    found += [r[0] for r in conn.execute(
        "SELECT pair_id FROM pairs WHERE left_id = ? OR right_id = ? ORDER BY pair_id LIMIT ?",
        (text, text, limit))]
    if found:
        return list(dict.fromkeys(found))[:limit]
    hidden = {c.casefold() for c in skip}
    sources: list[tuple[str, str, tuple[str, ...]]] = [
        ("left_records", meta["left_id_column"], ("left_id",))]
    if link:
        sources.append(("right_records", meta["right_id_column"], ("right_id",)))
    else:  # one table: a record may sit on either side of a pair
        sources[0] = ("left_records", meta["left_id_column"], ("left_id", "right_id"))
    for table, key, sides in sources:
        columns = [r[1] for r in conn.execute(f"PRAGMA table_info({quote(table)})")
                   if r[1] != key and r[1].casefold() not in hidden]
        if not columns:
            continue
        where = " OR ".join(f"{side} = ?" for side in sides)
        for rid in _records_by_text(conn, table, key, columns, text, limit):
            found += [r[0] for r in conn.execute(
                f"SELECT pair_id FROM pairs WHERE {where} LIMIT ?",
                (*([rid] * len(sides)), limit))]
        if len(found) >= limit:
            break
    return sorted(set(found))[:limit]
