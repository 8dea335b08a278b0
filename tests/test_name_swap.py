"""Given and family names written in each other's columns count as close, and the card says so."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from docket.core import NewProject, Project
from docket.core.matching import name_swap, scoring
from docket.core.records import normalise
from docket.core.types import FieldSpec

FIELDS = [FieldSpec("given", "given", "given", "name"),
          FieldSpec("family", "family", "family", "name"),
          FieldSpec("town", "town", "town", "text")]


def _norm(values: list[str | None]) -> np.ndarray:
    return np.array([None if v is None else normalise.name(v) for v in values], dtype=object)


def test_names_swapped_between_columns_are_close_on_both() -> None:
    # A clerk's slip of common practice in registers: the family name typed as the given name
    # and the other way round. On invented people (bench/invented_people.py) 11 of 29 misses
    # with no labels were exact swaps.
    left = {"given": _norm(["Hanelle", "Ann", "Bo", "Ann"]),
            "family": _norm(["Naentathridge", "Lee", "Ek", "Lee"]),
            "town": np.array(["a", "b", "c", "d"], dtype=object)}
    right = {"given": _norm(["Naentathridge", "Lee", "Bo", "Leo"]),
             "family": _norm(["Hanelle", "Ann", "Ek", "Ann"]),
             "town": np.array(["a", "b", "c", "d"], dtype=object)}
    idx = np.arange(4)
    sims, levels = scoring.compare_pairs(FIELDS, left, right, idx, idx)
    assert levels[:, 0].tolist() == [1, 1, 0, 3] and levels[:, 1].tolist() == [1, 1, 0, 3]
    assert sims[0, 0] == np.float32(0.999)  # equal, but not as written: never shown as exact
    # the same with a frequent value's own level: 'close' is then the third level
    _, lv = scoring.compare_pairs(FIELDS, left, right, idx, idx,
                                  frequent={"given": ["ann"], "family": []})
    assert lv[0, 0] == 2 and lv[0, 1] == 2
    assert name_swap.swapped_fields(FIELDS, {"given": "Hanelle", "family": "Naentathridge"},
                                    {"given": "naentathridge", "family": "HANELLE"}) == \
        {"given", "family"}
    assert name_swap.swapped_fields(FIELDS, {"given": "Bo", "family": "Ek"},
                                    {"given": "Bo", "family": "Ek"}) == set()


def test_the_card_names_a_swap(tmp_path: Path) -> None:
    table = tmp_path / "people.csv"
    table.write_text("id,given,family,town\n1,Hanelle,Naentathridge,Vexby\n"
                     "2,Naentathridge,Hanelle,Vexby\n3,Kasia,Nowak,Sulton\n", encoding="utf-8")
    path = tmp_path / "p.docket"
    Project.create(NewProject(path=path, left=table, id_column="id", rules=["*"]))
    with Project.open(path, readonly=True) as project:
        cards = [project.card(item.pair_id) for item in project.next_pairs("ana", 3)]
    swapped = [c for c in cards if {c.left_id, c.right_id} == {"1", "2"}]
    assert len(swapped) == 1
    names = {row.field: row.level_name for row in swapped[0].fields}
    assert names["given"] == names["family"] == name_swap.SWAPPED
    others = [row.level_name for c in cards if c is not swapped[0] for row in c.fields]
    assert name_swap.SWAPPED not in others


def test_the_card_shows_the_word_swapped(tmp_path: Path) -> None:
    from docket.tui.widgets.pair_card import CardOptions, card_text

    table = tmp_path / "people.csv"
    table.write_text("id,given,family\n1,Hanelle,Naentathridge\n2,Naentathridge,Hanelle\n",
                     encoding="utf-8")
    path = tmp_path / "p.docket"
    Project.create(NewProject(path=path, left=table, id_column="id", rules=["*"]))
    with Project.open(path, readonly=True) as project:
        card = project.card(project.next_pairs("ana", 1)[0].pair_id)
    for width in (70, 110):  # stacked and side by side
        text, _ = card_text(card, CardOptions(stacked=width < 84), width)
        assert text.plain.count("swapped") == 2, text.plain


def test_a_swap_with_a_typo_in_it_is_close_too() -> None:
    # 24 of the invented people's 140 misses with no labels were swaps with a typo
    # ('Polan Kolwick' beside 'Kolwlck Polan'); each crossed value must reach a name's
    # 'close' (Jaro–Winkler 0.92, rapidfuzz), so a swap of two short names one letter off
    # each ('lee' / 'leo': 0.82) stays apart
    left = {"given": _norm(["Polan", "Ann", "Marek", None]),
            "family": _norm(["Kolwick", "Lee", "Torvald", "Ek"]),
            "town": np.array(["a", "b", "c", "d"], dtype=object)}
    right = {"given": _norm(["Kolwlck", "Lea", "Torvald", "Ek"]),
             "family": _norm(["Polan", "Anne", "Marke", "Bo"]),
             "town": np.array(["a", "b", "c", "d"], dtype=object)}
    idx = np.arange(4)
    sims, levels = scoring.compare_pairs(FIELDS, left, right, idx, idx)
    assert levels[0, :2].tolist() == [1, 1]  # kolwick / kolwlck, polan / polan
    assert 0.92 <= sims[0, 0] < 1.0 and 0.92 <= sims[0, 1] < 1.0  # shown as near, not equal
    assert levels[1, :2].tolist() == [3, 3]  # ann / anne is close, lee / lea is not
    assert levels[2, :2].tolist() == [1, 1]  # marek / marke and torvald / torvald
    assert levels[3, 0] == 4  # a missing given name: nothing to cross
    assert name_swap.swapped_fields(FIELDS, {"given": "Polan", "family": "Kolwick"},
                                    {"given": "Kolwlck", "family": "Polan"}) == \
        {"given", "family"}
