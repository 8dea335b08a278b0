"""Ids, names and columns in scripts whose characters are not one terminal cell each (CJK two,
Thai vowel marks none) line up in the command line's tables."""

from __future__ import annotations

from pathlib import Path

from rich.cells import cell_len

from docket.core import Project
from docket.tui.cli import main
from docket.tui.terminal import padded

IDS = ["顧客007", "ลูกค้า002", "客户009甲", "c-4", "לקוח014", "عميل019"]


def _column_at(lines: list[str], text: str) -> set[int]:
    """The terminal cell where ``text`` begins on each line that holds it."""
    return {cell_len(line[:line.index(text)]) for line in lines if text in line}


def test_padding_counts_terminal_cells() -> None:
    assert [cell_len(padded(i, 12)) for i in IDS] == [12] * len(IDS)
    assert padded("a\x1bb", 6) == "a\\x1bb"  # made visible first, then measured


def test_next_status_and_reviewers_line_up(tmp_path: Path, capsys) -> None:
    # padding counted characters: '顧客007' took 7 cells for 5 characters and 'ลูกค้า002' 7
    # for 9, so each row's probability column sat somewhere else
    table = tmp_path / "r.csv"
    table.write_text("id,姓名,town\n" + "".join(
        f"{i},Orla Venn,Brenn\n" for i in IDS), encoding="utf-8")
    project = tmp_path / "w.docket"
    assert main(["new", str(project), "--left", str(table), "--id", "id", "--block", "*"]) == 0
    capsys.readouterr()
    assert main(["next", str(project), "--reviewer", "ana", "-n", "15"]) == 0
    rows = capsys.readouterr().out.splitlines()
    assert len(rows) == 16 and len({cell_len(r[:r.rindex("  ")]) for r in rows}) == 1
    with Project.open(project) as p:
        p.decide(p.next_pairs("王芳", 1)[0].pair_id, "王芳", "match")
        p.decide(p.next_pairs("ana", 1)[0].pair_id, "ana", "match")
    assert main(["status", str(project)]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert len(_column_at(lines, "reviewer ")) == 1
    assert _column_at([x for x in lines if x.startswith("  姓名 ")], "exact") == \
        _column_at([x for x in lines if x.startswith("  town")], "exact")
    assert main(["reviewers", str(project), "list"]) == 0
    assert len(_column_at(capsys.readouterr().out.splitlines()[1:], "reviewer")) == 1
