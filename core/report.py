"""What ``status`` shows: records, pairs, decisions, and the model's weights."""

from __future__ import annotations

import math
from typing import Any

from .matchers import catalogue
from .matching.decision_rule import CROWDED
from .matching.explain import explanation
from .matching.model import EM_ROUNDS
from .reviewing import gold, missed
from .storage import store
from .storage.project_file import ProjectFile
from .wording import many

CAUTION = ("Records may be personal data: keep the project file private (it is created readable "
           "by you alone), mask what reviewers need not see, and let people review before any "
           "merge. Follow your local data-protection law and your organisation's policy.")


def em_rounds(rounds: int) -> str:
    """EM's rounds, and whether they ran out: a fit stopped at its limit (on sparse fields, say)
    was reported as "500 rounds" like one that had settled."""
    told = f"{rounds:,} round{'' if rounds == 1 else 's'}"
    if rounds < EM_ROUNDS:
        return told
    return f"{told}, its limit: stopped before it settled"


def _level_weights(fs: dict) -> list[list[float]]:
    """log2(m/u) per field and level of a stored model, times its shrink and the field's factor
    (what ``FSModel.weights`` gives, from the dict the notes are handed)."""
    shrink = fs.get("shrink", 1.0)
    factors = fs.get("factors") or [1.0] * len(fs["m"])
    return [[shrink * c * math.log2(m / u) if m > 0 and u > 0 else 0.0
             for m, u in zip(ms, us, strict=True)]
            for ms, us, c in zip(fs["m"], fs["u"], factors, strict=True)]


def flat_note(fs: dict) -> str | None:
    """Why a model none of whose levels moves the odds much says nothing yet (None when some
    level does, or labels are in): EM on a small table found no split, and status printed
    "odds before the fields 1e6 to 1" and a ×1 beside every level, unexplained."""
    if fs.get("labels_used") or len(fs["fields"]) == 1:  # one field: one_field_note says it
        return None
    biggest = max((abs(w) for ws in _level_weights(fs) for w in ws), default=0.0)
    if biggest >= 1.0:  # some level doubles or halves the odds
        return None
    return ("no field's level moves the odds by as much as ×2 either way, so every pair has "
            "about the odds before the fields: EM found nothing that tells matches apart, and "
            "until pairs are labelled and refit these probabilities are no estimate")


def crowded_note(crowding: dict | None, fs: dict, labels: int) -> str | None:
    """Why a model that predicts many matches per record is suspect before labels (None when
    it does not, or labels are in): see ``decision_rule.Crowding``."""
    if labels or not crowding or crowding["per_record"] <= CROWDED:
        return None
    best = [ws[0] for ws in _level_weights(fs)]  # each field's best level
    top = best.index(max(best))
    return (f"with no labels the model predicts {crowding['predicted']:,} matches, "
            f"{crowding['per_record']:.1f} for each record that has one, more than copies "
            f"usually make: EM may have taken a value many records share (it weighs "
            f"{fs['fields'][top]} most) for what makes a match; label pairs and refit before "
            "trusting its predictions")


def one_field_note(fields: int, labels_used: int) -> str | None:
    """Why a one-field model says little before labels (None when it does not apply)."""
    if fields != 1 or labels_used:
        return None
    # Two classes mixed over one field's levels have no single answer: EM's split is one of
    # many that fit the counts equally well, so its probabilities are no estimate yet.
    return ("only one field is compared, and with one field EM cannot tell matches from "
            "look-alikes: until pairs are labelled and refit, the probabilities are a rough "
            "order (perhaps no predicted match at all), not estimates")


def how_fitted(fs: dict) -> list[str]:
    """What the label-free start did, in a few plain sentences."""
    out = []
    if fs.get("u_source") == "random pairs":
        out.append(f"chance agreement (u) measured on {fs.get('sampled_pairs', 0):,} random "
                   "record pairs, exact agreement from value frequencies")
    else:
        out.append("chance agreement (u) estimated among the candidate pairs")
    rounds = fs.get("iterations", 0)
    by_rule = fs.get("rule_classes", 0)
    out.append(f"agreement among matches (m) by EM, {em_rounds(rounds)}"
               + (f", {fs['labels_used']:,} labels held fixed" if fs.get("labels_used") else "")
               + (f", non-matches read as {by_rule} kinds, one per blocking rule (each pair "
                  "under the first rule that found it)" if by_rule else ""))
    pooled = [f"{f}: {g}" for f, groups in zip(fs["fields"], fs.get("pooled", []), strict=False)
              for g in groups]
    out.append("levels kept in order" + (f" by pooling {'; '.join(pooled)}" if pooled
                                          else " (no pooling needed)"))
    if fs.get("shrink", 1.0) < 1.0:
        out.append(f"field weights times {fs['shrink']:.2f}, fitted to EM's view of the "
                   "candidates: fields that agree together among non-matches are not counted "
                   "as independent evidence")
    read_together = [c for c in fs.get("factors", []) if c < 1.0]
    if read_together:  # factors below 1 come only from a group
        out.append(f"{', '.join(fs['together'])} read together, as one home: their weights "
                   f"times {min(read_together):.2f}, so that agreeing on all of them counts as "
                   "agreeing on one home (--together names others, or none)")
    if fs.get("frequent"):
        out.append("frequent values get their own exact level: " + ", ".join(
            f"{f} ({len(v):,} value{'' if len(v) == 1 else 's'})"
            for f, v in fs["frequent"].items()))
    for note in (one_field_note(len(fs["fields"]), fs.get("labels_used", 0)), flat_note(fs)):
        if note:
            out.append(note)
    return out


