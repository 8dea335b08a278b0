"""Invented second reviewer for the demo: labels on the demo project's overlap pairs.

The demo project (``docket demo``) is built in a temporary folder; its overlap pairs are the
ones two reviewers should decide. The reviewer, "ines", answers from truth.csv (the only
reader of truth besides tests and benchmarks) the way a careful person would: almost always
right on clear pairs, less sure on the hard ones the scenario plants: housemates who share an
address and often a surname, and clients who moved. There she sometimes holds, with a note,
and sometimes errs. A fixed seed makes every run byte-identical.

    python sample/make_second_reviewer.py            # rewrites sample/second_reviewer.csv
    python sample/make_second_reviewer.py --out FILE
"""

from __future__ import annotations

import argparse
import csv
import sqlite3
import tempfile
import unicodedata
from collections import Counter
from dataclasses import dataclass
from pathlib import Path
from random import Random

SEED = 1871
HERE = Path(__file__).resolve().parent
TOP_OF_QUEUE = 260  # overlap pairs the demo user meets first
LIKELY = 60  # more overlap pairs the model thinks are matches: most of the true matches
ANYWHERE = 30  # and a few from anywhere else
ERROR_SHARE, HOLD_SHARE = 0.05, 0.04
# How much likelier a pair of each case is than a clear one to draw (a hold, an error).
WEIGHTS = {"household": (40.0, 30.0), "moved": (30.0, 30.0), "renamed": (10.0, 10.0),
           "namesake": (15.0, 20.0), "clear": (1.0, 1.0)}


def digits(text: str | None) -> str:
    return "".join(c for c in text or "" if c.isdigit())[-9:]


def hold_note(case: str, left: dict[str, str], right: dict[str, str]) -> str:
    """What a reviewer would jot down beside a hold, from what the two records show."""
    born_apart = year(left["born"]) != year(right["date_of_birth"])
    if case == "household":
        if born_apart and year(left["born"]) and year(right["date_of_birth"]):
            return "same address, different birth year?"
        if digits(left["phone"]) and digits(left["phone"]) == digits(right["phone"]):
            return "same address and landline: a relative?"
        return "same address; could be a housemate"
    if case == "moved":
        if fold(left["pet"]) == fold(right["pet"]):
            return "moved? same pet, new address"
        if digits(left["phone"]) and digits(left["phone"]) == digits(right["phone"]):
            return "different postcode, same phone"
        return "new address and a different pet; unsure"
    if case == "renamed":
        return "surname changed? the rest agrees"
    if case == "namesake":
        return "same name, born years apart" if born_apart else "same name, nothing else agrees"
    return "not sure; check with the practice"


WRONG_NOTES = {
    "household": ["same owner, I think", "", ""],
    "moved": ["address differs", ""],
    "renamed": ["different surname", ""],
    "namesake": ["same full name", ""],
    "clear": [""],
}


def fold(text: str | None) -> str:
    text = unicodedata.normalize("NFKD", (text or "").casefold())
    return " ".join("".join(c for c in text if not unicodedata.combining(c)).split())


def year(text: str | None) -> str:
    text = (text or "").strip()
    return text[:4] if len(text) == 10 and text[4] == "-" else text[-4:]


@dataclass(frozen=True)
class Pair:
    left_id: str
    right_id: str
    probability: float


def overlap_pairs(project: Path) -> list[Pair]:
    """Overlap pairs in the order the demo user's queue would rank them (before any refit)."""
    conn = sqlite3.connect(f"file:{project}?mode=ro", uri=True)
    try:
        rows = conn.execute(
            "SELECT p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
            "ON t.pattern_id = p.pattern_id WHERE p.overlap = 1 "
            "ORDER BY t.priority, t.pattern_id, p.pair_id").fetchall()
    finally:
        conn.close()
    return [Pair(a, b, float(p)) for a, b, p in rows]


def build_demo(folder: Path) -> Path:
    from docket.core import Project
    from docket.tui.cli_screens import demo_spec
    spec = demo_spec(folder)
    Project.create(spec)
    return spec.path


def choose(pairs: list[Pair], r: Random) -> list[Pair]:
    top, rest = pairs[:TOP_OF_QUEUE], pairs[TOP_OF_QUEUE:]
    likely = [p for p in rest if p.probability > 0.5]
    picked = r.sample(likely, min(LIKELY, len(likely)))
    others = [p for p in rest if p not in set(picked)]
    picked += r.sample(others, min(ANYWHERE, len(others)))
    return top + picked


