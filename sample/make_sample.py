"""Invented demo scenario: two veterinary practices merge their client registers.

Everything is made up: owners, pets, streets, towns and postcodes. Phones come from UK ranges
set aside for drama; e-mails use only example.org/.net/.com. A fixed seed makes every run
byte-identical. truth.csv (the true overlaps) is for tests and benchmarks, never for docket.
"""

from __future__ import annotations

import argparse
import csv
import sys
from collections import Counter
from dataclasses import dataclass, replace
from datetime import date
from pathlib import Path
from random import Random

# the words sit beside this file, whether it runs as a script or is loaded by its path
sys.path.insert(0, str(Path(__file__).resolve().parent))
from sample_people import Builder, Person, fold
from sample_words import (
    ISO_ON_SOUTH,
    LANDLINE_PREFIXES,
    MISSING_BASE,
    MISSING_OVERLAP,
    NICKNAMES,
    RATES,
)

SEED = 4711
N_OVERLAP, N_NORTH_ONLY, N_SOUTH_ONLY, N_HOUSEHOLDS = 700, 1300, 1100, 230
FIELDS = ["owner", "pet", "species", "street", "town", "postcode", "phone", "email", "born"]
NORTH_COLUMNS = ["client_id", *FIELDS]
SOUTH_COLUMNS = ["ref", "owner_name", *FIELDS[1:-1], "date_of_birth"]  # a column map is needed


@dataclass
class Scenario:
    north: list[list[str]]
    south: list[list[str]]
    truth: list[tuple[str, str]]
    people: list[Person]
    errors: Counter[str]


def typo(r: Random, text: str, transpose: bool = False) -> str:
    spots = [i for i, c in enumerate(text) if c.isalpha()]
    if len(spots) < 4:
        return text
    if transpose:
        pairs = [i for i in spots[:-1] if text[i + 1].isalpha() and text[i] != text[i + 1]]
        i = r.choice(pairs or [0])
        return text[:i] + text[i + 1] + text[i] + text[i + 2:] if pairs else text
    i, op = r.choice(spots), r.randrange(3)  # substitute, insert or delete one letter
    c = r.choice("abcdefghijklmnopqrstuvwxyz" if text[i].isascii() else [text[j] for j in spots])
    c = c.upper() if text[i].isupper() else c.lower()
    return text[:i] + c + text[i + (op == 0):] if op < 2 else text[:i] + text[i + 1:]


def phone_variant(r: Random, phone: str) -> str:
    head, _, rest = phone.partition(" ")
    return r.choice([phone.replace(" ", ""), f"+44 {phone[1:]}", "+44" + phone[1:].replace(" ", ""),
                     f"+44 (0){phone[1:]}", phone.replace(" ", "-"), f"({head}) {rest}"])


def casing(r: Random, row: dict[str, str], p: Person) -> None:
    column, change = r.choice([
        ("owner", str.upper), ("owner", lambda v: v.replace(p.last, p.last.upper())),
        ("owner", str.lower), ("owner", lambda v: v.replace(" ", "  ", 1) + " "),
        ("street", str.lower), ("postcode", lambda v: v.replace(" ", "").lower())])
    row[column] = change(row[column])


def values(p: Person, born: str) -> dict[str, str]:
    return {f: getattr(p, f) for f in FIELDS[:-1]} | {"born": born} | p.overrides


def south_date(r: Random, d: date) -> str:
    return d.isoformat() if r.random() < ISO_ON_SOUTH else d.strftime("%d/%m/%Y")


def blank(r: Random, row: dict[str, str], rates: dict[str, float]) -> None:
    row.update({name: "" for name, rate in rates.items() if r.random() < rate})


def right_copy(b: Builder, p: Person, errors: Counter[str]) -> dict[str, str]:
    """The south practice's record of a client both practices know, with realistic errors."""
    r, q = b.rng, replace(p, overrides=dict(p.overrides))

    def hit(name: str) -> bool:
        errors[name] += (yes := r.random() < RATES[name])
        return yes

    if q.first in NICKNAMES and hit("nickname"):
        q.first = NICKNAMES[q.first]
    if q.flavour != "cjk" and "owner" not in q.overrides and hit("surname changed"):
        new = b.surname(q.flavour)
        q.last = r.choice([new, new, f"{q.last}-{new}", f"{new}-{q.last}"])
        if r.random() < 0.4:
            q.email = b.email(q)
    if hit("moved"):
        q.overrides.pop("street", None)
        b.place([q], r.choice("NBS"))
        if q.phone.startswith(tuple(LANDLINE_PREFIXES)) and r.random() < 0.5:
            q.phone = b.landlines.pop()
    if hit("different pet"):
        q.overrides.pop("pet", None)
        q.pet, q.species = b.pet()
    born = q.born
    if born.day <= 12 and born.day != born.month and hit("day/month swapped"):
        born = date(born.year, born.day, born.month)
    row = values(q, south_date(r, born))
    if fold(row["owner"] + row["street"]) != row["owner"] + row["street"] and hit(
            "diacritics dropped"):
        row["owner"], row["street"] = fold(row["owner"]), fold(row["street"])
    for column in ("owner", "street", "pet"):
        if hit(f"{column} typo"):
            row[column] = typo(r, row[column])
    local, at, domain = row["email"].partition("@")
    if at and hit("email typo"):  # only the local part: a typo in the domain could be real
        row["email"] = f"{typo(r, local)}@{domain}"
    if hit("owner transposition"):
        row["owner"] = typo(r, row["owner"], transpose=True)
    if "[B]" in row["street"]:
        row["street"] = row["street"].lower()  # "[b]" looks like a markup tag to a renderer
    elif hit("casing/spacing"):
        casing(r, row, q)
    if hit("phone format"):
        row["phone"] = phone_variant(r, row["phone"])
    before = sum(v == "" for v in row.values())
    blank(r, row, MISSING_OVERLAP)
    errors["missing value(s)"] += sum(v == "" for v in row.values()) > before
    return row