def one_to_one_suggestion(meta: dict, labels: int) -> str | None:
    """Why ``--one-to-one`` looks right, while no label says otherwise (None when it does not)."""
    hint = meta.get("one_to_one_hint")
    if labels or meta.get("one_to_one") or not hint or not hint.get("suggest"):
        return None
    return (f"both tables look free of duplicates ({_copies(hint)}), yet "
            f"{many(hint['several'], 'record has', 'records have')} more than one predicted "
            "match: a build with "
            "--one-to-one would keep only pairs that are each other's best")


def _copies(hint: dict) -> str:
    """How many records copy another in each table. 'only 0.0% and 0.0% of their records'
    read as a figure hiding something, where no record copied another."""
    left, right = hint["left_repeated"], hint["right_repeated"]
    if not left and not right:
        return "no record copies another of its table exactly"

    def share(x: float) -> str:
        return "none" if not x else "under 0.1%" if x < 0.0005 else f"{x:.1%}"
    return f"records that copy another of their table exactly: {share(left)} and {share(right)}"


def status(project: ProjectFile) -> dict[str, Any]:
    conn = project.connection
    meta = project.meta

    def one(sql: str, *args: Any) -> Any:
        return conn.execute(sql, args).fetchone()[0]

    n_left = one("SELECT count(*) FROM left_records")
    n_right = one("SELECT count(*) FROM right_records") if project.link else n_left
    per_reviewer: dict[str, dict[str, int]] = {}
    per_adjudicator: dict[str, dict[str, int]] = {}  # without it the lines did not add up
    for reviewer, role, label, n in conn.execute(
            "SELECT reviewer, role, label, count(*) FROM current "
            "GROUP BY reviewer, role, label ORDER BY reviewer, label"):
        mine = per_reviewer if role == "reviewer" else per_adjudicator
        mine.setdefault(reviewer, {})[label] = n
    roles = dict(conn.execute("SELECT name, role FROM reviewers"))
    table = explanation(meta)
    model = []
    for j, f in enumerate(project.fields):
        levels = [{"level": name, "m": m, "u": u, "odds_factor": math.exp(table.parts[j][lv])}
                  for lv, name, m, u in conn.execute(
                      "SELECT level, level_name, m, u FROM model WHERE field = ? ORDER BY level",
                      (f.name,))]
        model.append({"field": f.name, "kind": f.kind, "levels": levels})
    fs = meta["fs_model"]
    golds = gold.gold_labels(conn)
    gold_matches = sum(g.label == "match" for g in golds)
    found = missed.listing(conn)
    return {
        "project": str(project.path),
        "name": meta.get("name"),
        "mode": meta["mode"],
        "schema_version": store.SCHEMA_VERSION,
        "records": {"left": n_left, "right": n_right},
        "fields": [f.to_dict() for f in project.fields],
        "pairs": {
            "candidates": one("SELECT count(*) FROM pairs"),
            "open": one("SELECT count(*) FROM pairs WHERE open = 1"),
            "audit": one("SELECT count(*) FROM pairs WHERE audit = 1"),
            "overlap": one("SELECT count(*) FROM pairs WHERE overlap = 1"),
        },
        "blocking": meta["blocking"],
        "sampling": meta.get("sampling"),
        "decisions": {
            "log_entries": one("SELECT count(*) FROM decisions"),
            "retractions": one("SELECT count(*) FROM decisions WHERE label IS NULL"),
            "current_labels": one("SELECT count(*) FROM current"),
            "pairs_decided": one("SELECT count(DISTINCT pair_id) FROM current"),
            "per_reviewer": {r: {"role": roles.get(r, "reviewer"), **c}
                             for r, c in per_reviewer.items()},
            "per_adjudicator": per_adjudicator,
        },
        "model": {
            "ranker": meta.get("ranker"),
            "ranker_note": (meta.get("ranker_note") if meta.get("refits") or
                            not one("SELECT count(*) FROM current") else
                            "labels recorded, not refit yet"),
            "prior": fs["prior"],
            "odds_before_fields": math.exp(table.base),
            "how_fitted": how_fitted(fs),
            "threshold": meta["threshold"],
            "one_to_one": meta.get("one_to_one", False),
            "one_to_one_suggested": one_to_one_suggestion(meta, one(
                "SELECT count(*) FROM current")),
            "crowded": crowded_note(meta.get("crowding"), fs, one(
                "SELECT count(*) FROM current")),
            "refits": meta.get("refits", 0),
            "labels_used": fs.get("labels_used", 0),
            "fields": model,
        },
        "settings": {"overlap_share": meta["overlap_share"],
                     "overlap_reviewers": meta.get("overlap_reviewers", 2),
                     "audit_every": meta["audit_every"],
                     "refit_every": meta["refit_every"]},
        "gold_policy": {**gold.policy(conn),
                        "rules": "unanimous decisions become gold; disagreements only when "
                                 "adjudicated" + (", by an adjudicator who did not review the "
                                                  "pair" if gold.policy(conn)[
                                                      "independent_adjudication"] else "")
                                 + "; holds never"},
        "gold_labels": len(golds),
        "matchers": catalogue.summary(conn),
        "missed_matches": {"count": len(found),
                           "gold_matches": gold_matches,
                           "reach": missed.reach(gold_matches, len(found)),
                           "note": "true matches recorded by id that no candidate pair holds; "
                                   "reach = gold matches / (gold matches + missed), rough and "
                                   "if anything too high"},
        "caution": CAUTION,
    }
