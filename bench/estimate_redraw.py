"""Coverage of evaluate's intervals for the label-free model, many audit slices per scenario.

bench/estimate_bias.py builds a project per seed, so it affords a dozen seeds; this one builds
each scenario once (the tables of seed 0) and redraws its audit slice many times with
``core.queue.draw_audit``, every drawn pair labelled from the truth, as
tests/coverage_support.py does for DBLP-ACM's matchers. An interval covers when it holds the
label-free model's figure over all candidate pairs. Slices: the default size, 200 and 50.
No timing is asserted.

    python bench/estimate_redraw.py [runs, default 200] [scenario ...]
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

import numpy as np
from _common import REPO
from estimate_bias import MEASURES, SCENARIOS, THRESHOLDS, _pairs

from docket.core import NewProject, Project
from tests.coverage_support import SETTINGS, Population, one_run


def population(name: str, tmp: Path) -> Population:
    folder = tmp / name
    folder.mkdir()
    spec, truth = SCENARIOS[name](folder, 0)
    Project.create(NewProject(path=folder / "p.docket", seed=0, **spec))
    with Project.open(folder / "p.docket") as project:
        f = _pairs(project, truth)
    score = f.probability.to_numpy()
    return Population(f.y.to_numpy(), score, {"model": score}, f.pair_id.to_numpy())


def main() -> None:
    args = sys.argv[1:]
    runs = int(args[0]) if args and args[0].isdigit() else 200
    names = [a for a in args if not a.isdigit()] or list(SCENARIOS)
    with tempfile.TemporaryDirectory() as tmp:
        for name in names:
            pop = population(name, Path(tmp))
            print(f"\n{name}: {pop.truth.size:,} candidate pairs, {int(pop.truth.sum()):,} "
                  f"true matches; {runs} slices each; coverage (median width)", flush=True)
            for size in (None, 200, 50):
                got: dict = {}
                for seed in range(runs):
                    for key, v in one_run(pop, SETTINGS[0], seed, THRESHOLDS, size).items():
                        got.setdefault(key, []).append(v)
                for t in THRESHOLDS:
                    row = "  ".join(
                        f"{m} {np.mean([ok for ok, _ in got[('model', t, m)]]):.3f} "
                        f"({np.nanmedian([w for _, w in got[('model', t, m)]]):.3f})"
                        for m in MEASURES)
                    print(f"  {'default' if size is None else size:<8} at {t:<4} {row}",
                          flush=True)


if __name__ == "__main__":
    sys.path.insert(0, str(REPO))
    main()
