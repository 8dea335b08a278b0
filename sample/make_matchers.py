"""Invented matcher outputs for the demo: what several machine raters said about its pairs.

Five matchers, all made up, answer the demo project's candidate pairs (plus a few pairs it never
proposed, as real matchers do):

- ``lm-plain``, ``lm-fields``, ``lm-json``: one "language model" asked in three prompt
  wordings (a sentence per record, one line per field, the records as JSON). Labels match /
  non-match. Each answers only the pairs a cheap pre-filter passes (same postcode, or owners
  with similar names); the rest count as non-matches. They err rarely on clear pairs and often
  on the hard ones the scenario plants (housemates, clients who moved or changed surname,
  namesakes), and part of their errors are shared, as answers of one model are.
- ``rules``: a hand-written rule score from postcode, owner, pet and phone; it also proposes
  a few pairs with one pet name in one town that blocking never paired (outside the
  candidates: docket counts and reports them).
- ``student``: a small model distilled from ``lm-plain``: a score near its teacher's answer,
  blurred on the hard pairs.

A fixed seed makes every run byte-identical. Reads truth.csv (as the second reviewer does):

    python sample/make_matchers.py            # rewrites sample/matchers_lm.csv and the others
    python sample/make_matchers.py --out DIR
"""

from __future__ import annotations

import argparse
import csv
import math
import tempfile
from pathlib import Path
from random import Random

from rapidfuzz import fuzz

from docket.sample.make_second_reviewer import build_demo, case_of, digits, fold

SEED = 2207
HERE = Path(__file__).resolve().parent
FILES = {"lm": "matchers_lm.csv", "rules": "matcher_rules.csv", "student": "matcher_student.csv"}
# How much likelier than a clear pair each hard case is to be answered wrongly.
HARDNESS = {"clear": 1.0, "household": 14.0, "moved": 12.0, "renamed": 8.0, "namesake": 10.0}
# Per prompt wording: its own error rate on a clear pair (on top of the shared one).
PROMPTS = {"lm-plain": 0.004, "lm-fields": 0.007, "lm-json": 0.012}
SHARED = 0.006  # the model's own blind spots, the same under every wording
MOST = 0.45


def read(path: Path, key: str) -> dict[str, dict[str, str]]:
    with path.open(encoding="utf-8", newline="") as f:
        return {row[key]: row for row in csv.DictReader(f)}


def candidate_pairs(project: Path) -> list[tuple[str, str]]:
    import sqlite3
    conn = sqlite3.connect(f"file:{project}?mode=ro", uri=True)
    try:
        return conn.execute("SELECT left_id, right_id FROM pairs ORDER BY pair_id").fetchall()
    finally:
        conn.close()


def prefilter(left: dict[str, str], right: dict[str, str]) -> bool:
    same_postcode = fold(left["postcode"]).replace(" ", "") == \
        fold(right["postcode"]).replace(" ", "")
    return same_postcode or fuzz.token_set_ratio(fold(left["owner"]),
                                                 fold(right["owner_name"])) >= 70


def rule_score(left: dict[str, str], right: dict[str, str]) -> float:
    postcode = fold(left["postcode"]).replace(" ", "") == fold(right["postcode"]).replace(" ", "")
    owner = fuzz.token_set_ratio(fold(left["owner"]), fold(right["owner_name"])) / 100.0
    pet = fold(left["pet"]) == fold(right["pet"]) and bool(fold(left["pet"]))
    phone = bool(digits(left["phone"])) and digits(left["phone"]) == digits(right["phone"])
    return round(0.35 * postcode + 0.35 * owner + 0.15 * pet + 0.15 * phone, 3)


def answers(pairs: list[tuple[str, str]], north: dict, south: dict,
            truth: set[tuple[str, str]], r: Random) -> dict[str, list[list[str]]]:
    lm: list[list[str]] = []
    rules: list[list[str]] = []
    student: list[list[str]] = []
    for a, b in pairs:
        left, right = north[a], south[b]
        match = (a, b) in truth
        hard = HARDNESS[case_of(match, left, right)]
        score = rule_score(left, right)
        if score >= 0.3:
            rules.append([a, b, f"{score:.3f}"])
        if not prefilter(left, right):
            continue
        shared = r.random() < min(MOST, SHARED * hard)
        said = {}
        for name, own in PROMPTS.items():
            wrong = shared or r.random() < min(MOST, own * hard)
            said[name] = match != wrong
            lm.append([a, b, name, "match" if said[name] else "non-match"])
        # the student copies its teacher's answer, less surely where the pair is hard
        lean = 2.8 - 0.16 * hard + r.gauss(0.0, 1.1)
        logit = lean if said["lm-plain"] else -lean
        student.append([a, b, f"{1.0 / (1.0 + math.exp(-logit)):.3f}"])
    # the rule also looks up owners by pet and town, which the demo's blocking never pairs on
    known = set(pairs)
    by_pet: dict[tuple[str, str], list[str]] = {}
    for b, right in south.items():
        by_pet.setdefault((fold(right["pet"]), fold(right["town"])), []).append(b)
    extra = sorted({(a, b) for a, left in north.items() if fold(left["pet"])
                    for b in by_pet.get((fold(left["pet"]), fold(left["town"])), [])
                    if (a, b) not in known})
    rules += [[a, b, f"{rule_score(north[a], south[b]):.3f}"] for a, b in extra[:25]]
    return {"lm": lm, "rules": rules, "student": student}


def write(path: Path, header: list[str], rows: list[list[str]]) -> None:
    with path.open("w", encoding="utf-8", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)


def make(project: Path, folder: Path) -> dict[str, int]:
    """Write the three files into ``folder`` for the pairs of ``project`` (a demo build)."""
    north = read(HERE / "practice_north.csv", "client_id")
    south = read(HERE / "practice_south.csv", "ref")
    with (HERE / "truth.csv").open(encoding="utf-8", newline="") as f:
        truth = {(row["left_id"], row["right_id"]) for row in csv.DictReader(f)}
    out = answers(candidate_pairs(project), north, south, truth, Random(SEED))
    folder.mkdir(parents=True, exist_ok=True)
    write(folder / FILES["lm"], ["left_id", "right_id", "matcher", "label"], out["lm"])
    write(folder / FILES["rules"], ["left_id", "right_id", "score"], out["rules"])
    write(folder / FILES["student"], ["left_id", "right_id", "score"], out["student"])
    return {FILES[key]: len(rows) for key, rows in out.items()}


def main(argv: list[str] | None = None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=HERE, help="folder to write to")
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        counts = make(build_demo(Path(tmp)), args.out)
    for name, n in counts.items():
        print(f"{name}: {n:,} rows")


if __name__ == "__main__":
    main()
