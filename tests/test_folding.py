"""Reports on a terminal fold their long lines at word ends, under their own text, and rows of
figures only at their gaps; piped output stays as written."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from docket.tui.cli import main
from docket.tui.folding import fold


def _words(text: str) -> list[str]:
    return text.split()


def _outside_table(text: str) -> str:
    """evaluate's text without its threshold table and the table's footnote, which a terminal
    narrower than the table gets in fewer cells (two decimals)."""
    lines = text.splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith(" threshold  precision"))
    note = next(i for i in range(head, len(lines)) if lines[i].startswith("  * decision"))
    end = next(i for i in range(note + 1, len(lines)) if not lines[i].startswith("    "))
    return "\n".join(lines[:head] + lines[end:])


def test_a_labelled_line_folds_under_its_text_and_a_table_row_stays() -> None:
    line = ("model        Fellegi–Sunter on field levels ranks the queue (labels recorded, not "
            "refit yet); threshold 0.5")
    out = fold(line, 80).splitlines()
    assert out == ["model        Fellegi–Sunter on field levels ranks the queue (labels recorded,",
                   "             not refit yet); threshold 0.5"]
    note = "  chance agreement (u) measured on 100,000 random record pairs, exact agreement " \
           "from value frequencies"
    assert fold(note, 80).splitlines()[1].startswith("    from")  # under the text, not at 0
    row = "       0.1  0.943 [0.793, 1.000]    0.983 [0.908, 1.000]    0.962 [0.878, 1.000]" \
          "             721"
    assert fold(row, 80).splitlines() == [row[:row.rindex("  ")].rstrip(), " " * 12 + "721"]
    starred = "*" + row[1:].replace("0.1", "0.5", 1)  # the decision threshold's row
    rests = [line for line in fold(f"{row}\n{starred}", 80).splitlines() if "721" in line]
    assert rests == [" " * 12 + "721"] * 2  # one column for the rest of every row of a table
    # figures set apart by gaps fold at a gap, never inside one ('prevalence inde' / 'x -0.57')
    figures = "  observed 0.8919  chance 0.6596  PABAK 0.7838 [0.5058, 0.9143]  prevalence " \
              "index -0.5676  bias index -0.0541"
    assert fold(figures, 80).splitlines() == [
        "  observed 0.8919  chance 0.6596  PABAK 0.7838 [0.5058, 0.9143]",
        " " * 19 + "prevalence index -0.5676  bias index -0.0541"]
    assert fold("short line", 80) == "short line"


@pytest.mark.parametrize("command", ["status", "evaluate", "agreement", "policy"])
def test_reports_fit_80_columns_on_a_terminal_and_keep_every_word(
        team: tuple[Path, object], command: str, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture) -> None:
    # 'docket status' at 80 columns was cut mid-word ("no / t refit yet"), its continuations
    # at the left edge under the labels
    project = str(team[0])  # reviewers, labels on the audit slice, an adjudicator
    assert main([command, project]) == 0
    piped = capsys.readouterr().out
    assert max(len(line) for line in piped.splitlines()) > 80  # long lines, kept whole in a pipe
    monkeypatch.setenv("COLUMNS", "80")  # a terminal of 80 columns (pytest's capture is none)
    monkeypatch.setattr("sys.stdout.isatty", lambda: True, raising=False)
    assert main([command, project]) == 0
    shown = capsys.readouterr().out
    if command == "evaluate":  # its table is drawn to fit (test_evaluate_table_fits_80)
        shown, piped = _outside_table(shown), _outside_table(piped)
    assert _words(shown) == _words(piped)
    assert max(len(line) for line in shown.splitlines()) <= 80


def test_evaluate_table_fits_80_columns_one_line_per_threshold(
        team: tuple[Path, object], monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture) -> None:
    # the table is 96 cells wide: folded at 80 columns, each threshold took two lines, its
    # predicted count alone on the second
    project = str(team[0])
    assert main(["evaluate", project, "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    monkeypatch.setenv("COLUMNS", "80")
    monkeypatch.setattr("sys.stdout.isatty", lambda: True, raising=False)
    assert main(["evaluate", project]) == 0
    lines = capsys.readouterr().out.splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith(" threshold  precision"))
    rows = lines[head + 1:head + 1 + len(report["estimates"])]
    assert lines[head].split() == ["threshold", "precision", "recall", "F1", "predicted"]
    for row, e in zip(rows, report["estimates"], strict=True):
        assert len(row) <= 80
        cells = row.lstrip("* ").split()
        assert float(cells[0]) == e["threshold"]
        assert cells[-1] == f"{e['predicted_positives']:,.0f}"  # the count, on its own row
        assert float(cells[1]) == round(e["precision"]["value"], 2)
        low = e["precision"]["low"]
        shown_low = float(cells[2].strip("[").split("–")[0])
        assert shown_low <= low + 1e-9  # rounded outwards: never claims more than it has
    assert "two decimals" in "\n".join(lines)


def test_new_folds_its_notes_and_caution_on_a_terminal(
        tiny_tables: tuple[Path, Path], tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture) -> None:
    # 'docket new' and 'docket demo' cut the caution on personal data mid-word at 80 columns
    left, right = tiny_tables
    monkeypatch.setenv("COLUMNS", "80")
    monkeypatch.setattr("sys.stdout.isatty", lambda: True, raising=False)
    assert main(["new", str(tmp_path / "t.docket"), "--left", str(left), "--right", str(right),
                 "--id", "id"]) == 0
    out = capsys.readouterr().out
    assert "personal data" in out and "\n  " in out.split("note: Records", 1)[1]
    assert max(len(line) for line in out.splitlines()) <= 80


def test_wide_characters_fold_by_their_cells() -> None:
    # folded by its count of characters, a line of CJK column names ran to 104 cells of an
    # 80-column terminal, which then cut it mid-word again
    from rich.cells import cell_len

    line = "fields compared: " + ", ".join(f"東京都新宿区{i} (text)" for i in range(12))
    out = fold(line, 80).splitlines()
    assert max(cell_len(x) for x in out) <= 80 and len(out) == 4
    assert _words("\n".join(out)) == _words(line)
    assert all(x.startswith("  ") for x in out[1:])  # under the text, as any other line
    row = "  東京都新宿区西新宿二丁目東京都      498 pairs   x  y"  # a figure row: at its gaps
    assert [cell_len(x) for x in fold(row, 40).splitlines()] == [32, 18]


def test_errors_and_warnings_fold_on_a_terminal_and_stay_one_line_in_a_pipe(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture) -> None:
    # at 80 columns the terminal cut docket new's warnings mid-word ('not compare' / 'd',
    # '--keep-placeh' / 'olders'), and its errors
    table = tmp_path / "t.csv"
    table.write_text("id,name,empty\n" + "".join(f"r{i},Anna Berg{i},\n" for i in range(9)),
                     encoding="utf-8")
    args = ["new", str(tmp_path / "t.docket"), "--left", str(table), "--id", "id",
            "--block", "empty"]  # a warning (a column of no value), then an error
    assert main(args) == 2
    piped = capsys.readouterr().err.splitlines()
    assert len(piped) == 2 and all(line.startswith("docket: ") for line in piped)
    monkeypatch.setenv("COLUMNS", "80")
    monkeypatch.setattr("sys.stderr.isatty", lambda: True, raising=False)
    assert main(args) == 2
    shown = capsys.readouterr().err.splitlines()
    assert len(shown) > 2 and max(len(line) for line in shown) <= 80, shown
    assert _words("\n".join(shown)) == _words("\n".join(piped))
    assert all(line.startswith(("docket: ", "  ")) for line in shown)  # the rest under it


def test_a_list_of_items_folds_between_its_items() -> None:
    # folded at any space, status cut 'similar' from its factor: 'similar' / '÷1.6'
    line = ("  pet            exact, rare ×7.9 · exact, common ×4.2 · close ×2.4 · similar ÷1.6 "
            "· different ÷2.5 · missing ×1")
    assert fold(line, 80).splitlines() == [
        "  pet            exact, rare ×7.9 · exact, common ×4.2 · close ×2.4",
        "                 · similar ÷1.6 · different ÷2.5 · missing ×1"]
    out = fold(line, 40).splitlines()
    assert all(len(x) <= 40 for x in out) and out[1:] == [
        "                 · exact, common ×4.2", "                 · close ×2.4",
        "                 · similar ÷1.6", "                 · different ÷2.5",
        "                 · missing ×1"]
