"""Merging offline copies: idempotent, order-independent, all or nothing, same project only."""

from __future__ import annotations

import shutil
import sqlite3
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from docket.core import DocketError, Project
from docket.core.reviewing.merge import merge

from .team_support import LEFT, RIGHT, run, tiny_project

REVIEWERS = ("ana", "ben", "ines")
LABELS = ("match", "non-match", "hold")


@pytest.fixture(scope="module")
def base(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tiny_project(tmp_path_factory.mktemp("base"))


@pytest.fixture(scope="module")
def stranger(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Another project: one more right record, so other records and other pairs."""
    return tiny_project(tmp_path_factory.mktemp("stranger"), "other.docket",
                        right=RIGHT + "e,Ola Nord,Oslo,1950-01-01\n")


def copy(src: Path, dst: Path) -> Path:
    shutil.copy(src, dst)
    return dst


def snapshot(path: Path) -> dict[str, object]:
    """Everything a merge may change, in forms that ignore row order."""
    with sqlite3.connect(path) as conn:
        return {
            "log": set(conn.execute("SELECT * FROM decisions")),
            "current": set(conn.execute("SELECT * FROM current")),
            "pairs": conn.execute("SELECT pair_id, n_labels, open FROM pairs "
                                  "ORDER BY pair_id").fetchall(),
            "reviewers": set(conn.execute("SELECT name, role, added_at FROM reviewers")),
        }


def expected_current(path: Path) -> set[tuple]:
    """``current`` computed from the log alone: latest standing label per (pair, who, role)."""
    with sqlite3.connect(path) as conn:
        log = conn.execute("SELECT decision_id, pair_id, reviewer, role, label, decided_at, "
                           "supersedes FROM decisions").fetchall()
    retracted = {row[6] for row in log if row[4] is None}
    best: dict[tuple, tuple] = {}
    for did, pid, who, role, label, at, _ in log:
        if label is None or did in retracted:
            continue
        key = (pid, who, role)
        if key not in best or (at, did) > (best[key][5], best[key][3]):
            best[key] = (pid, who, role, did, label, at)
    return set(best.values())


def decide_some(path: Path, ops: list[tuple[int, str, str]]) -> None:
    with Project.open(path) as p:
        pairs = [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs")]
        for pair, who, label in ops:
            p.decide(pairs[pair % len(pairs)], who, label)


def test_merging_twice_changes_nothing(base: Path, tmp_path: Path) -> None:
    target, other = copy(base, tmp_path / "p.docket"), copy(base, tmp_path / "ines.docket")
    decide_some(other, [(0, "ines", "match"), (1, "ines", "hold"), (2, "ines", "non-match")])
    with Project.open(other) as p:
        p.undo("ines")
    with Project.open(target) as p:
        first = merge(p, [other])
    assert (first.added, first.by_reviewer, first.pairs_touched) == (4, {"ines": 4}, 3)
    assert first.new_reviewers == ("ines",)
    once = snapshot(target)
    assert once["current"] == expected_current(target) and len(once["current"]) == 2
    with Project.open(target) as p:
        again = merge(p, [other, other])
    assert again.added == 0 and [f.new for f in again.files] == [0, 0]
    assert snapshot(target) == once


def test_roles_are_not_imported(base: Path, tmp_path: Path) -> None:
    target, other = copy(base, tmp_path / "p.docket"), copy(base, tmp_path / "o.docket")
    with Project.open(other) as p:
        p.decide(1, "zoe", "match", "same pet", role="adjudicator")
    with Project.open(target) as p:
        result = merge(p, [other])
        roles = dict(p.connection.execute("SELECT name, role FROM reviewers"))
    assert roles == {"zoe": "reviewer"} and result.unconfirmed_adjudicators == ("zoe",)


# one op: (which copy: 0 origin before copying, 1 A, 2 B, 3 the target), pair, who, role, label;
# label None means undo
ops_strategy = st.lists(
    st.tuples(st.integers(0, 3), st.integers(0, 7), st.sampled_from(REVIEWERS),
              st.sampled_from(("reviewer", "reviewer", "adjudicator")),
              st.one_of(st.none(), st.sampled_from(LABELS))),
    max_size=24)


def play(path: Path, ops: list[tuple]) -> None:
    with Project.open(path) as p:
        pairs = [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs ORDER BY 1")]
        for _, pair, who, role, label in ops:
            if label is None:
                p.undo(who, role=role)
            else:
                p.decide(pairs[pair], who, label, role=role)


@settings(max_examples=25, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(ops=ops_strategy)
def test_merge_is_idempotent_and_commutative(base: Path, ops: list[tuple]) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        origin = copy(base, folder / "origin.docket")
        play(origin, [o for o in ops if o[0] == 0])  # history every copy shares
        a, b, target = (copy(origin, folder / f"{n}.docket") for n in ("a", "b", "target"))
        for which, path in ((1, a), (2, b), (3, target)):
            play(path, [o for o in ops if o[0] == which])
        ab, ba, both = (copy(target, folder / f"{n}.docket") for n in ("ab", "ba", "both"))
        for path, order in ((ab, [[a], [b]]), (ba, [[b], [a]]), (both, [[a, b]])):
            for files in order:
                with Project.open(path) as p:
                    merge(p, files)
        result = snapshot(ab)
        assert snapshot(ba) == result and snapshot(both) == result
        assert result["current"] == expected_current(ab)
        n_labels: dict[int, int] = {}
        for pid, _, role, *_ in result["current"]:
            n_labels[pid] = n_labels.get(pid, 0) + (role == "reviewer")
        assert all(n == n_labels.get(pid, 0) for pid, n, _ in result["pairs"])
        with Project.open(ab) as p:
            assert merge(p, [b, a]).added == 0
        assert snapshot(ab) == result


def test_a_different_project_is_refused_with_one_line_and_nothing_written(
        base: Path, stranger: Path, tmp_path: Path, capsys) -> None:
    target, good = copy(base, tmp_path / "p.docket"), copy(base, tmp_path / "good.docket")
    decide_some(good, [(0, "ines", "match")])
    before = snapshot(target)
    assert run(["merge", str(target), str(good), str(stranger)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(stranger) in err and "different project" in err
    assert snapshot(target) == before

    text = tmp_path / "labels.csv"
    text.write_text(LEFT, encoding="utf-8")
    for bad in (text, target, tmp_path / "missing.docket"):
        assert run(["merge", str(target), str(bad)]) == 2
        err = capsys.readouterr().err
        assert err.count("\n") == 1 and str(bad) in err
    assert snapshot(target) == before
    with Project.open(target) as p, pytest.raises(DocketError, match="at least one"):
        merge(p, [])


def test_merge_cli_says_what_came_in(base: Path, tmp_path: Path, capsys) -> None:
    target, other = copy(base, tmp_path / "p.docket"), copy(base, tmp_path / "o.docket")
    decide_some(other, [(0, "ines", "match"), (1, "ines", "non-match")])
    assert run(["merge", str(target), str(other)]) == 0
    out = capsys.readouterr().out
    assert "2 decisions, 2 new" in out and "brought 2 decisions" in out and "ines 2" in out
    assert run(["merge", str(target), str(other)]) == 0
    assert "nothing new" in capsys.readouterr().out


def test_a_copy_s_name_differing_only_in_case_is_pointed_out(base: Path, tmp_path: Path,
                                                             capsys) -> None:
    # a copy made before such names were refused: its 'Ines' is kept (the log is not rewritten)
    # but the merge says that it and 'ines' now count as two reviewers
    other = copy(base, tmp_path / "o.docket")
    decide_some(other, [(1, "Ada", "match")])
    conn = sqlite3.connect(other)  # as an older docket would have let it be typed
    with conn:
        conn.execute("UPDATE decisions SET reviewer = 'Ines' WHERE reviewer = 'Ada'")
        conn.execute("UPDATE reviewers SET name = 'Ines' WHERE name = 'Ada'")
    conn.close()
    first, second = copy(base, tmp_path / "p.docket"), copy(base, tmp_path / "q.docket")
    for target in (first, second):
        decide_some(target, [(0, "ines", "match")])
    with Project.open(first) as p:
        result = merge(p, [other])
    assert result.new_reviewers == ("Ines",) and result.alike_names == (("Ines", "ines"),)
    assert run(["merge", str(second), str(other)]) == 0
    assert ("note: Ines (from a copy) and ines differ only in letter case"
            in capsys.readouterr().out)
