"""Two invented scenarios that nothing in docket was tuned on, made here from a seed.

- products: one table of shop listings to deduplicate, a free-text name and a price. A copy
  reorders, abbreviates or drops features, writes the model code another way (or leaves it
  out), and may carry a typo or capitals and a changed price. Listings of one brand and kind
  differ mostly in their model code, so many non-matches look alike.
- suppliers: two supplier registers to link: company name with its legal form written two
  ways, address, a VAT-like code and a phone number, each sometimes garbled or missing; sister
  companies share a stem and an address but not their kind of trade.

Every name is made of invented syllables; no real firm, brand or person is meant.
"""

from __future__ import annotations

import csv
import random
from pathlib import Path

SYLLABLES = ["tor", "ven", "ka", "lum", "bri", "sor", "dal", "mek", "fin", "rav", "pol", "qua",
             "zen", "har", "mor", "lis", "ber", "tan", "vok", "sel"]
LETTERS = "ABCDEFGHKLMNPRSTX"
GOODS = [("TV", ["4K", "UHD", "Smart", "LED", "HDR"]),
         ("Laptop", ["15.6in", "8GB", "256GB SSD", "i5", "Ultrabook", "Backlit"]),
         ("Headphones", ["Wireless", "Noise Cancelling", "Over-Ear", "Bluetooth", "Foldable"]),
         ("Blender", ["1200W", "Glass Jar", "6 Speed", "Pulse", "Stainless"]),
         ("Kettle", ["1.7L", "Cordless", "Rapid Boil", "Cool Touch"]),
         ("Drill", ["18V", "Cordless", "Brushless", "2 Batteries", "Keyless Chuck"])]
SHORT = {"Wireless": "Wless", "Bluetooth": "BT", "Stainless": "SS", "Cordless": "Cdls",
         "Noise Cancelling": "NC"}
TRADES = ["Trading", "Supplies", "Logistics", "Foods", "Engineering", "Textiles", "Metals",
          "Plastics", "Services", "Imports"]
FORMS = [("Ltd", "Limited"), ("LLC", "L.L.C."), ("GmbH", "G.m.b.H."), ("Inc", "Incorporated"),
         ("PLC", "Public Limited Company")]
STREETS = ["Mill Lane", "Harbour Road", "Station Street", "Quarry Way", "Orchard Close",
           "Canal Walk", "Forge Row"]
TOWNS = ["Brackwell", "Ostmere", "Fenwick Cross", "Daleholm", "Caddon", "Upper Rill", "Marsby",
         "Kettlebury"]


def _typo(rng: random.Random, s: str) -> str:
    """Half the time, one dropped, swapped or replaced character inside the value."""
    if len(s) < 4 or rng.random() < 0.5:
        return s
    i = rng.randrange(1, len(s) - 1)
    op = rng.random()
    if op < 1 / 3:
        return s[:i] + s[i + 1:]
    if op < 2 / 3:
        return s[:i] + s[i + 1] + s[i] + s[i + 2:]
    return s[:i] + rng.choice("aeiourstnl") + s[i + 1:]


def _write(path: Path, header: list[str], rows: list) -> Path:
    with path.open("w", newline="", encoding="utf-8") as f:
        out = csv.writer(f)
        out.writerow(header)
        out.writerows(rows)
    return path


def _word(rng: random.Random, parts: tuple[int, ...] = (2, 2, 3)) -> str:
    return "".join(rng.choice(SYLLABLES) for _ in range(rng.choice(parts))).capitalize()


