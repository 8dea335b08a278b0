"""Invented people, the job docket is most often given: patients or claimants, made from a seed.

- people: one register to deduplicate; a person has one to three records.
- registers: two registers to link (a clinic's and a benefits office's); about 60 % of the
  second's people are in the first.

A copy carries the errors of people typing records in: a typo, given and family name swapped
between the columns, a short form or an initial for the given name, a family name changed or
hyphenated at marriage, the day and month of birth swapped or one digit wrong, the date written
another way ('1984-03-07', '07/03/1984', '7 Mar 1984'), a move, empty fields, a phone with
spaces or a country code, and an identifier present only sometimes. The hard non-matches live
together: twins (same family name, birth date, address and phone, another given name), a
parent and child of one name at one address (sometimes 'Jr' / 'Sr'), spouses, and a few family
names that many share.

Every name, street and town is made of invented syllables; no real person is meant.
"""

from __future__ import annotations

import contextlib
import random
from dataclasses import dataclass, replace
from datetime import date, timedelta
from pathlib import Path

from invented_tables import _typo, _write

ONSETS = ["b", "d", "f", "g", "h", "k", "l", "m", "n", "p", "r", "s", "t", "v", "z", "br", "dr",
          "gr", "kl", "st", "th", "tr"]
VOWELS = ["a", "e", "i", "o", "u", "ae", "ei", "ou"]
CODAS = ["", "", "n", "r", "l", "s", "th", "nd", "m"]
FEMALE_END = ["a", "ina", "elle", "ia", "ette", "is"]
MALE_END = ["o", "an", "ar", "ek", "ius", "en"]
SURNAME_END = ["son", "wick", "ford", "ley", "mann", "by", "ton", "ridge", "er", "sk"]
STREET_END = ["Lane", "Road", "Street", "Close", "Way", "Row", "Gardens", "Terrace"]
MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"]
HEADER = ["id", "given_name", "family_name", "dob", "sex", "address", "town", "postcode",
          "phone", "national_id"]


def _syllable(rng: random.Random) -> str:
    return rng.choice(ONSETS) + rng.choice(VOWELS) + rng.choice(CODAS)


def _names(rng: random.Random, n: int, ends: list[str], parts: tuple[int, ...]) -> list[str]:
    out: set[str] = set()
    while len(out) < n:
        out.add(("".join(_syllable(rng) for _ in range(rng.choice(parts)))
                 + rng.choice(ends)).capitalize())
    return sorted(out)


@dataclass(frozen=True)
class Person:
    given: str
    family: str
    sex: str
    born: date
    street: str  # '12 Brolen Lane'
    town: str
    postcode: str
    phone: str  # national digits, '0' and ten more
    national: str  # 'QX123456C' or '' (never issued)
    suffix: str = ""  # 'Jr' or 'Sr' where a parent and child share a name, written sometimes


@dataclass
class World:
    rng: random.Random
    female: list[str]
    male: list[str]
    surnames: list[str]
    weights: list[float]  # a few family names are common
    streets: list[str]
    towns: list[tuple[str, str]]  # (town, postcode area)

    @classmethod
    def make(cls, seed: int) -> World:
        rng = random.Random(seed)
        surnames = _names(rng, 900, SURNAME_END, (1, 2))
        rng.shuffle(surnames)
        towns = _names(rng, 30, ["ham", "mere", "stow", "field", "holm", "bury"], (1,))
        areas = [a + b for a in "BDFGHKLMNPRSTW" for b in "ABEHKLNRSTW"]
        return cls(rng, _names(rng, 400, FEMALE_END, (1, 2)), _names(rng, 400, MALE_END, (1, 2)),
                   surnames, [1.0 / (i + 10) for i in range(len(surnames))],
                   [f"{_names(rng, 1, [''], (2,))[0]} {rng.choice(STREET_END)}"
                    for _ in range(400)],
                   list(zip(towns, rng.sample(areas, len(towns)), strict=True)))

    def given(self, sex: str) -> str:
        return self.rng.choice(self.female if sex == "F" else self.male)

    def home(self) -> tuple[str, str, str]:
        rng = self.rng
        town, area = rng.choice(self.towns)
        inward = "".join(rng.choice("ABDEFGHJLNPQRSTUWXYZ") for _ in range(2))
        return (f"{rng.randint(1, 240)} {rng.choice(self.streets)}", town,
                f"{area}{rng.randint(1, 29)} {rng.randint(1, 9)}{inward}")

    def phone(self) -> str:
        return f"0{self.rng.randint(1000, 7999)}{self.rng.randint(100000, 999999)}"

    def national(self) -> str:
        rng = self.rng
        return "" if rng.random() < 0.25 else \
            f"Q{rng.choice('ABCEHJKLMNPRSTWXYZ')}{rng.randint(0, 999999):06d}{rng.choice('ABCD')}"

    def person(self) -> Person:
        rng = self.rng
        sex = rng.choice("FM")
        family = rng.choices(self.surnames, self.weights)[0]
        born = date(1930, 1, 1) + timedelta(days=rng.randint(0, 80 * 365))
        return Person(self.given(sex), family, sex, born, *self.home(), self.phone(),
                      self.national())


