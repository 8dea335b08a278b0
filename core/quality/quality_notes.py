"""What to keep in mind when reading an estimate from the audit slice: the notes of each row.

Each note names the strata it speaks of and how many candidate pairs are at stake, so that a
reader can tell a figure resting on the labels from one resting on an allowance.
"""

from __future__ import annotations

from ..intervals import clopper_pearson
from ..wording import many
from .audit_sample import AuditSample


def _strata(keys: list) -> str:
    """"stratum 5" or "strata 0, 1": "strata 5 have one label each" was said of one."""
    word = "stratum" if len(keys) == 1 else "strata"
    return f"{word} " + ", ".join(str(k) for k in sorted(keys, key=str))


DISPUTED = ("taken as missing at random too, though reviewers disagree on the hard pairs "
            "more than on the rest, so the figures lean towards the easy ones (in a simulation "
            "recall read up to 0.005 high): adjudicate them")


def design_notes(sample: AuditSample, threshold: float, confidence: float = 0.95,
                 disputed: int | None = None) -> list[str]:
    """The notes of one row; ``disputed`` counts the audit pairs whose reviewers disagree
    (None: not counted, and the note says the unlabelled may include them)."""
    notes = []
    labelled = sample.labelled_counts()
    missing = [h for h, n in sample.stratum_sizes.items() if n and h not in labelled]
    if missing:
        left_out = sum(sample.stratum_sizes[h] for h in missing)
        notes.append(f"{_strata(missing)} ({many(left_out, 'pair')}) "
                     + ("has no labels and is" if len(missing) == 1 else "have no labels and are")
                     + " left out")
    held = sample.held_counts()
    drawn = sum(sample.drawn[h] for h in labelled)
    waiting = drawn - sample.n_labelled - sum(held.get(h, 0) for h in labelled)
    unsaid = " (or in disagreement)" if disputed is None else ""
    disputed = min(max(disputed or 0, 0), max(waiting, 0))
    if waiting > 0:
        notes.append(f"{sample.n_labelled:,} of {drawn:,} drawn audit pairs labelled" + (
            f"; {waiting - disputed:,} not reviewed yet{unsaid} are taken as missing at random "
            "within their stratum" if waiting > disputed else ""))
    if disputed:
        notes.append(f"{many(disputed, 'audit pair')} in disagreement, waiting for an "
                     f"adjudicator, {'is' if disputed == 1 else 'are'} {DISPUTED}")
    if held:
        per = ", ".join(f"{h}: {k}" for h, k in sorted(held.items(), key=lambda kv: str(kv[0])))
        notes.append(f"{sample.n_held:,} audit pairs are held (per stratum {per}): held pairs "
                     "are the hard ones, so the bounds count them all wrong and all right; "
                     "adjudicate them to narrow the bounds")
    single = [h for h, m in labelled.items() if m == 1 and sample.stratum_sizes[h] > 1]
    if single:
        notes.append(f"{_strata(single)} " + ("has one label: its" if len(single) == 1 else
                                                "have one label each: their")
                     + " variance is not estimated")
    counts = sample.predicted_counts(threshold)
    pred = sample.score >= threshold
    if counts is not None:
        unseen = [h for h in labelled if counts.get(h, 0) and
                  not (pred & (sample.stratum == h)).any()]
        if unseen:
            k = sum(counts[h] for h in unseen)
            notes.append(f"{k:,} predicted matches in {_strata(unseen)} have no labelled "
                         "pair: the point counts them at the precision of the labelled predicted "
                         "matches nearest in score; the "
                         "intervals are bounds, from all of them wrong to all of them right")
    no_match = [h for h, m in labelled.items() if sample.stratum_sizes[h] > m
                and not sample.label[sample.stratum == h].any()]
    if no_match:
        hidden = sum(sample.stratum_sizes[h] * clopper_pearson(0, labelled[h], confidence)[1]
                     for h in no_match)
        their = "its" if len(no_match) == 1 else "their"
        notes.append(f"no labelled match in {_strata(no_match)}: {their} matches count as "
                     f"0 in the point, though up to {hidden:,.0f} could hide there "
                     f"({confidence:.0%} bound per stratum); the lower ends of recall and F1 "
                     "allow for half a match's worth there, so they read low while few pairs "
                     "there are labelled")
    return notes
