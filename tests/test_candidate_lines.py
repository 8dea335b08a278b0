"""The other candidates of a record (key ``c``) show each other record's first values.

On a people table the list showed the given name alone, so the candidates of one person read
alike; now as many fields as the width holds, the same column for every line of the group.
"""

from __future__ import annotations

from rich.cells import cell_len

from docket.core.types import FieldComparison, PairCard
from docket.tui.masking import Mask
from docket.tui.screens.candidate_lines import INDENT, layout, other_line, record_line

FIELDS = ("given_name", "family_name", "dob", "address", "phone")
ME = ("Orla", "Venn", "1981-04-02", "12 Tarn Row, Brenn", "0100 000 111")
OTHERS = {  # invented people: the same given name, told apart by the fields after it
    "person-0002": ("Orla", "[bold]Venn[/bold]", "1981-04-02", "12 Tarn Row, Brenn", None),
    "person-0003": ("Orla", "Quist", "1990-11-30", "4 Mill Lane, Cawdle", "0100 000 222"),
}
BOX_80, BOX_120 = 58, 94  # the list's line at 80 and 120 columns


def _card(pair_id: int, other: str) -> PairCard:
    fields = tuple(FieldComparison(field=f, kind="text", left=a, right=b, similarity=None,
                                   level=0, level_name="different", contribution=0.0)
                   for f, a, b in zip(FIELDS, ME, OTHERS[other], strict=True))
    return PairCard(pair_id=pair_id, left_id="person-0001", right_id=other, probability=0.2,
                    log_odds=-1.4, base_log_odds=-4.0, reason="candidate", fields=fields)


CARDS = [_card(11, "person-0002"), _card(12, "person-0003")]


def test_each_other_record_shows_the_fields_that_tell_it_apart() -> None:
    for box, lines in ((BOX_80, 2), (BOX_120, 1)):
        at = layout(list(OTHERS), box)
        rows = [other_line(card, "person-0001", at, Mask()) for card in CARDS]
        heading = record_line("first record: 2 other candidates", CARDS[0], "person-0001", at,
                              Mask())
        for text in (*rows, heading):
            assert all(cell_len(line) <= box for line in text.plain.splitlines()), text.plain
        assert all(len(r.plain.splitlines()) == lines for r in rows)
        values = [r.plain.splitlines()[-1][at.column:] for r in rows]
        # markup in a value is shown as typed, never drawn; a missing value reads —
        assert values[0].startswith("Orla · [bold]Venn[/bold] · 1981-04-02")
        assert values[1].startswith("Orla · Quist · 1990-11-30 · 4 Mill Lane")
        assert heading.plain.splitlines()[1][at.column:].startswith("Orla · Venn · 1981-04-02")
        assert heading.plain.splitlines()[1][:at.column].strip() == ""
    wide = other_line(CARDS[0], "person-0001", layout(list(OTHERS), 200), Mask())
    assert wide.plain.endswith("12 Tarn Row, Brenn · —")
    assert layout(list(OTHERS), BOX_80).column == INDENT


def test_the_values_are_masked_and_the_label_keeps_its_room() -> None:
    at = layout(list(OTHERS), BOX_120)
    row = other_line(CARDS[1], "person-0001", at, Mask.of(["family_name"]), label="non-match")
    assert "Quist" not in row.plain and "Q•••t" in row.plain
    assert row.plain.endswith("  your label: non-match") and cell_len(row.plain) <= BOX_120
    # the record on the right of its pairs: the left one is the other record
    flipped = other_line(CARDS[1], "person-0003", at, Mask())
    assert "person-0001" in flipped.plain and "Orla · Venn" in flipped.plain
