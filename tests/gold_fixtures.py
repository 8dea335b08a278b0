"""The tiny link project the export tests share, and their golden-file check.

Golden files live in tests/golden/; after a deliberate change of an export, rewrite them with
``DOCKET_UPDATE_GOLDEN=1 pytest tests/test_gold_export.py tests/test_lm_and_split.py`` and
review the diff.
"""

from __future__ import annotations

import os
import re
from collections.abc import Iterator
from pathlib import Path

import pandas as pd
import pytest

from docket.core import NewProject, Project
from docket.core.reviewing.team import add_reviewer

GOLDEN = Path(__file__).resolve().parent / "golden"
UPDATE = os.environ.get("DOCKET_UPDATE_GOLDEN") == "1"

# Same ids on both sides on purpose: link-mode clusters must keep left 1 and right 1 apart.
LEFT = ("id,name,town,note\n1,Anna Berg,Oslo,first\n2,Anna Berg,Oslo,\n3,Jon Dahl,Bergen,"
        "\"two\nlines; here\"\n4,Kari Lund,Tromsø,\n5,Per Moe,Bodø,\n")
RIGHT = ("id,name,town,note\n1,Anna Berg,Oslo,\n2,Anne Berg,Oslo,x\n3,Jon Dal,Bergen,\n"
         "4,Kari Lund,Tromso,\n5,Pål Moe,,\n")
PAIRS = [("1", "1"), ("2", "1"), ("2", "2"), ("1", "2"), ("3", "3"), ("4", "4"), ("5", "5"),
         ("3", "4")]


@pytest.fixture(scope="module")
def tiny_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A small link project with fixed labels of every kind of gold (and some that are not)."""
    folder = tmp_path_factory.mktemp("gold")
    (folder / "left.csv").write_text(LEFT, encoding="utf-8")
    (folder / "right.csv").write_text(RIGHT, encoding="utf-8")
    (folder / "pairs.csv").write_text("left_id,right_id\n" + "".join(
        f"{a},{b}\n" for a, b in PAIRS), encoding="utf-8")
    path = folder / "tiny.docket"
    Project.create(NewProject(path=path, left=folder / "left.csv", right=folder / "right.csv",
                              id_column="id", pairs_file=folder / "pairs.csv", audit=4,
                              kinds={"name": "name", "town": "name", "note": "skip"},
                              name="tiny", seed=0))
    with Project.open(path) as project:
        pid = pair_ids(project)
        for (a, b), reviewer, label in [
            (("1", "1"), "maya", "match"), (("1", "1"), "ola", "match"),  # unanimous
            (("2", "1"), "maya", "match"), (("2", "2"), "maya", "match"),  # single
            (("1", "2"), "maya", "non-match"),  # single, but a chain of matches joins 1 and 2
            (("3", "3"), "maya", "match"), (("3", "3"), "ola", "non-match"),  # disagreement
            (("4", "4"), "maya", "hold"),  # never gold
            (("5", "5"), "maya", "non-match"),
        ]:
            note = "surname misspelt; same town" if (a, b, reviewer) == ("3", "3", "maya") else ""
            project.decide(pid[(a, b)], reviewer, label, note)
        add_reviewer(project, "ada", "adjudicator", granted_by="lead")
        project.decide(pid[("3", "3")], "ada", "match", "one letter dropped from the surname",
                       role="adjudicator")
    return path


@pytest.fixture
def tiny(tiny_file: Path, tmp_path: Path) -> Iterator[Project]:
    copy = tmp_path / "tiny.docket"
    copy.write_bytes(tiny_file.read_bytes())
    project = Project.open(copy)
    yield project
    project.close()


def pair_ids(project: Project) -> dict[tuple[str, str], int]:
    return {(a, b): p for p, a, b in
            project.connection.execute("SELECT pair_id, left_id, right_id FROM pairs")}


def plain(frame: pd.DataFrame) -> list[list[object]]:
    """Rows as plain Python values, every missing value None (pandas reads back NaN or NA)."""
    return [[None if pd.isna(v) else v.item() if hasattr(v, "item") else v for v in row]
            for row in frame.astype(object).itertuples(index=False)]


TIMESTAMP = re.compile(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(\.\d+)?(\+00:00|Z)?")


def check_golden(name: str, text: str) -> None:
    text = TIMESTAMP.sub("<time>", text)  # decision times differ per run; the rest must not
    path = GOLDEN / name
    if UPDATE:
        GOLDEN.mkdir(exist_ok=True)
        path.write_text(text, encoding="utf-8")
    assert path.exists(), f"golden file {path} missing; run with DOCKET_UPDATE_GOLDEN=1"
    assert text == path.read_text(encoding="utf-8"), f"{name} differs from its golden file"