def products(folder: Path, seed: int = 7, n: int = 2500) -> tuple[Path, set[tuple[str, str]]]:
    """(products.csv, true pairs both ways round); every other listing has one copy."""
    rng = random.Random(seed)
    brands = [_word(rng, (2,)) for _ in range(10)]
    items = []
    for _ in range(n):
        kind, features = rng.choice(GOODS)
        code = rng.choice(LETTERS) + rng.choice(LETTERS) + str(rng.randint(100, 9999))
        size = str(rng.choice([32, 43, 50, 55, 65])) if kind == "TV" else ""
        items.append((rng.choice(brands), kind, code, size,
                      rng.sample(features, rng.randint(2, len(features))),
                      round(rng.uniform(15, 1500), 2)))

    def name(brand: str, kind: str, code: str, size: str, feats: list[str], copy: bool) -> str:
        feats = list(feats)
        words = [brand] + ([size + ('"' if copy else "-inch")] if size else [])
        if copy:
            rng.shuffle(feats)
            feats = [SHORT.get(f, f) if rng.random() < 0.4 else f for f in feats]
            if len(feats) > 2 and rng.random() < 0.3:
                feats = feats[:-1]
            roll = rng.random()
            code = code.lower() if roll < 0.3 else code[:2] + "-" + code[2:] if roll < 0.5 \
                else code
        words += [*feats, kind] + ([code] if not copy or rng.random() < 0.85 else [])
        text = " ".join(words)
        if copy:
            text = _typo(rng, text) if rng.random() < 0.3 else text
            text = text.upper() if rng.random() < 0.2 else text
        return text

    rows, truth = [], set()
    for i, (brand, kind, code, size, feats, price) in enumerate(items):
        rows.append((f"p{i}", name(brand, kind, code, size, feats, False), f"{price:.2f}"))
        if i % 2 == 0:
            moved = price if rng.random() < 0.6 else round(price * rng.uniform(0.9, 1.1), 2)
            rows.append((f"q{i}", name(brand, kind, code, size, feats, True), f"{moved:.2f}"))
            truth |= {(f"p{i}", f"q{i}"), (f"q{i}", f"p{i}")}
    rng.shuffle(rows)
    return _write(folder / "products.csv", ["id", "name", "price"], rows), truth


def suppliers(folder: Path, seed: int = 11) -> tuple[Path, Path, set[tuple[str, str]]]:
    """(left.csv, right.csv, true pairs): 3,000 left, 2,300 right, 1,500 in both."""
    rng = random.Random(seed)
    firms = []
    for _ in range(3500):
        firms.append({"stem": _word(rng), "trade": rng.choice(TRADES), "form": rng.choice(FORMS),
                      "no": str(rng.randint(1, 250)), "street": rng.choice(STREETS),
                      "town": rng.choice(TOWNS), "vat": f"VX{rng.randint(10**7, 10**8 - 1)}",
                      "phone": f"0{rng.randint(100, 999)} {rng.randint(100, 999)} "
                               f"{rng.randint(1000, 9999)}"})
    for firm in firms[:300]:  # sister companies: same stem and address, another trade
        firms.append({**firm, "trade": rng.choice([t for t in TRADES if t != firm["trade"]]),
                      "vat": f"VX{rng.randint(10**7, 10**8 - 1)}"})
    rng.shuffle(firms)
    left = [(f"A{i:05d}", f"{f['stem']} {f['trade']} {f['form'][0]}",
             f"{f['no']} {f['street']}, {f['town']}", f["vat"], f["phone"])
            for i, f in enumerate(firms[:3000])]
    right = []
    for i, f in enumerate(firms[:1500] + firms[3000:4000]):
        trade = f["trade"] if rng.random() > 0.2 else f["trade"][:4] + "."
        company = f"{_typo(rng, f['stem'])} {trade} {rng.choice(f['form'])}"
        company = company.upper() if rng.random() < 0.1 else company
        address = (f"{f['no']} {_typo(rng, f['street'])}, {f['town']}" if rng.random() > 0.15
                   else f["town"])
        vat = f["vat"] if rng.random() > 0.3 else _typo(rng, f["vat"]) if rng.random() > 0.5 \
            else ""
        phone = f["phone"].replace(" ", "") if rng.random() > 0.3 else ""
        right.append((f"B{i:05d}", company, address, vat, phone))
    truth = {(left[i][0], right[i][0]) for i in range(1500)}
    rng.shuffle(right)
    header = ["id", "company", "address", "vat", "phone"]
    return (_write(folder / "left.csv", header, left), _write(folder / "right.csv", header, right),
            truth)
