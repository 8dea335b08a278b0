"""Ten machine raters over 1,000,000 candidate pairs: import and ``evaluate --matchers``.

The 1 M-pair project of ``bench/scale.py`` is built in a temporary folder, its audit slice
answered from a synthetic truth (5 % of pairs are matches), and ten matcher files written (one
Parquet file per matcher: six scores, four labels, each the truth with its own noise; half of
them list the pairs in the candidates' order, half shuffled, so both lookups are measured). Import
and the side-by-side report each run in a child process that reports its own peak RSS.
Targets: each <= 30 s, peak RSS <= 1.5 GB. Printed beside them: the plain ``docket evaluate``
of the model on the same project, in the same run.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from scale import BUILD, make_inputs

N_MATCHERS = 10
STEP = """
import resource, sys, time
from docket.tui.cli import main
t = time.perf_counter()
code = main(sys.argv[1:])
use = resource.getrusage(resource.RUSAGE_SELF)
print(time.perf_counter() - t, use.ru_utime + use.ru_stime, use.ru_maxrss / 1024, code)
"""


def step(*argv: str) -> tuple[float, float, float]:
    """(seconds inside, CPU seconds, peak RSS in MB) of one docket command in a fresh
    interpreter. On a shared machine the CPU seconds say what the wall clock cannot."""
    done = subprocess.run([sys.executable, "-c", STEP, *argv], capture_output=True, text=True,
                          check=True)
    seconds, cpu, peak, code = done.stdout.strip().splitlines()[-1].split()
    if code != "0":
        sys.exit(f"docket {' '.join(argv)} failed: {done.stderr.strip()}")
    return float(seconds), float(cpu), float(peak)


def answer_and_write(project: Path, folder: Path) -> list[Path]:
    from docket.core import Project
    with Project.open(project) as p:
        frame = pd.read_sql_query("SELECT pair_id, left_id, right_id, audit FROM pairs "
                                  "ORDER BY pair_id", p.connection)
        rng = np.random.default_rng(7)
        truth = rng.random(len(frame)) < 0.05
        for pid in frame.pair_id[frame.audit == 1]:
            p.decide(int(pid), "bench", "match" if truth[pid - 1] else "non-match")
    files = []
    for i in range(N_MATCHERS):
        noise = rng.normal(0.0, 0.1 + 0.03 * i, len(frame))
        score = np.clip(np.where(truth, 0.8, 0.2) + noise, 0.0, 1.0)
        out = pd.DataFrame({"left_id": frame.left_id, "right_id": frame.right_id})
        if i < 4:
            out["label"] = np.where(score >= 0.5, "match", "non-match")
        else:
            out["score"] = score
        if i % 2:
            out = out.sample(frac=1.0, random_state=i)
        path = folder / f"m{i}.parquet"
        out.to_parquet(path, index=False)
        files.append(path)
    return files


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        lp, rp, pp = make_inputs(folder)
        project = folder / "matchers.docket"
        subprocess.run([sys.executable, "-c", BUILD, str(project), str(lp), str(rp), str(pp)],
                       capture_output=True, text=True, check=True)
        files = answer_and_write(project, folder)
        p = str(project)
        t_import, c_import, m_import = step("matchers", p, "import", *map(str, files))
        for args in (["mark", "m0", "m1", "m2", "--group", "prompts"],
                     ["mark", "m0", "--role", "teacher"], ["mark", "m4", "--role", "student"]):
            step("matchers", p, *args)
        t_eval, c_eval, m_eval = step("evaluate", p, "--matchers", "--json")
        t_model, c_model, m_model = step("evaluate", p, "--json")
        print(f"{N_MATCHERS} matchers over 1,000,000 candidate pairs (one Parquet file each)")
        print(f"import:               {t_import:6.1f} s ({c_import:5.1f} s CPU), peak RSS "
              f"{m_import:6.0f} MB -> {t_import / 30:.2f} of 30 s, {m_import / 1536:.2f} of 1.5 GB")
        print(f"evaluate --matchers:  {t_eval:6.1f} s ({c_eval:5.1f} s CPU), peak RSS "
              f"{m_eval:6.0f} MB -> {t_eval / 30:.2f} of 30 s, {m_eval / 1536:.2f} of 1.5 GB")
        print(f"evaluate (the model): {t_model:6.1f} s ({c_model:5.1f} s CPU), peak RSS "
              f"{m_model:6.0f} MB; --matchers takes {c_eval / c_model:.1f}x its CPU for "
              f"{N_MATCHERS + 1} raters")


if __name__ == "__main__":
    t = time.perf_counter()
    main()
    print(f"(whole benchmark {time.perf_counter() - t:.0f} s)")
