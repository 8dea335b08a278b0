"""Pairs for a language model (--for-lm, --lm-template) and the train/test split."""

from __future__ import annotations

import errno
import json
import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core import DocketError, Project
from docket.core.exports import gold_export as ge
from docket.core.exports.exporting import write_jsonl_parts
from docket.core.exports.lm_export import CHUNK, FOR_LM, LmRows, lm_records, lm_rows
from docket.core.exports.lm_text import DEFAULT_TEMPLATE, LmTemplate
from docket.core.exports.split import record_split
from tests.gold_fixtures import check_golden, pair_ids


def test_for_lm_golden_and_serialisation(tiny: Project, tmp_path: Path) -> None:
    records = lm_records(tiny, "training", test_share=0.5, seed=3)
    target = tmp_path / "lm.jsonl"
    write_jsonl_parts([records], str(target))
    text = target.read_text(encoding="utf-8")
    check_golden("for_lm.jsonl", text)
    back = [json.loads(line) for line in text.splitlines()]
    assert back == records
    assert set(back[0]) == {"pair_id", "left_id", "right_id", "prompt", "label", "split"}
    five = next(r for r in back if r["pair_id"] == pair_ids(tiny)[("5", "5")])
    assert "First entry: name: Per Moe; town: Bodø\n" in five["prompt"]
    assert "Second entry: name: Pål Moe; town: (missing)\n" in five["prompt"]
    assert "real-world entity" not in five["prompt"]
    assert five["label"] == "non-match"
    assert pd.read_json(target, lines=True)["pair_id"].tolist() == [r["pair_id"] for r in back]


def test_for_lm_follows_what_is_exported(tiny: Project) -> None:
    scores, gold, training = (lm_records(tiny, w) for w in ("scores", "gold", "training"))
    n_pairs = tiny.connection.execute("SELECT count(*) FROM pairs").fetchone()[0]
    assert len(scores) == n_pairs and {"probability"} <= set(scores[0]) - set(gold[0])
    assert "label" not in scores[0]
    assert len(gold) == len(training) == len(ge.gold_frame(tiny))
    assert {"how"} == set(gold[0]) - set(training[0])
    assert {"split"} == set(training[0]) - set(gold[0])
    for what in ("clusters", "conflicts"):
        with pytest.raises(DocketError, match="--for-lm writes pairs"):
            lm_records(tiny, what)


def test_a_template_of_ones_own_is_filled_and_checked(tiny: Project, tmp_path: Path) -> None:
    mine = tmp_path / "prompt.txt"
    mine.write_text("Same? [$fields] $$5 A=${first} B=$second", encoding="utf-8")
    record = lm_records(tiny, "gold", LmTemplate.load(mine))[0]
    assert record["prompt"].startswith("Same? [name, town] $5 A=name: ")
    for text, complaint in (("$first only", "lacks $second"), ("$first $second $secnd",
                                                                  "unknown placeholder $secnd"),
                            ("$first $second costs 5$", "a '$' that starts no placeholder")):
        mine.write_text(text, encoding="utf-8")
        with pytest.raises(DocketError, match=re.escape(complaint)):
            LmTemplate.load(mine)
    with pytest.raises(DocketError, match="no such template file"):
        LmTemplate.load(tmp_path / "absent.txt")
    assert "$first" in DEFAULT_TEMPLATE and "$second" in DEFAULT_TEMPLATE
    # a data file or /dev/zero given by mistake: the latter was read until memory ran out
    mine.write_text("$first $second " + "x" * 1_000_000, encoding="utf-8")
    with pytest.raises(DocketError, match="over 1 MB, too long for a template"):
        LmTemplate.load(mine)
    with pytest.raises(DocketError, match="over 1 MB, too long for a template"):
        LmTemplate.load("/dev/zero")
    mine.write_bytes("\ufeff$first | $second".encode())  # a byte-order mark is no text of it
    assert LmTemplate.load(mine).text == "$first | $second"


# -- the split --------------------------------------------------------------------------------
def test_split_is_deterministic_and_near_its_share() -> None:
    ids = np.arange(1, 20_001)
    a = ge.split_of(ids, 0.2, seed=7)
    assert (a == ge.split_of(ids, 0.2, seed=7)).all()
    assert (a != ge.split_of(ids, 0.2, seed=8)).any()
    assert abs((a == "test").mean() - 0.2) < 0.01
    assert (ge.split_of(ids, 0.0) == "train").all()
    with pytest.raises(DocketError, match="test-share"):
        ge.split_of(ids, 1.0)


PINNED_SIDES = "....T.T..T..T.T.T....TT....T...T.....TTT"  # pair ids 1..40, share 0.3, seed 0


