"""Invented demo scenario: two veterinary practices merge their client registers.

Everything is made up: owners, pets, streets, towns and postcodes. Phones come from UK ranges
set aside for drama; e-mails use only example.org/.net/.com. A fixed seed makes every run
byte-identical. truth.csv (the true overlaps) is for tests and benchmarks, never for docket.
"""

from __future__ import annotations

import argparse
import csv
import sys
import unicodedata
from collections import Counter
from dataclasses import dataclass, field, replace
from datetime import date, timedelta
from pathlib import Path
from random import Random

# the words sit beside this file, whether it runs as a script or is loaded by its path
sys.path.insert(0, str(Path(__file__).resolve().parent))
from sample_words import (
    DOMAINS,
    FLAVOUR_WEIGHTS,
    FOLD,
    ISO_ON_SOUTH,
    LANDLINE_PREFIXES,
    LATIN_HANDLE,
    MISSING_BASE,
    MISSING_OVERLAP,
    MOBILE_PREFIX,
    NAMES,
    NICKNAMES,
    PET_END,
    PET_START,
    PET_WORDS,
    RATES,
    SPECIES,
    STREET_PARTS,
    STREET_SUFFIX,
    STREET_TYPE,
    TOWN_LEAN,
    TOWNS,
)

SEED = 4711
N_OVERLAP, N_NORTH_ONLY, N_SOUTH_ONLY, N_HOUSEHOLDS = 700, 1300, 1100, 230
FIELDS = ["owner", "pet", "species", "street", "town", "postcode", "phone", "email", "born"]
NORTH_COLUMNS = ["client_id", *FIELDS]
SOUTH_COLUMNS = ["ref", "owner_name", *FIELDS[1:-1], "date_of_birth"]  # a column map is needed
OLDEST, YOUNGEST = date(1934, 1, 1), date(2006, 12, 31)  # every client an adult

# Per flavour of name: invented first names | surname starts | surname endings.
@dataclass
class Person:
    first: str
    last: str
    flavour: str
    born: date
    pet: str
    species: str
    phone: str
    email: str = ""
    street: str = ""
    town: str = ""
    postcode: str = ""
    side: str = ""  # N (north only), S (south only) or B (both: a true overlap)
    household: int = -1
    relation: str = ""
    overrides: dict[str, str] = field(default_factory=dict)  # awkward literal text

    @property
    def owner(self) -> str:
        return self.last + self.first if self.flavour == "cjk" else f"{self.first} {self.last}"


@dataclass
class Scenario:
    north: list[list[str]]
    south: list[list[str]]
    truth: list[tuple[str, str]]
    people: list[Person]
    errors: Counter[str]


def fold(text: str) -> str:
    """Drop diacritics the way an ASCII-only system would (é->e, ł->l, ø->o)."""
    bare = unicodedata.normalize("NFKD", text.translate(FOLD))
    return unicodedata.normalize("NFC", "".join(c for c in bare if not unicodedata.combining(c)))


