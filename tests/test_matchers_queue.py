"""Disagreement first: split pairs lead the queue; the audit slice is untouched."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from docket.core import Project
from docket.core.matchers.importing import import_matchers
from docket.core.ordering.queue_order import describe, split_shares
from docket.core.quality.evaluate import evaluate
from docket.tui.cli import main
from tests.matchers_support import (
    SAMPLE_TRUTH,
    answer_audit,
    candidates,
    flipped,
    is_match,
    label_file,
)


def test_split_shares() -> None:
    a, b, c = (np.array(v, dtype=bool) for v in ([1, 1, 0, 0], [1, 0, 1, 0], [1, 0, 0, 0]))
    assert split_shares([a, b, c]).tolist() == [0.0, 1 / 3, 1 / 3, 0.0]


def test_disagreement_first_wraps_the_order_and_leaves_the_audit_slice(sample_project: Path,
                                                                       tmp_path: Path,
                                                                       capsys) -> None:
    with Project.open(sample_project) as p:
        frame = candidates(p)
        y = is_match(frame, SAMPLE_TRUTH)
        labels = {"a": y, "b": flipped(y, 0.01, 1), "c": flipped(y, 0.01, 2)}
        import_matchers(p, [label_file(tmp_path / "m.csv", frame, labels)])
        before = p.next_pairs("r", 30)
    assert main(["matchers", str(sample_project), "queue", "disagreement"]) == 0
    assert "pairs split a, b, c" in capsys.readouterr().out
    split = set(frame.pair_id[(labels["a"] != labels["b"]) | (labels["a"] != labels["c"])])
    with Project.open(sample_project) as p:
        after = p.next_pairs("r", 30)
        audit_before = [q.pair_id for q in before if q.reason == "audit"]
        assert [q.pair_id for q in after if q.reason == "audit"] == audit_before
        assert [i for i, q in enumerate(after) if q.reason == "audit"] == \
            [i for i, q in enumerate(before) if q.reason == "audit"]
        others = [q for q in after if q.reason != "audit"]
        assert others and all(q.reason == "disagreement" and q.pair_id in split for q in others)
        # decided split pairs leave the front of the queue
        for q in others[:3]:
            p.decide(q.pair_id, "r", "match")
        later = p.next_pairs("r", 5)
        assert not {q.pair_id for q in others[:3]} & {q.pair_id for q in later}
        answer_audit(p, SAMPLE_TRUTH)
        report = evaluate(p)
    assert report["queue_order"]["mode"] == "disagreement"
    assert "disagree on first" in report["queue_order"]["text"]
    assert main(["matchers", str(sample_project), "queue", "uncertain"]) == 0
    with Project.open(sample_project) as p:
        assert describe(p.meta)["modes_used"] == ["disagreement", "uncertain"]
        assert all(q.reason != "disagreement" for q in p.next_pairs("r", 10))
