"""Reviewers and roles, first-use registration, the agreement report's shape, the demo
reviewer, and what ``docket next`` lists; one name per person is in test_team_names.py."""

from __future__ import annotations

import csv
import importlib.util
import json
import sqlite3
import sys
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.core.reviewing.bulk import label_once
from docket.core.reviewing.team import (
    add_reviewer,
    agreement_report,
    disagreements,
    labels_by_reviewer,
    list_reviewers,
)

from . import team_support
from .team_support import pair_ids, run

# the tiny project's fixtures (team_support.py), under the names the tests ask for
tiny_file, tiny = team_support.tiny_file, team_support.tiny

SECOND = Path(__file__).resolve().parents[1] / "sample" / "second_reviewer.csv"


def test_add_says_what_it_did_and_roles_can_change(tiny: Path) -> None:
    with Project.open(tiny) as p:
        assert add_reviewer(p, " ines ", "adjudicator").message == "added ines as adjudicator"
        assert add_reviewer(p, "ines", "adjudicator").message == (
            "ines is already adjudicator; nothing changed")
        change = add_reviewer(p, "ines", "reviewer")
        assert change.changed and change.message == (
            "ines: role changed from adjudicator to reviewer")
        assert [(r["name"], r["role"]) for r in list_reviewers(p)] == [("ines", "reviewer")]
        for bad_name, bad_role in (("", "reviewer"), ("  ", "reviewer"), ("a\nb", "reviewer"),
                                   ("maya", "boss")):
            with pytest.raises(DocketError):
                add_reviewer(p, bad_name, bad_role)
        assert len(list_reviewers(p)) == 1


def test_list_counts_labels_holds_adjudications_and_time(tiny: Path) -> None:
    a, b, c = pair_ids(tiny)[:3]
    with Project.open(tiny) as p:
        p.decide(a, "maya", "match", seconds=3.0)
        p.undo("maya")  # retracted, but the three seconds were spent
        p.decide(a, "maya", "non-match", seconds=4.0)
        p.decide(b, "maya", "hold", "cannot tell", seconds=2.5)
        add_reviewer(p, "ines", "adjudicator")
        p.decide(b, "ines", "match", "same phone", seconds=10.0, role="adjudicator")
        p.decide(c, "ines", "match", seconds=1.0)
        people = {r["name"]: r for r in list_reviewers(p)}
        assert labels_by_reviewer(p) == {"ines": {c: "match"},
                                         "maya": {a: "non-match", b: "hold"}}
    assert people["maya"] == {**people["maya"], "role": "reviewer", "labels": 2, "holds": 1,
                              "adjudications": 0, "seconds": 9.5}
    assert people["ines"] == {**people["ines"], "role": "adjudicator", "labels": 1, "holds": 0,
                              "adjudications": 1, "seconds": 11.0}


def test_reviewers_cli_add_list_and_bad_role(tiny: Path, capsys) -> None:
    assert run(["reviewers", str(tiny), "add", "ines", "--role", "adjudicator", "--by",
                "lead"]) == 0
    assert capsys.readouterr().out.strip() == "added ines as adjudicator (granted by lead)"
    assert run(["reviewers", str(tiny), "add", "maya"]) == 0
    capsys.readouterr()
    assert run(["reviewers", str(tiny), "list", "--json"]) == 0
    listed = json.loads(capsys.readouterr().out)
    assert [(r["name"], r["role"], r["granted_by"]) for r in listed] == [
        ("ines", "adjudicator", "lead"), ("maya", "reviewer", None)]
    assert run(["reviewers", str(tiny), "list"]) == 0
    out = capsys.readouterr().out
    assert "ines" in out and "adjudicator" in out
    # the name column as wide as 'ines' and 'maya': at 18 cells each row was 89 columns
    assert max(len(line) for line in out.splitlines()) <= 80
    with pytest.raises(SystemExit) as done:
        run(["reviewers", str(tiny), "add", "zoe", "--role", "boss"])
    assert done.value.code == 2


def test_team_commands_have_help_with_an_example(capsys) -> None:
    for name in ("reviewers", "agreement", "merge"):
        with pytest.raises(SystemExit) as done:
            run([name, "--help"])
        assert done.value.code == 0
        out = capsys.readouterr().out
        assert "example:" in out and f"docket {name}" in out, name


def test_a_new_name_is_registered_as_reviewer_on_first_use(tiny: Path, tmp_path: Path) -> None:
    first = pair_ids(tiny)[0]
    labels = tmp_path / "labels.csv"
    labels.write_text(f"pair_id,label\n{first},match\n", encoding="utf-8")
    assert run(["label", str(tiny), "--reviewer", "maya", "--from", str(labels)]) == 0
    with Project.open(tiny) as p:
        p.decide(pair_ids(tiny)[1], "zoe", "non-match")
        roles = {r["name"]: r["role"] for r in list_reviewers(p)}
    assert roles == {"maya": "reviewer", "zoe": "reviewer"}


def test_next_registers_a_new_name_only_when_it_claims(tiny: Path, capsys) -> None:
    assert run(["next", str(tiny), "--reviewer", "otto", "-n", "1"]) == 0
    with Project.open(tiny) as p:
        assert list_reviewers(p) == []
    assert run(["next", str(tiny), "--reviewer", "otto", "-n", "1", "--claim"]) == 0
    with Project.open(tiny) as p:
        assert [r["name"] for r in list_reviewers(p)] == ["otto"]