def households(world: World, n: int) -> list[list[Person]]:
    """About ``n`` people in households; twins, namesake parents and spouses live together."""
    rng, out, count = world.rng, [], 0
    while count < n:
        head = world.person()
        house = [head]
        roll = rng.random()
        if roll < 0.06:  # twins: all but the given name (and often the sex) and the id
            house.append(replace(head, given=world.given(s := rng.choice("FM")), sex=s,
                                 national=world.national()))
        elif roll < 0.10 and head.born.year < 1975:  # a son or daughter of the same name
            born = head.born + timedelta(days=rng.randint(20 * 365, 35 * 365))
            house[0] = replace(head, suffix="Sr")
            house.append(replace(head, born=born, national=world.national(), suffix="Jr",
                                 phone=head.phone if rng.random() < 0.5 else world.phone()))
        elif roll < 0.25:  # a spouse: same family name and home, another person
            s = "M" if head.sex == "F" else "F"
            house.append(replace(head, given=world.given(s), sex=s, national=world.national(),
                                 born=head.born + timedelta(days=rng.randint(-3000, 3000))))
        out.append(house)
        count += len(house)
    return out


def _dob(born: date, style: str) -> str:
    if style == "iso":
        return born.isoformat()
    if style == "dmy":
        return born.strftime("%d/%m/%Y")
    return f"{born.day} {MONTHS[born.month - 1]} {born.year}"


def _short(given: str) -> str:
    """A short form of an invented given name: its first syllable, sometimes with '-y'."""
    cut = next((i for i in range(2, len(given)) if given[i] in "aeiou" and
                given[i - 1] not in "aeiou"), len(given))
    stem = given[:cut].rstrip("aeiou") or given[:3]
    return stem + ("y" if len(stem) < 4 else "")


def copy(world: World, p: Person, style: str, spaced_id: bool) -> list[str]:
    """One record of ``p`` as a clerk might have typed it: each error at its own rate."""
    rng = world.rng
    given, family, born = p.given, p.family, p.born
    street, town, postcode, phone = p.street, p.town, p.postcode, p.phone
    roll = rng.random()
    if roll < 0.08:
        given = _short(given)
    elif roll < 0.13:
        given = given[0] + ("." if rng.random() < 0.5 else "")
    if p.sex == "F" and rng.random() < 0.08:  # married since: a new or a double family name
        other = rng.choices(world.surnames, world.weights)[0]
        family = other if rng.random() < 0.6 else f"{family}-{other}"
    if rng.random() < 0.15:
        given = _typo(rng, given)
    if rng.random() < 0.15:
        family = _typo(rng, family)
    if p.suffix and rng.random() < 0.4:
        family = f"{family} {p.suffix}"
    if rng.random() < 0.04:
        given, family = family, given
    roll = rng.random()
    if roll < 0.03 and born.day <= 12 and born.day != born.month:
        born = born.replace(day=born.month, month=born.day)
    elif roll < 0.06:
        text = born.isoformat()
        i = rng.choice([2, 3, 6, 9])
        with contextlib.suppress(ValueError):  # no such day: the date stays right
            born = date.fromisoformat(text[:i] + str((int(text[i]) + rng.randint(1, 8)) % 10)
                                      + text[i + 1:])
    if rng.random() < 0.12:  # moved house
        street, town, postcode = world.home()
        phone = world.phone() if rng.random() < 0.5 else phone
    elif rng.random() < 0.1:
        street = _typo(rng, street)
    roll = rng.random()
    if roll < 0.3:
        phone = f"{phone[:5]} {phone[5:]}"
    elif roll < 0.45:
        phone = f"+44 {phone[1:5]} {phone[5:]}"
    national = p.national if rng.random() < 0.6 else ""
    if national and spaced_id:
        national = f"{national[:2]} {national[2:4]} {national[4:6]} {national[6:8]} {national[8]}"
    if national and rng.random() < 0.05:
        national = _typo(rng, national)
    row = [given, family, _dob(born, style), p.sex, street, town, postcode, phone, national]
    for i, share in ((2, 0.03), (3, 0.05), (6, 0.08), (7, 0.25)):
        if rng.random() < share:
            row[i] = ""
    return row


