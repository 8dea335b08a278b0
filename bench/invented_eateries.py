"""An invented scenario nothing in docket was tuned on, made here from a seed: the eateries of
two town guides as one table to deduplicate, on name and town alone.

A name is one or two words of invented syllables and a kind of place ("Cafe", "Grill", ...),
sometimes with "The" or an owner's "'s". The second guide writes half of its copies with a
typo in the name, some with the kind another way ("Cafe" / "Café", "Bar & Grill") or left
out, and a few with the town misspelt or missing. The kind and the town are shared by many
places, so the one distinctive word of a name is often the only key a pair has: a typo in it
leaves the pair no shared word.

Every name is made of invented syllables; no real place, firm or person is meant.
"""

from __future__ import annotations

import random
from pathlib import Path

from invented_tables import _typo, _word, _write

KINDS = [("Cafe", ["Café", "Coffee House"]), ("Grill", ["Bar & Grill", "Grillhouse"]),
         ("Bistro", ["Bistrot"]), ("Kitchen", ["Kitchens", "Eatery"]),
         ("Diner", ["Dinner"]), ("Tavern", ["Inn", "Taverna"]), ("Noodle Bar", ["Noodles"]),
         ("Bakery", ["Bakehouse", "Bake Shop"]), ("Pizzeria", ["Pizza"]),
         ("Tea Room", ["Tearoom", "Tea Rooms"])]
TOWNS = ["Harwick", "Lowmere", "Eskdon", "Pellow Bay", "Strand End", "Colbury", "Ferris Hill",
         "Wendle", "Ashcombe", "Tolland", "Marrow", "Quenby", "Sallet", "Breck", "Oxmoor",
         "Dunnerly", "Ravel Green", "Hatchett", "Greyholm", "Willowford", "Caskey", "Penrudd"]


def _name(rng: random.Random, stem: str, kind: str) -> str:
    roll = rng.random()
    if roll < 0.15:
        return f"The {stem} {kind}"
    if roll < 0.3:
        return f"{stem}'s {kind}"
    return f"{stem} {kind}"


def eateries(folder: Path, seed: int = 23, n: int = 2600
             ) -> tuple[Path, set[tuple[str, str]]]:
    """(eateries.csv, true pairs both ways round): ``n`` places, 45 % of them in both guides."""
    rng = random.Random(seed)
    weights = [1 / (i + 1) for i in range(len(TOWNS))]  # a few large towns, many small ones
    places = []
    for _ in range(n):
        stem = _word(rng, (2, 3)) if rng.random() < 0.8 else \
            f"{_word(rng, (2,))} {_word(rng, (2,))}"
        kind, others = rng.choice(KINDS)
        places.append((stem, kind, others, rng.choices(TOWNS, weights)[0]))
    rows, truth = [], set()
    for i, (stem, kind, others, town) in enumerate(places):
        rows.append((f"g1-{i}", _name(rng, stem, kind), town))
        if rng.random() < 0.45:
            roll = rng.random()
            other_kind = rng.choice(others) if roll < 0.3 else "" if roll < 0.4 else kind
            name = _name(rng, _typo(rng, stem) if rng.random() < 0.9 else stem, other_kind)
            name = name.strip().upper() if rng.random() < 0.1 else name.strip()
            seen = town if rng.random() > 0.1 else "" if rng.random() < 0.5 else \
                _typo(rng, town)
            rows.append((f"g2-{i}", name, seen))
            truth |= {(f"g1-{i}", f"g2-{i}"), (f"g2-{i}", f"g1-{i}")}
    rng.shuffle(rows)
    return _write(folder / "eateries.csv", ["id", "name", "town"], rows), truth