def build(seed: int = SEED) -> Scenario:
    """Draw the whole scenario: both registers, the true overlaps and error counts."""
    b = Builder(seed)
    r, households, awkward = b.rng, [b.household(h) for h in range(N_HOUSEHOLDS)], b.awkward()
    wanted = Counter({"B": N_OVERLAP, "N": N_NORTH_ONLY, "S": N_SOUTH_ONLY})
    wanted.subtract(p.side for p in awkward)
    loose = [p for h in households for p in h]
    loose += [b.person() for _ in range(wanted.total() - len(loose))]
    sides = list(wanted.elements())
    r.shuffle(sides)  # households land within one file, across both, or split
    for p, side in zip(loose, sides, strict=True):
        p.side = side
    people = awkward + loose
    for unit in households + [[p] for p in people if p.household < 0]:
        b.place(unit, unit[0].side)
    errors: Counter[str] = Counter()
    ids: dict[tuple[str, int], str] = {}
    rows: dict[str, list[list[str]]] = {"N": [], "S": []}
    for tag, start in (("N", 1), ("S", 10001)):
        chosen = [p for p in people if p.side in tag + "B"]
        r.shuffle(chosen)  # so that ids say nothing about overlap
        for i, p in enumerate(chosen, start):
            ids[tag, id(p)] = f"{tag}-{i:05d}"
            if tag == "N":
                row = values(p, p.born.isoformat())
            else:
                row = right_copy(b, p, errors) if p.side == "B" else values(
                    p, south_date(r, p.born))
            blank(r, row, MISSING_BASE)
            rows[tag].append([ids[tag, id(p)]] + [row[f] for f in FIELDS])
    truth = sorted((ids["N", id(p)], ids["S", id(p)]) for p in people if p.side == "B")
    return Scenario(sorted(rows["N"]), sorted(rows["S"]), truth, people, errors)


def write(s: Scenario, out: Path) -> None:
    out.mkdir(parents=True, exist_ok=True)
    tables = [("practice_north.csv", NORTH_COLUMNS, s.north),
              ("practice_south.csv", SOUTH_COLUMNS, s.south),
              ("truth.csv", ["left_id", "right_id"], s.truth)]
    for name, header, rows in tables:
        with (out / name).open("w", newline="", encoding="utf-8") as f:
            csv.writer(f, lineterminator="\n").writerows([header, *rows])


def summary(s: Scenario) -> str:
    houses: dict[int, list[Person]] = {}
    for p in s.people:
        if p.household >= 0:
            houses.setdefault(p.household, []).append(p)
    pairs = [(a, c) for h in houses.values() for a in h for c in h if a is not c]
    within = sum((a.side in "NB" and c.side in "NB") + (a.side in "SB" and c.side in "SB")
                 for a, c in pairs) // 2
    cross = sum(a.side in "NB" and c.side in "SB" for a, c in pairs)
    split = len({id(a) for a, c in pairs if a.side == "B" and c.side in "NS"})
    relations = Counter(p.relation for h in houses.values() for p in h)
    non_latin = sum(p.flavour in ("cyrillic", "greek", "cjk") for p in s.people) / len(s.people)
    lines = [f"north rows {len(s.north)}, south rows {len(s.south)}, true overlaps {len(s.truth)}",
             f"households {len(houses)} with {sum(map(len, houses.values()))} clients "
             f"({', '.join(f'{k} {n}' for k, n in sorted(relations.items()))})",
             f"same-address non-match pairs: {within} within a file, {cross} across files; "
             f"{split} overlapping clients have a housemate in one file only",
             f"non-Latin owners {non_latin:.1%} of clients",
             "errors on the south copy of overlaps (share of overlaps):"]
    lines += [f"  {name:<22}{n / len(s.truth):6.1%}" for name, n in sorted(s.errors.items())]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path(__file__).resolve().parent,
                        help="folder for the CSV files (default: this script's folder)")
    parser.add_argument("--seed", type=int, default=SEED, help="random seed (default: %(default)s)")
    args = parser.parse_args(argv)
    scenario = build(args.seed)
    write(scenario, args.out)
    print(summary(scenario))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