def people(folder: Path, seed: int = 23, n: int = 2500) -> tuple[Path, set[tuple[str, str]]]:
    """(people.csv, true pairs both ways round): ``n`` people in about 4,300 records."""
    world = World.make(seed)
    rng = world.rng
    rows, truth = [], set()
    for h, house in enumerate(households(world, n)):
        for k, person in enumerate(house):
            copies = rng.choices([1, 2, 3], [0.45, 0.4, 0.15])[0]
            ids = [f"P{h:05d}{k}{c}" for c in range(copies)]
            for c, rid in enumerate(ids):
                style = rng.choice(["iso", "dmy", "text"])
                rows.append([rid, *(copy(world, person, style, rng.random() < 0.3) if c else
                                    _clean(person, style))])
            truth |= {(a, b) for a in ids for b in ids if a != b}
    rng.shuffle(rows)
    ids = {r[0]: f"R{i:05d}" for i, r in enumerate(sorted(rows, key=lambda r: rng.random()))}
    rows = [[ids[r[0]], *r[1:]] for r in rows]
    truth = {(ids[a], ids[b]) for a, b in truth}
    return _write(folder / "people.csv", HEADER, rows), truth


def _clean(p: Person, style: str) -> list[str]:
    return [p.given, f"{p.family} {p.suffix}" if p.suffix else p.family, _dob(p.born, style),
            p.sex, p.street, p.town, p.postcode, p.phone, p.national]


def registers(folder: Path, seed: int = 29, n: int = 3000) -> tuple[Path, Path,
                                                                    set[tuple[str, str]]]:
    """(clinic.csv, benefits.csv, true pairs): about 2,400 and 1,750 records, 1,200 in both;
    the clinic writes dates as ISO and ids plain, the office as day/month/year or in words
    and ids spaced."""
    world = World.make(seed)
    rng = world.rng
    everyone = [p for house in households(world, n) for p in house]
    left, right, truth = [], [], set()
    for i, p in enumerate(everyone):
        in_left, in_right = (True, True) if rng.random() < 0.4 else \
            (True, False) if rng.random() < 0.7 else (False, True)
        if in_left:
            left.append([f"C{i:05d}", *_clean(p, "iso")])
        if in_right:
            style = "dmy" if rng.random() < 0.8 else "text"
            right.append([f"B{i:05d}", *copy(world, p, style, True)])
        if in_left and in_right:
            truth.add((f"C{i:05d}", f"B{i:05d}"))
    rng.shuffle(left)
    rng.shuffle(right)
    renamed = {r[0]: f"B{j:05d}" for j, r in enumerate(right)}  # no id tells the pairs
    right = [[renamed[r[0]], *r[1:]] for r in right]
    truth = {(a, renamed[b]) for a, b in truth}
    return (_write(folder / "clinic.csv", HEADER, left),
            _write(folder / "benefits.csv", HEADER, right), truth)
