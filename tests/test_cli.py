"""The non-interactive commands end to end, and --help on every command."""

from __future__ import annotations

import argparse
import json
from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import pytest

from docket.core import Project
from docket.tui.cli import build_parser, main


def test_every_command_has_help_with_an_example(capsys) -> None:
    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    for name in sub.choices:
        with pytest.raises(SystemExit) as done:
            main([name, "--help"])
        assert done.value.code == 0
        out = capsys.readouterr().out
        assert "example:" in out and f"docket {name}" in out, name


def _options(parser: argparse.ArgumentParser, words: list[str]):
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            for name, inner in action.choices.items():
                yield from _options(inner, [*words, name])
        else:
            yield " ".join(words), action


def test_every_option_says_what_it_does_and_actions_name_their_project_so(capsys) -> None:
    # 'export --help' listed --what and --format bare (--what defaults to scores, unsaid), and
    # an action's errors read "docket reviewers project add: ... required: name (see 'docket
    # reviewers project add --help')", as if 'project' were to be typed
    bare = [(words, action.option_strings or action.dest)
            for words, action in _options(build_parser(), []) if action.help is None]
    assert bare == []
    for argv, start in ((["reviewers", "x.docket", "add"], "docket reviewers PROJECT add: "),
                        (["missed", "x.docket", "add", "L1"], "docket missed PROJECT add: ")):
        with pytest.raises(SystemExit):
            build_parser().parse_args(argv)
        err = capsys.readouterr().err
        assert err.startswith(start) and " project " not in err, err
        assert err.split("required: ")[1].split()[0] in ("NAME", "RIGHT"), err