def test_split_is_the_same_in_every_release() -> None:
    # A pair's side is part of an exported training set's meaning: a change of hash would move
    # pairs between train and test for everyone who exports again. These sides are pinned.
    sides = "".join("T" if s == "test" else "." for s in ge.split_of(range(1, 41), 0.3, seed=0))
    assert sides == PINNED_SIDES


def test_training_split_of_a_pair_stays_when_more_labels_arrive(tiny: Project) -> None:
    first = ge.training_frame(tiny, 0.5, 3, split_by="pair")[["pair_id", "split"]]
    tiny.decide(pair_ids(tiny)[("3", "4")], "maya", "non-match")  # one more label arrives
    later = ge.training_frame(tiny, 0.5, 3, split_by="pair").set_index("pair_id")["split"]
    assert len(later) == len(first) + 1
    assert all(later[p] == s for p, s in first.itertuples(index=False))


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.integers(0, 30), st.integers(0, 30)), min_size=1, max_size=80),
       st.floats(0.0, 0.9), st.integers(0, 2**31))
def test_record_split_keeps_every_record_on_one_side(ends: list[tuple[int, int]], share: float,
                                                     seed: int) -> None:
    pairs = [(f"L:{a}", f"R:{b}") for a, b in ends]
    sides = record_split(pairs, share, seed)
    seen: dict[str, str] = {}
    for (a, b), side in zip(pairs, sides, strict=True):
        for node in (a, b):
            assert seen.setdefault(node, side) == side


def test_record_split_is_near_its_share_on_many_small_clusters() -> None:
    pairs = [(f"L:{i}", f"R:{i}") for i in range(20_000)]  # 20,000 clusters of two
    sides = record_split(pairs, 0.2, seed=5)
    assert abs((sides == "test").mean() - 0.2) < 0.01
    assert (record_split(pairs, 0.2, seed=5) == sides).all()


