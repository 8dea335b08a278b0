"""Shared bits for the benchmarks: where the outside data is, timing helpers."""

from __future__ import annotations

import os
import sys
import time
from collections.abc import Callable
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(REPO))  # for tests.quality


def data_dir() -> Path:
    folder = Path(os.environ.get("DOCKET_DATA", REPO.parent / "shared" / "data")) / "dblp-acm"
    if not (folder / "matches.csv").exists():
        sys.exit(f"outside data absent: set DOCKET_DATA (looked in {folder})")
    return folder


def best_of(func: Callable[[], object], repeat: int = 3) -> float:
    """Best wall time of ``repeat`` runs: the least disturbed by the noisy machine."""
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        func()
        times.append(time.perf_counter() - t)
    return min(times)
