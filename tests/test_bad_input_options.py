"""Options and streams given wrongly: a table from standard input, an id column not found."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run


def test_a_table_from_standard_input_is_said_to_need_a_file(
        sample_project: Path, tmp_path: Path, monkeypatch, capsys) -> None:
    # '--from -' (as export writes '-o -') was '-: no such file; check the path'
    monkeypatch.chdir(tmp_path)
    for argv in (["label", str(sample_project), "--reviewer", "ana", "--from", "-"],
                 ["evaluate", str(sample_project), "--predictions", "-"]):
        code, err = run(capsys, *argv)
        assert_one_line_error(code, err, "-: no such file; a table is read from a file, not "
                                         "standard input")


@pytest.mark.parametrize("options, needles", [
    # the hint named --id to someone who had given --left-id
    (["--left-id", "Client_ID", "--right-id", "ref"],
     ["no column 'Client_ID'; did you mean 'client_id'?", "with --left-id"]),
    (["--left-id", "client_id", "--right-id", "reff"],
     ["no column 'reff'; did you mean 'ref'?", "with --right-id"]),
    (["--id", "client_id"], ["practice_south.csv: no column 'client_id'; columns are ref,",
                             "with --right-id"]),
])
def test_an_id_column_not_found_names_the_option_and_the_nearest_column(
        options: list[str], needles: list[str], tmp_path: Path, capsys) -> None:
    sample = Path(__file__).resolve().parent.parent / "sample"
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(sample / "practice_north.csv"), "--right",
                    str(sample / "practice_south.csv"), *options)
    assert_one_line_error(code, err, *needles)


@pytest.mark.parametrize("words, order", [
    # "invalid choice: 'vets.docket' (choose from 'add', 'list')", said to one who gave list
    (["reviewers", "list", "P"], "docket reviewers P list"),
    (["reviewers", "add", "lee", "P", "--role", "adjudicator"],
     "docket reviewers P add lee --role adjudicator"),
    (["missed", "add", "N-00001", "S-10001", "P"], "docket missed P add N-00001 S-10001"),
    # a file to import is not taken for the project
    (["matchers", "import", "M", "P", "--group", "g"], "docket matchers P import M --group g"),
    (["reviewers", "list"], "docket reviewers PROJECT list ..."),
])
def test_an_action_given_before_the_project_is_said_to_go_after_it(
        words: list[str], order: str, sample_project: Path, tmp_path: Path, capsys) -> None:
    matcher = tmp_path / "m.csv"
    matcher.write_text("left_id,right_id,score\nN-00001,S-10001,0.5\n", encoding="utf-8")
    given = {"P": str(sample_project), "M": str(matcher)}
    before = sample_project.read_bytes()
    with pytest.raises(SystemExit) as stop:
        main([given.get(w, w) for w in words])
    err = capsys.readouterr().err
    assert stop.value.code == 2 and len(err.splitlines()) == 1, err
    said = " ".join(given.get(w, w) for w in order.split())
    assert f"the project comes first, then what to do with it: {said} " in err, err
    assert sample_project.read_bytes() == before
    # in the order it takes the command runs, and a project named like an action still opens
    assert main(["reviewers", str(sample_project), "list"]) == 0


def test_a_project_given_as_a_table_says_how_its_decisions_come_in(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # 'label P --from colleague.docket' was "unknown file type '.docket'"
    copy = tmp_path / "colleague.docket"
    copy.write_bytes(sample_project.read_bytes())
    before = sample_project.read_bytes()
    for argv in (["label", str(sample_project), "--reviewer", "ana", "--from", str(copy)],
                 ["evaluate", str(sample_project), "--predictions", str(copy)],
                 ["new", str(tmp_path / "n.docket"), "--left", str(copy)]):
        code, err = run(capsys, *argv)
        assert_one_line_error(code, err, f"{copy}: an SQLite database (a docket project?), not "
                              "a table; decisions in a copy of this project come in with "
                              "'docket merge PROJECT COPY'")
    assert sample_project.read_bytes() == before and not (tmp_path / "n.docket").exists()


def test_an_option_of_one_value_given_twice_is_refused(sample_project: Path, tmp_path: Path,
                                                       capsys) -> None:
    # argparse kept the last unsaid: '--from a.csv --from b.csv' recorded b.csv alone
    first, second = tmp_path / "a.csv", tmp_path / "b.csv"
    first.write_text("pair_id,label\n1,match\n", encoding="utf-8")
    second.write_text("pair_id,label\n2,match\n", encoding="utf-8")
    before = sample_project.read_bytes()
    for argv, said in (
            (["label", str(sample_project), "--reviewer", "ana", "--from", str(first),
              "--from", str(second)], f"--from: given twice, '{first}' and '{second}'"),
            (["label", str(sample_project), "--reviewer", "ana", "--reviewer", "ben",
              "--from", str(first)], "--reviewer: given twice, 'ana' and 'ben'"),
            (["export", str(sample_project), "--what", "gold", "--what", "scores", "-o", "-"],
             "--what: given twice, 'gold' and 'scores'")):
        with pytest.raises(SystemExit) as stop:
            main(argv)
        err = capsys.readouterr().err
        assert stop.value.code == 2 and len(err.splitlines()) == 1, err
        assert f"{said}; give it once" in err, err
    assert sample_project.read_bytes() == before
    # the same value twice says one thing, and options meant to repeat still do
    assert main(["label", str(sample_project), "--reviewer", "ana", "--reviewer", "ana",
                 "--from", str(first)]) == 0


def test_a_suggested_command_can_be_pasted_with_spaces_in_its_words(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # 'add one with docket reviewers my proj.docket add Anne Berg --role adjudicator' ran as
    # 'add Anne' with 'Berg' left over
    folder = tmp_path / "sp ace"
    folder.mkdir()
    project = folder / "my proj.docket"
    project.write_bytes(sample_project.read_bytes())
    code, err = run(capsys, "adjudicate", str(project), "--reviewer", "Anne Berg")
    assert_one_line_error(code, err, f"'docket reviewers '{project}' add 'Anne Berg' --role "
                                     "adjudicator'")
    code, err = run(capsys, "status", str(folder / "none.docket"))
    assert_one_line_error(code, err, f"create it with 'docket new '{folder / 'none.docket'}' ...'")
