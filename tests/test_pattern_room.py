"""A table of more compared columns than one 64-bit pattern code can count is refused in one
line, before its pairs are compared, and leaves no project file; the codes wrapped round
unsaid and every pair was weighed with another pattern's levels."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core.errors import DocketError
from docket.core.storage.pattern_room import check_room
from docket.tui.cli import main


def test_room_is_the_product_of_the_level_counts() -> None:
    check_room([f"c{i}" for i in range(24)], [6] * 24, "t.csv")  # 6^24 < 2^63
    with pytest.raises(DocketError, match=r"25 fields .* the first 24 fit \(up to 'c23'\)"):
        check_room([f"c{i}" for i in range(25)], [6] * 25, "t.csv")


def test_a_wide_table_is_refused_and_nothing_is_written(tmp_path: Path, capsys) -> None:
    rng = np.random.default_rng(5)
    frame = pd.DataFrame({f"attr_{j:02d}": [f"v{rng.integers(0, 9)}w" for _ in range(40)]
                          for j in range(40)})
    frame.insert(0, "id", [f"r{i}" for i in range(40)])
    frame["town"] = [f"Orvale{i % 4}" for i in range(40)]
    frame.to_csv(tmp_path / "wide.csv", index=False)
    project = tmp_path / "w.docket"
    assert main(["new", str(project), "--left", str(tmp_path / "wide.csv"), "--id", "id",
                 "--block", "town"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "41 fields to compare give more level patterns" in err[0]
    assert "--field COL:skip" in err[0]
    assert not project.exists() and not list(tmp_path.glob(".w.docket*"))
