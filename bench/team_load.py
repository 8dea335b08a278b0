"""Two reviewer processes and an adjudicator on one project file for 30 seconds.

Each reviewer asks for a pair with a claim and decides it, again and again; the adjudicator
settles whatever waits for it. Printed: decisions acknowledged per person and per second, errors,
acknowledged decisions missing from the log, non-overlap pairs decided by two reviewers and
overlap pairs given more reviews than they need. Target: 0 errors, 0 lost, 0 decided twice.
The suite runs a short, count-bounded round of the same code (tests/test_claims.py).

Run: ``nice python bench/team_load.py [SECONDS]``.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import REPO


def main() -> None:
    from docket.core import Project
    from tests.conftest import sample_spec
    from tests.team_load import run_team

    seconds = float(sys.argv[1]) if len(sys.argv) > 1 else 30.0
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "team.docket"
        print(f"building the sample project in {tmp} …", flush=True)
        Project.create(sample_spec(path))
        report = run_team(path, seconds=seconds)
    total = sum(report.decisions.values())
    people = ", ".join(f"{name} {n:,}" for name, n in sorted(report.decisions.items()))
    print(f"{report.seconds:.1f} s: {total:,} decisions acknowledged ({people}; "
          f"{total / report.seconds:.1f} per second)")
    print(f"errors {len(report.errors)}, lost {report.lost}, non-overlap pairs decided twice "
          f"{len(report.decided_twice)}, overlap pairs over their need {len(report.over_need)}")
    for line in report.errors[:5]:
        print(f"  {line}")
    assert REPO  # the repository is on sys.path for tests.*


if __name__ == "__main__":
    main()