def test_report_and_disagreements_on_a_small_team(tiny: Path) -> None:
    ids = pair_ids(tiny)
    maya = dict(zip(ids, ["match", "match", "non-match", "non-match", "hold", "match"],
                    strict=False))
    ines = dict(zip(ids, ["match", "non-match", "non-match", "non-match", "match"],
                    strict=False))
    with Project.open(tiny) as p:
        for name, given in (("maya", maya), ("ines", ines)):
            for pid, label in given.items():
                p.decide(pid, name, label, note=f"{name} on {pid}")
        report = agreement_report(p)
        with_hold = agreement_report(p, include_hold=True)
        found = disagreements(p, "ines", "maya")
        with pytest.raises(DocketError, match="no standing labels"):
            disagreements(p, "ines", "nobody")
    json.dumps(report, allow_nan=False)  # JSON-ready: no NaN anywhere
    (pair,) = report["reviewer_pairs"]
    assert (pair["reviewer_a"], pair["reviewer_b"]) == ("ines", "maya")
    assert (pair["n_common"], pair["n"]) == (5, 4)
    assert pair["confusion"]["table"] == [[1, 0], [1, 2]]
    assert pair["hold_rate_b"] == pytest.approx(1 / 5) and pair["hold_rate_a"] == 0
    assert "Fleiss, Cohen & Everitt (1969)" in report["conventions"]["se"]
    assert "upper-inclusive" in report["conventions"]["bands"]
    assert with_hold["reviewer_pairs"][0]["n"] == 5
    assert with_hold["categories"] == ["match", "non-match", "hold"]
    ds = report["dawid_skene"]  # two reviewers: not identified, so no rates
    assert ds["identified"] is False and ds["units"] == 6 and ds["reviewers"] == []
    assert "three reviewers" in ds["reason"]
    assert report["overall"]["fleiss_units"] == 4
    assert [(d["pair_id"], d["label_a"], d["label_b"]) for d in found] == [
        (ids[1], "non-match", "match"), (ids[4], "match", "hold")]
    assert found[0]["note_b"] == f"maya on {ids[1]}"


def test_second_reviewer_covers_overlap_pairs_and_meets_the_demo_user(
        sample_project: Path) -> None:
    with SECOND.open(newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    assert 300 <= len(rows) <= 400
    assert {r["label"] for r in rows} == {"match", "non-match", "hold"}
    with sqlite3.connect(sample_project) as conn:
        overlap = {(a, b): pid for pid, a, b in conn.execute(
            "SELECT pair_id, left_id, right_id FROM pairs WHERE overlap = 1")}
    assert all((r["left_id"], r["right_id"]) in overlap for r in rows)
    with Project.open(sample_project) as p:
        assert label_once(p, "ines", SECOND, "demo") == len(rows)
        assert label_once(p, "ines", SECOND, "demo") == 0  # opened again
        roles = {r["name"]: r["role"] for r in list_reviewers(p)}
        queue = p.next_pairs("demo", 40)
    assert roles == {"demo": "adjudicator", "ines": "reviewer"}
    mine = {overlap[(r["left_id"], r["right_id"])] for r in rows}
    met = [q for q in queue if q.reason == "overlap"]
    assert met and all(q.pair_id in mine for q in met)


def test_second_reviewer_file_is_what_its_generator_writes(sample_project_file: Path,
                                                           tmp_path: Path) -> None:
    spec = importlib.util.spec_from_file_location("make_second_reviewer",
                                                  SECOND.with_name("make_second_reviewer.py"))
    assert spec is not None and spec.loader is not None
    generator = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = generator  # dataclasses look their module up while built
    spec.loader.exec_module(generator)
    out = tmp_path / "again.csv"
    tally = generator.make(sample_project_file, out)  # the sample project has the demo's pairs
    assert out.read_bytes() == SECOND.read_bytes()
    wrong = sum(n for (_, outcome), n in tally.items() if outcome == "wrong")
    assert 0.03 <= wrong / sum(tally.values()) <= 0.07


def test_next_with_n_0_does_not_call_the_queue_empty(tiny: Path, capsys) -> None:
    assert run(["next", str(tiny), "--reviewer", "otto", "-n", "0"]) == 0
    out = capsys.readouterr().out
    assert "(-n 0: no pair asked for)" in out and "empty" not in out


def test_next_names_both_reasons_of_an_audit_pair_waiting_for_a_second_reviewer(
        tiny: Path, capsys) -> None:
    # It was listed as 'audit' only, so a reviewer could not tell that a colleague's label on
    # it waits for theirs (the agreement figures count it too).
    with sqlite3.connect(tiny) as conn:
        (both,) = conn.execute("SELECT pair_id FROM pairs WHERE audit = 1 AND overlap = 1"
                               " ORDER BY pair_id LIMIT 1").fetchone()
        alone = conn.execute("SELECT pair_id FROM pairs WHERE audit = 1 AND overlap = 0"
                             " ORDER BY pair_id LIMIT 1").fetchone()[0]
    with Project.open(tiny) as p:
        p.decide(both, "ines", "match")
        reasons = {q.pair_id: q.reason for q in p.next_pairs("maya", 8)}
        card = p.card(both, reasons[both])
    assert reasons[both] == "audit, overlap" and reasons[alone] == "audit"
    assert run(["next", str(tiny), "--reviewer", "maya", "-n", "8"]) == 0
    line = next(r for r in capsys.readouterr().out.splitlines() if r.split()[0] == str(both))
    assert line.endswith("  audit, overlap")
    from docket.tui.diff import PLAIN
    from docket.tui.widgets.evidence import evidence_text
    panel = evidence_text(card, PLAIN).plain  # the reason goes on under itself (a7f92a4)
    assert "queued  audit and overlap\n  (a second reviewer too)" in panel
