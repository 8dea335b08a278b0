"""The invented people of the demo scenario: who they are, where they live, how they are reached.

Every draw goes through one seeded Random held by the Builder, so the order of calls here is part of
the scenario: change it and the committed CSV files change.
"""

from __future__ import annotations

import unicodedata
from collections import Counter
from dataclasses import dataclass, field
from datetime import date, timedelta
from random import Random

from sample_words import (
    DOMAINS,
    FLAVOUR_WEIGHTS,
    FOLD,
    LANDLINE_PREFIXES,
    LATIN_HANDLE,
    MOBILE_PREFIX,
    NAMES,
    PET_END,
    PET_START,
    PET_WORDS,
    SPECIES,
    STREET_PARTS,
    STREET_SUFFIX,
    STREET_TYPE,
    TOWN_LEAN,
    TOWNS,
)

OLDEST, YOUNGEST = date(1934, 1, 1), date(2006, 12, 31)  # every client an adult


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
        _, starts, ends = NAMES[flavour]  # invented first names | surname starts | endings
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
