"""Pairs spread over bucket files on disk give the project an in-memory build gives."""

from __future__ import annotations

import sqlite3
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import DocketError, Project
from docket.core.storage import build, spilled
from tests.test_stream_pairs import _pairs, _parts, _spec

KEEP = 300


def _table(path: Path) -> list[tuple]:
    with sqlite3.connect(path) as conn:
        pairs = conn.execute("SELECT * FROM pairs ORDER BY pair_id").fetchall()
        meta = conn.execute("SELECT * FROM meta WHERE key IN ('sampling', 'blocking') "
                            "ORDER BY key").fetchall()
    return pairs + meta


def _build(path: Path, folder: Path, spill: bool, monkeypatch: pytest.MonkeyPatch
           ) -> tuple[list[tuple], list[str]]:
    with monkeypatch.context() as m:
        if spill:  # many small buckets, so that every pair's bucket matters
            m.setattr(spilled, "BUCKET", 97)
        else:
            m.setattr(spilled, "worth_spilling", lambda *a: False)
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            Project.create(_spec(path, folder, sample_above=KEEP, workers=1))
        seen = [str(w.message) for w in caught if "left out" in str(w.message)]
    return _table(path), seen


def test_spilled_build_equals_the_in_memory_one(tmp_path: Path,
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    frame = _pairs(60)  # 1,800 pairs, three of them given twice
    frame = pd.concat([frame, frame.iloc[[5, 9, 700]]], ignore_index=True)
    folder = _parts(frame, tmp_path / "pairs", 5)
    made, spill_warn = _build(tmp_path / "s.docket", folder, True, monkeypatch)
    plain, plain_warn = _build(tmp_path / "m.docket", folder, False, monkeypatch)
    assert made == plain
    assert spill_warn == plain_warn and "3 pairs given before" in spill_warn[0]
    with sqlite3.connect(tmp_path / "s.docket") as conn:
        kept = conn.execute("SELECT count(*) FROM pairs").fetchone()[0]
    assert kept == KEEP  # sampled: the project holds the sample, not all 1,800 pairs
    assert not list(tmp_path.glob(".*.spill"))  # the buckets are gone


def test_a_bad_part_leaves_no_buckets_behind(tmp_path: Path,
                                             monkeypatch: pytest.MonkeyPatch) -> None:
    frame = _pairs(60)
    frame.loc[1500, "left_id"] = "no-such-client"
    folder = _parts(frame, tmp_path / "pairs", 5)
    monkeypatch.setattr(spilled, "BUCKET", 97)
    with pytest.raises(Exception, match="no-such-client"):
        Project.create(_spec(tmp_path / "s.docket", folder, sample_above=KEEP, workers=1))
    assert not list(tmp_path.glob(".*")) and not (tmp_path / "s.docket").exists()


def test_buckets_on_a_full_disk_are_one_line_and_leave_nothing(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # numpy's 'OSError: 118591 requested and 68608 written' ended the build in a traceback
    folder = _parts(_pairs(60), tmp_path / "pairs", 5)
    monkeypatch.setattr(spilled, "BUCKET", 97)

    def short_write(*_a: object) -> None:
        raise OSError("118591 requested and 68608 written")

    monkeypatch.setattr(spilled, "first_seen", short_write)
    with pytest.raises(DocketError) as caught:
        Project.create(_spec(tmp_path / "s.docket", folder, sample_above=KEEP, workers=1))
    assert str(caught.value) == (
        f"{tmp_path}: cannot set the pairs aside beside the project (the disk is full; they "
        "take 16 bytes a pair while read); nothing was saved; free some space and try again")
    assert not list(tmp_path.glob(".*")) and not (tmp_path / "s.docket").exists()


def test_buckets_of_a_dead_build_are_removed(tmp_path: Path) -> None:
    target = tmp_path / "p.docket"
    dead = tmp_path / f".{target.name}.999999999.spill"
    dead.mkdir()
    (dead / "0.keys").write_bytes(b"x")
    build.remove_stale_builds(target)
    assert not dead.exists()


def test_buckets_spread_keys_evenly() -> None:
    keys = np.arange(0, 2_000_000, 7, dtype=np.int64) * 1_000  # a regular pattern
    counts = np.bincount(spilled.bucket_of(keys, 13), minlength=13)
    assert counts.min() > 0.95 * counts.mean()


def _self_pairs(tmp_path: Path) -> tuple[Path, Path]:
    """One table of invented clients and a Parquet file of each client paired with itself."""
    ids = [f"c{i:03d}" for i in range(120)]
    table = tmp_path / "clients.csv"
    pd.DataFrame({"id": ids, "name": [f"Wren Ostby{i % 9}" for i in range(120)]}).to_csv(
        table, index=False)
    pairs = tmp_path / "self.parquet"
    pd.DataFrame({"left_id": ids * 2, "right_id": ids * 2}).to_parquet(pairs, index=False)
    return table, pairs


def test_a_file_of_self_pairs_only_is_named_so_when_spilled(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys) -> None:
    # the spilled path blamed the blocking rules, which a pairs file does not use
    from tests.test_bad_input import assert_one_line_error, run
    table, pairs = _self_pairs(tmp_path)
    monkeypatch.setattr(spilled, "BUCKET", 97)
    for above in ("100", "1000000"):  # spilled, and held in memory: the same line
        code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(table),
                        "--id", "id", "--pairs", str(pairs), "--sample-above", above)
        assert_one_line_error(code, err, f"{pairs}: holds no pair of two different records",
                              "240 pairs of a record with itself")
        assert "blocking" not in err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["clients.csv", "self.parquet"]
