"""The CLI end to end: two reviewers' decisions entered with ``docket label`` reproduce the
2x2 worked example's kappa in ``docket agreement``."""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

import pytest
from statsmodels.stats.inter_rater import cohens_kappa

from .team_support import run

# Wikipedia "Cohen's kappa", 50 grant proposals: rows reviewer A, columns reviewer B, categories
# (match, non-match) for (Yes, No). The table and p_o = 0.70 [S via the howcodex mirror]; the
# Wikipedia text itself is from memory.
TABLE = [[20, 5], [10, 15]]
CELLS = (("match", "match"), ("match", "non-match"), ("non-match", "match"),
         ("non-match", "non-match"))


def enter(project: Path, tmp_path: Path, extra: dict[str, list[tuple[int, str]]] | None = None
          ) -> list[int]:
    with sqlite3.connect(project) as conn:
        ids = [r[0] for r in conn.execute("SELECT pair_id FROM pairs ORDER BY pair_id LIMIT 60")]
    rows: dict[str, list[tuple[int, str]]] = {"ana": [], "ben": []}
    at = 0
    for (la, lb), n in zip(CELLS, [c for row in TABLE for c in row], strict=True):
        for pid in ids[at:at + n]:
            rows["ana"].append((pid, la))
            rows["ben"].append((pid, lb))
        at += n
    for name, more in (extra or {}).items():
        rows[name] += more
    for name, given in rows.items():
        source = tmp_path / f"{name}.csv"
        source.write_text("pair_id,label,note\n" + "".join(f"{p},{lab},\n" for p, lab in given),
                          encoding="utf-8")
        assert run(["label", str(project), "--reviewer", name, "--from", str(source)]) == 0
    return ids