def case_of(match: bool, left: dict[str, str], right: dict[str, str]) -> str:
    same_address = (fold(left["postcode"]).replace(" ", "") ==
                    fold(right["postcode"]).replace(" ", "")
                    and fold(left["street"]) in fold(right["street"]))
    lname, rname = fold(left["owner"]).split(), fold(right["owner_name"]).split()
    if match:
        if not same_address:
            return "moved"
        return "renamed" if lname[:1] != rname[:1] or lname[-1:] != rname[-1:] else "clear"
    if same_address:
        return "household"
    return "namesake" if lname and lname == rname else "clear"


def weighted_pick(r: Random, items: list[int], weights: list[float], k: int) -> set[int]:
    """k items without replacement, each drawn with odds proportional to its weight."""
    keyed = sorted(items, key=lambda i: r.random() ** (1.0 / weights[i]), reverse=True)
    return set(keyed[:k])


def label_pairs(chosen: list[Pair], truth: set[tuple[str, str]], north: dict[str, dict],
                south: dict[str, dict], r: Random) -> tuple[list[dict[str, str]], Counter]:
    chosen = sorted(chosen, key=lambda q: (q.left_id, q.right_id))
    match = [(p.left_id, p.right_id) in truth for p in chosen]
    cases = [case_of(m, north[p.left_id], south[p.right_id])
             for p, m in zip(chosen, match, strict=True)]
    everyone = list(range(len(chosen)))
    holds = weighted_pick(r, everyone, [WEIGHTS[c][0] for c in cases],
                          round(HOLD_SHARE * len(chosen)))
    rest = [i for i in everyone if i not in holds]
    wrong = weighted_pick(r, rest, [WEIGHTS[cases[i]][1] for i in everyone],
                          round(ERROR_SHARE * len(chosen)))
    rows, tally = [], Counter()
    for i, p in enumerate(chosen):
        case, left, right = cases[i], north[p.left_id], south[p.right_id]
        if i in holds:
            label, note, outcome = "hold", hold_note(case, left, right), "hold"
        elif i in wrong:
            label = "non-match" if match[i] else "match"
            note, outcome = r.choice(WRONG_NOTES[case]), "wrong"
        else:
            label, note, outcome = ("match" if match[i] else "non-match"), "", "right"
            if case == "renamed" and r.random() < 0.5:
                note = "nickname" if fold(left["owner"])[:2] == fold(right["owner_name"])[:2] \
                    else "surname changed"
        tally[(case, outcome)] += 1
        rows.append({"left_id": p.left_id, "right_id": p.right_id, "label": label,
                     "note": note})
    return rows, tally


def read(path: Path, key: str) -> dict[str, dict[str, str]]:
    with path.open(newline="", encoding="utf-8") as f:
        return {row[key]: row for row in csv.DictReader(f)}


def make(project: Path, out: Path, sample: Path = HERE, seed: int = SEED) -> Counter:
    r = Random(seed)
    with (sample / "truth.csv").open(newline="", encoding="utf-8") as f:
        truth = {(row["left_id"], row["right_id"]) for row in csv.DictReader(f)}
    north = read(sample / "practice_north.csv", "client_id")
    south = read(sample / "practice_south.csv", "ref")
    rows, tally = label_pairs(choose(overlap_pairs(project), r), truth, north, south, r)
    with out.open("w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, ["left_id", "right_id", "label", "note"], lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    return tally


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=HERE / "second_reviewer.csv")
    parser.add_argument("--project", type=Path,
                        help="an already built demo project (default: build one in a temp dir)")
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        project = args.project or build_demo(Path(tmp))
        tally = make(project, args.out)
    n = sum(tally.values())
    outcomes = Counter()
    for (_, outcome), k in tally.items():
        outcomes[outcome] += k
    print(f"wrote {args.out}: {n} pairs; right {outcomes['right']}, wrong {outcomes['wrong']} "
          f"({100 * outcomes['wrong'] / n:.1f}%), hold {outcomes['hold']}")
    for case in WEIGHTS:
        parts = ", ".join(f"{o} {tally[(case, o)]}" for o in ("right", "wrong", "hold"))
        print(f"  {case:<10} {parts}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
