"""Several people on one project file at once: reviewer and adjudicator processes, and the checks.

``run_team`` starts two reviewer processes and one adjudicator process on one file, each with
its own connection, as separate ``docket`` sessions would be. A reviewer asks for a pair with a
claim and decides it, again and again; the adjudicator settles whatever waits for it. Each prints
the decisions it was told were saved and every error it met. The suite runs a short, count-bounded
round (``decisions``); ``bench/team_load.py`` runs the time-bounded one (``seconds``).
"""

from __future__ import annotations

import json
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent

_REVIEWER = """
import json, sys, time
from docket.core import Project
path, name, decisions, seconds, modulus = sys.argv[1:6]
decisions, seconds, modulus = int(decisions), float(seconds), int(modulus)
acked, errors, end = [], [], time.monotonic() + seconds
with Project.open(path) as p:
    while (len(acked) < decisions) if decisions else (time.monotonic() < end):
        try:
            items = p.next_pairs(name, 1, claim=True)
            if not items:
                break
            pid = items[0].pair_id
            label = "match" if pid % modulus == 0 else "non-match"
            acked.append(p.decide(pid, name, label, seconds=1.0).decision_id)
        except Exception as exc:
            errors.append(repr(exc))
            if len(errors) > 20:
                break
print(json.dumps({"name": name, "acked": acked, "errors": errors}))
"""

_ADJUDICATOR = """
import json, os, sys
from docket.core import Project
from docket.core.reviewing import adjudication
path, name, stop = sys.argv[1:4]
acked, errors, done = [], [], set()
with Project.open(path) as p:
    for _ in range(1_000_000):
        finished = os.path.exists(stop)
        try:
            waiting = [pid for pid, _ in adjudication.queue(p) if pid not in done]
            for pid in waiting[:5]:
                d = adjudication.adjudicate(p, pid, name, "match", "checked both records")
                acked.append(d.decision_id)
                done.add(pid)
        except Exception as exc:
            errors.append(repr(exc))
            if len(errors) > 20:
                break
        if finished:
            break
print(json.dumps({"name": name, "acked": acked, "errors": errors}))
"""


@dataclass(frozen=True)
class TeamReport:
    decisions: dict[str, int]  # acknowledged decisions per person
    errors: list[str]
    lost: int  # acknowledged decisions missing from the log
    decided_twice: list[int]  # non-overlap pairs with standing labels from two reviewers
    over_need: list[int]  # overlap pairs with more reviewer labels than they need
    seconds: float


def _start(code: str, *args: str) -> subprocess.Popen[str]:
    return subprocess.Popen([sys.executable, "-c", code, *args], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, cwd=REPO)


def run_team(path: Path, decisions: int = 0, seconds: float = 0.0) -> TeamReport:
    """Two reviewers and an adjudicator on ``path``; bounded by ``decisions`` or ``seconds``."""
    from docket.core import Project
    from docket.core.reviewing.team import add_reviewer

    with Project.open(path) as p:
        add_reviewer(p, "lead", "adjudicator", granted_by="test")
    stop = path.with_name(path.name + ".stop")
    stop.unlink(missing_ok=True)
    t = time.perf_counter()
    judge = _start(_ADJUDICATOR, str(path), "lead", str(stop))
    people = [_start(_REVIEWER, str(path), name, str(decisions), str(seconds), str(m))
              for name, m in (("ana", 2), ("ben", 3))]
    outs = [proc.communicate(timeout=600) for proc in people]
    stop.touch()
    outs.append(judge.communicate(timeout=600))
    elapsed = time.perf_counter() - t
    stop.unlink(missing_ok=True)
    results, errors = [], []
    for out, err in outs:
        if not out.strip():
            errors.append(err.strip().splitlines()[-1] if err.strip() else "no output")
            continue
        results.append(json.loads(out.strip().splitlines()[-1]))
    with Project.open(path, readonly=True) as p:
        conn = p.connection
        logged = {d for (d,) in conn.execute("SELECT decision_id FROM decisions")}
        twice = [pid for (pid,) in conn.execute(
            "SELECT c.pair_id FROM current c JOIN pairs p ON p.pair_id = c.pair_id "
            "WHERE c.role = 'reviewer' AND p.overlap = 0 GROUP BY c.pair_id "
            "HAVING count(*) > 1")]
        over = [pid for (pid,) in conn.execute(
            "SELECT c.pair_id FROM current c JOIN pairs p ON p.pair_id = c.pair_id "
            "WHERE c.role = 'reviewer' AND p.overlap = 1 GROUP BY c.pair_id, p.need "
            "HAVING count(*) > p.need")]
    return TeamReport(
        decisions={r["name"]: len(r["acked"]) for r in results},
        errors=errors + [e for r in results for e in r["errors"]],
        lost=sum(1 for r in results for d in r["acked"] if d not in logged),
        decided_twice=twice, over_need=over, seconds=elapsed)