def test_label_then_agreement_reproduces_the_worked_example(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    enter(sample_project, tmp_path)
    capsys.readouterr()
    assert run(["agreement", str(sample_project), "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    (pair,) = report["reviewer_pairs"]
    assert (pair["reviewer_a"], pair["reviewer_b"], pair["n"]) == ("ana", "ben", 50)
    assert pair["confusion"]["table"] == TABLE
    assert pair["observed"] == pytest.approx(0.70)  # Wikipedia "Cohen's kappa" [S via mirror]
    assert pair["expected"] == pytest.approx(0.50)  # Wikipedia "Cohen's kappa"
    assert pair["kappa"] == pytest.approx(0.4000, abs=5e-5)  # Wikipedia "Cohen's kappa" [S]
    # FCE (1969) non-null ASE 0.1270, CI 0.1511-0.6489 [C] (statsmodels cohens_kappa)
    assert pair["se"] == pytest.approx(0.1270, abs=5e-5)
    assert (pair["wald_low"], pair["wald_high"]) == (pytest.approx(0.1511, abs=5e-5),
                                                 pytest.approx(0.6489, abs=5e-5))
    assert pair["se0"] == pytest.approx(0.1386, abs=5e-5)  # null SE [C], FCE 1969
    reference = cohens_kappa(TABLE)  # statsmodels, the reference library
    assert pair["se"] == pytest.approx(reference.std_kappa, rel=1e-9)
    # PABAK 0.4000, prevalence index 0.10, bias index -0.10: formulas of Byrt, Bishop & Carlin
    # (1993) [S]
    # (Statalist 2013-07 msg01157)
    assert pair["pabak"] == pytest.approx(0.4000)
    assert pair["prevalence_index"] == pytest.approx(0.10)
    assert pair["bias_index"] == pytest.approx(-0.10)
    assert pair["band"] == "Fair"  # 0.20 < 0.40 <= 0.40, the upper-inclusive convention
    assert report["overall"]["fleiss_units"] == 50
    # two reviewers: the Dawid–Skene model is not identified, so no rates are given
    assert report["dawid_skene"]["identified"] is False
    assert report["dawid_skene"]["reviewers"] == []

    assert run(["agreement", str(sample_project)]) == 0
    out = capsys.readouterr().out
    assert "ana × ben: 50 pairs used of 50 in common" in out
    lo, hi = pair["ci_low"], pair["ci_high"]
    assert f"Cohen's kappa 0.4000 [{lo:.4f}, {hi:.4f}] (n 50; Fair); SE 0.1270" in out
    assert -1 <= lo < 0.4 < hi <= 1 and "Dawid–Skene: not identified" in out
    assert "Fleiss, Cohen & Everitt (1969)" in out and "Landis & Koch" in out


def test_holds_are_left_out_by_default_and_counted_on_request(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    with sqlite3.connect(sample_project) as conn:
        spare = conn.execute("SELECT pair_id FROM pairs ORDER BY pair_id LIMIT 1 OFFSET 55"
                             ).fetchone()[0]
    enter(sample_project, tmp_path, {"ana": [(spare, "hold")], "ben": [(spare, "match")]})
    capsys.readouterr()
    assert run(["agreement", str(sample_project), "--json"]) == 0
    (pair,) = json.loads(capsys.readouterr().out)["reviewer_pairs"]
    assert (pair["n_common"], pair["n"]) == (51, 50)
    assert pair["kappa"] == pytest.approx(0.4000, abs=5e-5)  # Wikipedia "Cohen's kappa" [S]
    assert pair["hold_rate_a"] == pytest.approx(1 / 51) and pair["hold_rate_b"] == 0
    assert run(["agreement", str(sample_project), "--json", "--include-hold"]) == 0
    (pair,) = json.loads(capsys.readouterr().out)["reviewer_pairs"]
    assert pair["n"] == 51 and pair["confusion"]["categories"] == ["match", "non-match", "hold"]
    assert pair["confusion"]["table"] == [[20, 5, 0], [10, 15, 0], [1, 0, 0]]
    # PABAK = (k p_o - 1) / (k - 1) with k the categories (Byrt, Bishop & Carlin 1993, from
    # memory): 35 of 51 agree over three, and the text says it is over three
    assert pair["pabak"] == pytest.approx((3 * 35 / 51 - 1) / 2, abs=1e-12)
    assert run(["agreement", str(sample_project), "--include-hold"]) == 0
    assert "PABAK over 3 categories" in capsys.readouterr().out
    # a hold is counted among a reviewer's labels yet rates nothing: the heading says so
    assert run(["agreement", str(sample_project)]) == 0
    assert capsys.readouterr().out.splitlines()[0].endswith(
        "ana 51 labels (1 of them a hold), ben 51 labels")


def test_too_few_pairs_for_fleiss_kappa_carries_no_band(sample_project: Path, tmp_path: Path,
                                                        capsys) -> None:
    # "Fleiss' kappa too few pairs to say (n 6; needs 10) (Poor)": a band the count cannot carry
    from docket.core import Project
    from docket.core.results import AgreementReport
    from docket.tui.screens.agreement_text import overall_text
    for name, label in (("ana", "match"), ("ben", "non-match")):
        source = tmp_path / f"{name}.csv"
        source.write_text("pair_id,label\n" + "".join(f"{p},{label}\n" for p in range(1, 7)),
                          encoding="utf-8")
        assert run(["label", str(sample_project), "--reviewer", name, "--from", str(source)]) == 0
    capsys.readouterr()
    assert run(["agreement", str(sample_project)]) == 0
    (line,) = [x for x in capsys.readouterr().out.splitlines() if x.startswith("  Fleiss' kappa")]
    assert line == ("  Fleiss' kappa too few pairs to say (n 6; needs 10) on pairs with 2 "
                    "ratings each")
    with Project.open(sample_project) as project:
        report = project.agreement()
    assert isinstance(report, AgreementReport)
    shown = overall_text(report, {}).plain
    assert "needs 10), 2 ratings each" in shown and "(Poor)" not in shown



def label_alike(project: Path, tmp_path: Path, given: dict[str, str], n: int) -> None:
    """Each reviewer gives pairs 1..n one label, by ``docket label``."""
    for name, label in given.items():
        source = tmp_path / f"{name}.csv"
        source.write_text("pair_id,label\n" + "".join(f"{p},{label}\n" for p in range(1, n + 1)),
                          encoding="utf-8")
        assert run(["label", str(project), "--reviewer", name, "--from", str(source)]) == 0


def test_a_figure_with_enough_pairs_but_none_to_give_says_undefined(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # Both say match on 20 pairs: chance agreement is 1, so kappa and alpha are 0 / 0
    # (scikit-learn's cohen_kappa_score and krippendorff.alpha give NaN here, the reference
    # libraries). Fleiss' line said "undefined", alpha's showed a bare dash.
    label_alike(sample_project, tmp_path, {"ana": "match", "ben": "match"}, 20)
    capsys.readouterr()
    assert run(["agreement", str(sample_project)]) == 0
    out = capsys.readouterr().out
    assert "Krippendorff's alpha (nominal) — (n 20; undefined) on pairs" in out
    assert "Fleiss' kappa — (n 20; undefined) on pairs with 2 ratings each" in out
    assert "Cohen's kappa — (n 20; undefined)" in out


def test_pairs_whose_second_label_is_a_hold_are_said_to_have_one_rating(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    from docket.core import Project
    from docket.tui.screens.agreement_text import overall_text
    label_alike(sample_project, tmp_path, {"ana": "hold", "ben": "match"}, 12)
    capsys.readouterr()
    assert run(["agreement", str(sample_project)]) == 0
    said = "Fleiss' kappa — (no pair has two ratings yet; a hold counts as no rating)"
    assert said in capsys.readouterr().out
    with Project.open(sample_project) as project:
        assert said in overall_text(project.agreement(), {}).plain