class Builder:
    def __init__(self, seed: int) -> None:
        self.rng = Random(seed)
        self.mobiles = [f"{MOBILE_PREFIX}{i:03d}" for i in range(1000)]
        self.landlines = [f"{p}{i:03d}" for p in LANDLINE_PREFIXES for i in range(1000)]
        self.rng.shuffle(self.mobiles)
        self.rng.shuffle(self.landlines)
        self.seen_emails: set[str] = set()  # membership tests only; never iterated
        self.names: Counter[str] = Counter()
        self.seen_addresses: set[tuple[str, str]] = set()
        self.streets: dict[str, list[tuple[str, str]]] = {}  # town -> (street, postcode)
        r, letters = self.rng, "ABDEFGHJLNPQRSTUWXYZ"
        for town, area in ((t, a) for group in TOWNS.values() for t, a in group.items()):
            names = sorted({f"{r.choice(STREET_PARTS)}{r.choice(STREET_SUFFIX)} "
                            f"{r.choice(STREET_TYPE)}" for _ in range(16)})
            codes = r.sample(range(10, 100), len(names))  # district + sector digits, unique
            self.streets[town] = [(name, f"{area}{c // 10} {c % 10}" + "".join(
                r.choices(letters, k=2))) for name, c in zip(names, codes, strict=True)]

    def phone(self, mobile_share: float = 0.3) -> str:
        pool = self.mobiles if self.mobiles and self.rng.random() < mobile_share else self.landlines
        return pool.pop()

    def surname(self, flavour: str) -> str:
        _, starts, ends = NAMES[flavour]
        return self.rng.choice(starts) + self.rng.choice(ends)

    def pet(self) -> tuple[str, str]:
        r = self.rng
        name = r.choice(PET_WORDS) if r.random() < 0.3 else r.choice(PET_START) + r.choice(PET_END)
        return name, r.choices(list(SPECIES), list(SPECIES.values()))[0]

    def email(self, p: Person) -> str:
        r = self.rng
        if p.flavour in ("cyrillic", "greek", "cjk"):
            local = "".join(r.choice(LATIN_HANDLE) for _ in range(3))
        else:
            f, s = fold(p.first).lower(), fold(p.last).lower().replace("'", "")
            local = r.choice([f"{f}.{s}", f"{f}{s}", f"{f[0]}.{s}", f"{f}_{s}", f"{s}.{f}"])
        while True:
            address = f"{local}@{r.choice(DOMAINS)}"
            if address not in self.seen_emails:
                self.seen_emails.add(address)
                return address
            local += str(r.randrange(10))

    def person(self, flavour: str | None = None, last: str | None = None,
               born: date | None = None, avoid: tuple[str, ...] = ()) -> Person:
        r = self.rng
        while True:
            fl = flavour or r.choices(list(FLAVOUR_WEIGHTS), list(FLAVOUR_WEIGHTS.values()))[0]
            first = r.choice(NAMES[fl][0])
            if first in avoid:
                continue
            year = int(r.triangular(OLDEST.year, YOUNGEST.year + 1, 1974))
            born = born or date(year, 1, 1) + timedelta(days=r.randrange(365))
            p = Person(first, last or self.surname(fl), fl, born, *self.pet(), self.phone())
            seen = self.names[p.owner]  # a shared full name is allowed now and then
            if seen == 0 or (seen == 1 and r.random() < 0.3):
                self.names[p.owner] += 1
                p.email = self.email(p)
                return p

    def relative(self, head: Person, relation: str, avoid: tuple[str, ...]) -> Person:
        r, day = self.rng, timedelta(days=1)
        keeps_name = relation != "flatmate" and (relation != "spouse" or r.random() < 0.75)
        days = {"spouse": r.randint(-2900, 2900), "child": r.randint(20, 38) * 365,
                "sibling": r.choice([-1, 1]) * r.randint(400, 3650), "twin": 0,
                "flatmate": r.randint(-2000, 2000)}[relation]
        if head.born + days * day > YOUNGEST and relation == "child":
            relation, days = "parent", -r.randint(22, 36) * 365
        born = min(max(head.born + days * day, OLDEST), YOUNGEST)
        last = head.last if keeps_name else None
        same_flavour = relation != "flatmate" and (relation != "spouse" or r.random() < 0.7)
        p = self.person(head.flavour if same_flavour else None, last, born, avoid)
        if relation == "spouse" and r.random() < 0.12:
            p.email = head.email  # a shared family address
        p.relation = relation
        return p

    def household(self, hid: int) -> list[Person]:
        r, head = self.rng, self.person()
        head.relation, members = "head", [head]
        for _ in range(1 if r.random() < 0.7 else 2):
            rel = r.choices(["spouse", "child", "sibling", "flatmate", "twin"], [40, 25, 10, 22, 2])
            members.append(self.relative(head, rel[0], tuple(m.first for m in members)))
        landline = self.landlines.pop() if r.random() < 0.6 else ""
        for m in members:
            m.household, m.phone = hid, landline or m.phone
        return members

    def place(self, unit: list[Person], lean: str) -> None:
        r = self.rng
        group = r.choices(list(TOWNS), TOWN_LEAN[lean])[0]
        town = r.choice(list(TOWNS[group]))
        while True:
            name, postcode = r.choice(self.streets[town])
            street = f"{r.randint(1, 160)} {name}"
            street = f"Flat {r.randint(1, 6)}, {street}" if r.random() < 0.08 else street
            if (street, town) not in self.seen_addresses:
                self.seen_addresses.add((street, town))
                break
        for p in unit:
            p.street, p.town, p.postcode = street, town, postcode

    def awkward(self) -> list[Person]:
        """A few records with legitimate text that a renderer must show literally."""
        specs = [
            ("B", "Teodrin", "O'Neill", {"street": "Flat [B], 12 Heron Close"}),
            ("B", "Marisol", "Peñarra-Whitcombe", {}),
            ("N", "Bryn", "Hallan", {"owner": "Hallan, Bryn"}),
            ("S", "Ivo", "Kessling", {"owner": "Ivo  Kessling", "street": " 4 Quill Row "}),
            ("B", "Averil", "Stobwell", {"pet": "Sir Pounce [the 2nd]"}),
            ("N", "Osric", "Penby", {"pet": '"Noodle"'}),
            ("B", "Oona", "D'Arcy-Lund", {"email": "o.darcy+pets@example.com"}),
            ("S", "Jessamy", "Thornley", {"street": "The Old Forge (rear), Rook Lane"}),
        ]
        people = []
        for side, first, last, overrides in specs:
            p = self.person(flavour="anglo")
            p.first, p.last, p.side, p.overrides = first, last, side, overrides
            p.email = self.email(p)
            people.append(p)
        return people


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