def test_help_fits_an_80_column_terminal_and_wraps_at_word_ends(
        capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # descriptions were printed as written, one paragraph a line, and options wrapped at 100
    # columns, so an 80-column terminal cut words in two ("a ran|ge of thresholds")
    monkeypatch.setenv("COLUMNS", "80")
    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    for name in ["", *sub.choices]:
        with pytest.raises(SystemExit):
            main([name, "--help"] if name else ["--help"])
        lines = capsys.readouterr().out.splitlines()
        example = lines.index("example:") if "example:" in lines else len(lines)
        usage_end = next(i for i, line in enumerate(lines) if not line.strip())
        wide = [line for line in lines[usage_end:example] if len(line) > 80]
        assert wide == [], name  # (usage's choices and the example command stay whole)
        if name == "evaluate":
            assert "a range of thresholds" in " ".join(line.strip() for line in lines)
    monkeypatch.setenv("COLUMNS", "200")
    with pytest.raises(SystemExit):
        main(["evaluate", "--help"])
    assert max(len(line) for line in capsys.readouterr().out.splitlines()) <= 100


def test_link_project_from_start_to_export(tiny_tables, tmp_path: Path, capsys) -> None:
    left, right = tiny_tables
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "town", "--block", "year(born)", "--field", "born:date"]) == 0
    out = capsys.readouterr().out
    assert "candidate pairs" in out and "reduction ratio" in out and "year(born)" in out

    assert main(["status", str(project), "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["records"] == {"left": 3, "right": 3} and info["pairs"]["candidates"] >= 2
    assert {f["field"] for f in info["model"]["fields"]} == {"name", "town", "born"}

    assert main(["next", str(project), "--reviewer", "maya", "-n", "3", "--json"]) == 0
    items = json.loads(capsys.readouterr().out)
    assert items and set(items[0]) == {"pair_id", "left_id", "right_id", "probability", "reason"}

    labels = tmp_path / "labels.jsonl"
    labels.write_text('{"left_id": "1", "right_id": "a", "label": "match", "note": "same"}\n',
                      encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "maya", "--from", str(labels)]) == 0
    assert "recorded 1 decision for" in capsys.readouterr().out
    assert main(["status", str(project), "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["decisions"]["per_reviewer"]["maya"]["match"] == 1

    frames = {}
    for ext in ("csv", "parquet", "jsonl"):
        target = tmp_path / f"scores.{ext}"
        assert main(["export", str(project), "--what", "scores", "-o", str(target)]) == 0
        frames[ext] = (pd.read_csv(target, dtype={"left_id": str, "right_id": str}) if ext == "csv"
                       else pq.read_table(target).to_pandas() if ext == "parquet"
                       else pd.read_json(target, lines=True, dtype={"left_id": str}))
    cols = {"pair_id", "left_id", "right_id", "sim_name", "sim_town", "sim_born", "log_odds",
            "probability", "predicted"}
    for frame in frames.values():
        assert cols <= set(frame.columns) and len(frame) == info["pairs"]["candidates"]
        assert "match_weight" not in frame.columns
    assert main(["export", str(project), "--what", "scores", "-o", "-"]) == 0
    assert capsys.readouterr().out.startswith("pair_id,left_id,right_id")


def test_dedupe_mode_and_given_pairs(tmp_path: Path, capsys) -> None:
    table = tmp_path / "people.tsv"
    table.write_text("id\tname\tphone\n1\tAnna Berg\t0123\n2\tAnna Berg\t0123\n3\tPer Moe\t999\n",
                     encoding="utf-8")
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\n2,1\n1,2\n1,3\n3,3\n", encoding="utf-8")
    project = tmp_path / "d.docket"
    assert main(["new", str(project), "--left", str(table), "--id", "id", "--pairs",
                 str(pairs)]) == 0
    capsys.readouterr()
    assert main(["status", str(project), "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["mode"] == "dedupe" and info["pairs"]["candidates"] == 2  # (1,2) once; no (3,3)


def test_review_and_adjudicate_reach_their_screens(tiny_tables, tmp_path: Path,
                                                   monkeypatch: pytest.MonkeyPatch) -> None:
    # The screens load lazily, so a renamed module would only show when someone runs them.
    from docket.tui import review_app, team_app
    opened: list[str] = []
    monkeypatch.setattr(review_app, "run_review", lambda *a: opened.append("review"))
    monkeypatch.setattr(team_app, "run_adjudicate", lambda *a: opened.append("adjudicate"))
    as_terminal(monkeypatch)
    left, right = tiny_tables
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "town"]) == 0
    assert main(["review", str(project), "--reviewer", "maya"]) == 0
    assert main(["reviewers", str(project), "add", "lee", "--role", "adjudicator"]) == 0
    assert main(["adjudicate", str(project), "--reviewer", "lee"]) == 0
    assert opened == ["review", "adjudicate"]


def as_terminal(monkeypatch: pytest.MonkeyPatch, answer: bool = True) -> None:
    import sys
    monkeypatch.setattr(sys.stdin, "isatty", lambda: answer, raising=False)
    monkeypatch.setattr(sys.stdout, "isatty", lambda: answer, raising=False)


@pytest.mark.parametrize("argv", [["review", "--reviewer", "zed"],
                                  ["adjudicate", "--reviewer", "lee"],
                                  ["agreement", "--screen"], ["evaluate", "--screen"],
                                  ["evaluate", "--matchers", "--screen"]])
def test_a_screen_without_a_terminal_is_refused_in_one_line(
        argv: list[str], tiny_tables, tmp_path: Path, capsys,
        monkeypatch: pytest.MonkeyPatch) -> None:
    # from a pipe or /dev/null the screen got no key, never ended and spun a core meanwhile
    left, right = tiny_tables
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "town"]) == 0
    assert main(["reviewers", str(project), "add", "lee", "--role", "adjudicator"]) == 0
    capsys.readouterr()
    as_terminal(monkeypatch, False)
    assert main([argv[0], str(project), *argv[1:]]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 1 and "opens a screen, which needs a terminal" in err[0], err
    with Project.open(project) as opened:  # zed is not registered
        assert [r["name"] for r in opened.reviewers()] == ["lee"]
    assert main(["demo", "--dir", str(tmp_path / "demo")]) == 2  # before building anything
    assert "needs a terminal" in capsys.readouterr().err and not (tmp_path / "demo").exists()


def test_ctrl_c_while_new_writes_leaves_the_old_project_and_says_one_line(
        tiny_tables, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    import warnings

    from docket.core.storage import store
    left, right = tiny_tables
    path = tmp_path / "p.docket"
    argv = ["new", str(path), "--left", str(left), "--right", str(right), "--id", "id"]
    assert main(argv) == 0
    before = path.read_bytes()
    capsys.readouterr()

    def interrupted(*_a: object, **_k: object) -> None:
        # what a Ctrl-C in the middle of an import leaves: developers' warnings, then the key
        warnings.warn("unclosed file <_io.BufferedReader name='x.pyc'>", ResourceWarning,
                      stacklevel=1)
        warnings.warn("a library's old call", DeprecationWarning, stacklevel=1)
        raise KeyboardInterrupt

    monkeypatch.setattr(store, "finish_file", interrupted)  # the new file is half-written now
    assert main([*argv, "--force"]) == 130
    assert capsys.readouterr().err.strip() == "docket: interrupted; nothing was half-written"
    assert path.read_bytes() == before
    # nothing of the build is left; SQLite's own -wal and -shm of the old file may be
    assert sorted(p.name for p in tmp_path.iterdir()
                  if not p.name.endswith(("-wal", "-shm"))) == sorted(
        [left.name, right.name, path.name])


def _next_printed(tiny_tables, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch,
                  lists: list) -> list[str]:
    """What ``docket next`` prints when the queue holds each of ``lists`` in turn."""
    left, right = tiny_tables
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "town"]) == 0
    out = []
    for items in lists:
        monkeypatch.setattr(Project, "next_pairs", lambda self, r, n, claim=False, i=items: i)
        capsys.readouterr()
        assert main(["next", str(project), "--reviewer", "maya"]) == 0
        out.append(capsys.readouterr().out)
    return out


def test_next_writes_a_probability_as_the_screen_does(tiny_tables, tmp_path: Path, capsys,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    # next printed four decimals: 0.99996 read "1.0000" and 3e-9 "0.0000", certainties the
    # model never gave, beside a screen that shows 0.99996 for the same pair
    from docket.core.types import QueueItem

    items = [QueueItem(1, "1", "a", 0.99996, "likely match"),
             QueueItem(2, "2", "b", 3e-9, "audit"), QueueItem(3, "3", "c", 0.25, "uncertain")]
    out, = _next_printed(tiny_tables, tmp_path, capsys, monkeypatch, [items])
    rows = out.splitlines()[1:]
    assert [r.split("  ")[-2].strip() for r in rows] == ["0.99996", "< 0.000001", "0.250"]


def test_dasks_advice_on_large_graphs_is_not_shown(sample_project: Path, capsys,
                                                   monkeypatch: pytest.MonkeyPatch) -> None:
    # 'docket new --engine dask' on 200,000 records printed 'warning: Sending large graph of
    # size 9.54 MiB.\nThis may cause some slowdown.\nConsider loading the data with Dask
    # directly ...', advice to the graph's author that the user cannot act on
    import warnings

    from docket.core import Project
    real = Project.status

    def status(self: Project) -> object:
        warnings.warn("Sending large graph of size 9.54 MiB.\nThis may cause some slowdown.",
                      UserWarning, stacklevel=1)
        return real(self)

    monkeypatch.setattr(Project, "status", status)
    assert main(["status", str(sample_project)]) == 0
    assert capsys.readouterr().err == ""


def test_next_fits_80_columns_and_keeps_every_id_whole(tmp_path: Path, capsys, tiny_tables,
                                                       monkeypatch: pytest.MonkeyPatch) -> None:
    # 'likely non-match' after two 22-cell id columns made 85-cell rows at 80 columns
    from rich.cells import cell_len

    from docket.core.types import QueueItem

    short = [QueueItem(16558, "N-01083", "S-11704", 0.139, "likely non-match"),
             QueueItem(21878, "N-01946", "S-10239", 0.173, "audit, overlap")]
    uuids = [QueueItem(7, "6f1c2a3e-0d4b-4c1e-9a57-2b8e5d1f0c33",
                       "0b3e9f8a-7c6d-4e5f-8a9b-1c2d3e4f5a6b", 0.2, "likely non-match")]
    printed = _next_printed(tiny_tables, tmp_path, capsys, monkeypatch, [short, uuids])
    for out, items, lines in zip(printed, (short, uuids), (3, 4), strict=True):
        rows = out.splitlines()
        assert len(rows) == lines and max(cell_len(r) for r in rows) <= 80
        for item in items:
            assert item.left_id in out and item.right_id in out and item.reason in out
    assert rows[2].startswith("       7  6f1c2a3e-") and rows[3].strip() == uuids[0].right_id


def test_next_fits_80_columns_with_ids_too_long_to_share_a_row(tmp_path: Path,
                                                               capsys) -> None:
    # the left id went beside the pair id, probability and reason whatever its width: an id of
    # more than about 39 cells ran the row past 80 columns
    import json

    from rich.cells import cell_len

    long_id = "registry-north/clients/" + "7f3a" * 8  # 55 cells: a line of its own, whole
    too_long = "registry-north/clients/archived/" + "c0ffee" * 12  # 104 cells: cut
    left, right = tmp_path / "left.csv", tmp_path / "right.csv"
    left.write_text(f"id,name,town\n{long_id},Anna Berg,Oslo\n{too_long},Jon Dahl,Bergen\n",
                    encoding="utf-8")
    right.write_text("id,name,town\nS-1,Anna Berg,Oslo\nS-2,Jon Dal,Bergen\n", encoding="utf-8")
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "town"]) == 0
    capsys.readouterr()
    assert main(["next", str(project), "--reviewer", "maya"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert max(cell_len(x) for x in lines) <= 80, lines
    assert f"          {long_id}" in lines and "          S-1" in lines
    cut = next(x for x in lines if x.strip().startswith("registry-north/clients/archived/"))
    assert "…" in cut and cut.endswith("c0ffee") and cell_len(cut) == 80  # cut in the middle
    assert "--json" in lines[-1]
    assert main(["next", str(project), "--reviewer", "maya", "--json"]) == 0
    assert too_long in {i["left_id"] for i in json.loads(capsys.readouterr().out)}


def test_help_as_a_command_shows_the_help_asked_for(capsys) -> None:
    # 'docket help export' was "invalid choice: 'help'"
    for words, start in ((["help"], "usage: docket [-h]"),
                         (["help", "export"], "usage: docket export")):
        with pytest.raises(SystemExit) as stop:
            main(words)
        assert stop.value.code == 0 and capsys.readouterr().out.startswith(start), words