def test_for_lm_on_the_command_line(tiny_file: Path, tmp_path: Path,
                                    capsys: pytest.CaptureFixture[str]) -> None:
    from docket.tui.cli import main
    copy = tmp_path / "tiny.docket"
    copy.write_bytes(tiny_file.read_bytes())
    out = tmp_path / "scores.jsonl"
    assert main(["export", str(copy), "--what", "scores", "--for-lm", "-o", str(out)]) == 0
    rows = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
    assert len(rows) == len(pair_ids(Project.open(copy, readonly=True)))
    assert all("probability" in r and "First entry: " in r["prompt"] for r in rows)
    mine = tmp_path / "mine.txt"
    mine.write_text("$first | $second", encoding="utf-8")
    for argv, needle in (
            (["--what", "gold", "--lm-template", str(mine), "-o", "g.jsonl"], "add --for-lm"),
            (["--what", "clusters", "--for-lm", "-o", "c.jsonl"], "--for-lm writes pairs"),
            (["--what", "gold", "--for-lm", "-o", str(tmp_path / "g.csv")], "JSON lines"),
            (["--what", "gold", "--for-lm", "--lm-template", str(tmp_path / "none.txt"),
              "-o", "g.jsonl"], "no such template file")):
        capsys.readouterr()
        assert main(["export", str(copy), *argv]) == 2
        err = capsys.readouterr().err.strip().splitlines()
        assert len(err) == 1 and needle in err[0], err
    assert main(["export", str(copy), "--what", "training", "--for-lm", "--lm-template",
                 str(mine), "--split-by", "pair", "-o", "-"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert json.loads(lines[0])["prompt"].startswith("name: ") and " | name: " in lines[0]


def test_a_training_export_with_one_side_empty_says_so(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # 80 gold pairs of one hub record form one group, which goes whole to one side: the file
    # had no training row, and export said only "wrote 80 rows"
    from docket.core import NewProject
    from docket.tui.cli import main
    from docket.tui.cli_gold import empty_side
    (tmp_path / "l.csv").write_text("id,name\nh,Orla Venn\nk,Tam Brisk\n", encoding="utf-8")
    (tmp_path / "r.csv").write_text("id,name\n" + "".join(
        f"c{i},Orla Venn\n" for i in range(6)) + "d,Tam Brisk\n", encoding="utf-8")
    path = tmp_path / "hub.docket"
    Project.create(NewProject(path=path, left=tmp_path / "l.csv", right=tmp_path / "r.csv",
                              id_column="id", rules=["*"], overlap=0.0, seed=0))
    with Project.open(path) as p:
        for pid, b in p.connection.execute("SELECT pair_id, right_id FROM pairs "
                                           "WHERE left_id = 'h'").fetchall():
            p.decide(pid, "ana", "match" if b.startswith("c") else "non-match")
    capsys.readouterr()
    assert main(["export", str(path), "--what", "training", "-o", str(tmp_path / "t.csv")]) == 0
    err = capsys.readouterr().err
    sides = pd.read_csv(tmp_path / "t.csv")["split"]
    assert sides.nunique() == 1 and f"the {'train' if sides[0] == 'test' else 'test'} side " \
        "is empty (train " in err and "--split-by pair" in err
    assert main(["export", str(path), "--what", "training", "--test-share", "0",
                 "-o", str(tmp_path / "t.csv")]) == 0
    assert "note" not in capsys.readouterr().err  # all on train, as asked
    assert empty_side(["train", "test"], 0.2, "record") is None
    assert "none came out test" in (empty_side(["train"] * 3, 0.2, "pair") or "")


def test_each_prompt_holds_its_own_pairs_records(sample_project: Path) -> None:
    # the records are taken per side in pair order: each prompt must show its own pair's
    with Project.open(sample_project, readonly=True) as p:
        rows = lm_records(p, "scores")
        template = LmTemplate.load(None)
        names = [f.name for f in p.fields]
        for row in rows[::997]:
            card = p.card(row["pair_id"])
            assert (card.left_id, card.right_id) == (row["left_id"], row["right_id"])
            expected = template.fill(names, [f.left for f in card.fields],
                                     [f.right for f in card.fields])
            assert row["prompt"] == expected


# -- written a chunk of pairs at a time ---------------------------------------------------------
def _whole(records: list[dict]) -> str:
    """The file as it was written before chunks: every record held, then joined at once."""
    return "".join(json.dumps(r, ensure_ascii=False) + "\n" for r in records)


def test_an_export_in_chunks_is_the_whole_file_byte_for_byte(tiny: Project,
                                                             tmp_path: Path) -> None:
    for what in FOR_LM:
        whole = _whole(replace(lm_rows(tiny, what, test_share=0.5, seed=3), size=10**9)
                       .records())
        for size in (1, 2, 3):
            rows = replace(lm_rows(tiny, what, test_share=0.5, seed=3), size=size)
            assert max(len(c) for c in rows.chunks()) == size
            target = tmp_path / f"{what}-{size}.jsonl"
            assert write_jsonl_parts(rows.chunks(), str(target)) == len(rows.records())
            assert target.read_bytes() == whole.encode("utf-8"), (what, size)
    check_golden("for_lm.jsonl", (tmp_path / "training-2.jsonl").read_text(encoding="utf-8"))


def test_the_demo_export_in_chunks_is_the_whole_file(sample_project: Path, tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    from docket.tui.cli import main
    with Project.open(sample_project, readonly=True) as p:
        rows = lm_rows(p, "scores")
        n_pairs = p.connection.execute("SELECT count(*) FROM pairs").fetchone()[0]
        assert rows.size == CHUNK and n_pairs > 2 * CHUNK  # three chunks at least
        whole = _whole(replace(rows, size=10**9).records())
    out = tmp_path / "scores.jsonl"
    assert main(["export", str(sample_project), "--what", "scores", "--for-lm",
                 "-o", str(out)]) == 0
    assert out.read_bytes() == whole.encode("utf-8")
    capsys.readouterr()
    assert main(["export", str(sample_project), "--what", "scores", "--for-lm", "-o", "-"]) == 0
    assert capsys.readouterr().out == whole


def test_an_export_that_fails_part_way_leaves_no_half_written_file(
        sample_project: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture[str]) -> None:
    from docket.tui.cli import main
    target = tmp_path / "out" / "scores.jsonl"
    target.parent.mkdir()
    target.write_text("the export before\n", encoding="utf-8")
    made = LmRows._made
    calls: list[int] = []

    def failing(self: LmRows, *args: object) -> list[dict]:
        calls.append(1)
        if len(calls) == 2:  # the first chunk is in the temporary by now: the disk fills
            partial = [f for f in target.parent.iterdir() if f.name.endswith(".partial")]
            assert len(partial) == 1 and partial[0].stat().st_size > 0
            raise OSError(errno.ENOSPC, "No space left on device")
        return made(self, *args)  # type: ignore[arg-type]

    monkeypatch.setattr(LmRows, "_made", failing)
    capsys.readouterr()
    assert main(["export", str(sample_project), "--what", "scores", "--for-lm",
                 "-o", str(target)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "disk full; nothing was written" in err[0], err
    assert target.read_text(encoding="utf-8") == "the export before\n"
    assert [f.name for f in target.parent.iterdir()] == ["scores.jsonl"]
