"""An export never replaces a table the project was built from.

'docket export vets.docket --what scores -o practice_north.csv' (a slip of tab completion)
wrote the scores over the left table's records, and the export replaces any file unasked. The
project keeps its tables' file names, not their folders: a file of that name whose header
holds that table's id column is taken for the table itself.
"""

from __future__ import annotations

import os
import re
from pathlib import Path
from typing import Any

from ..errors import DocketError

_SEPARATORS = re.compile(r"[,;\t|]")


def _columns(path: Path) -> list[str]:
    if path.suffix.lower() in (".parquet", ".pq"):
        import pyarrow.parquet as pq
        return list(pq.read_schema(path).names)
    with path.open("rb") as f:
        head = f.read(1 << 16).decode("utf-8", errors="replace").lstrip("\ufeff")
    line = head.splitlines()[0] if head else ""
    if line.lstrip()[:1] in ("{", "["):  # JSON: the keys on its first line
        return re.findall(r'"((?:[^"\\]|\\.)*)"\s*:', line)
    return [c.strip().strip('"').strip() for c in _SEPARATORS.split(line)]


def refuse_over_sources(meta: dict[str, Any], target: str) -> None:
    """Refuse ``target`` when it is (by name and header) a table this project was built from."""
    path = Path(target)
    if target == "-" or not path.is_file():
        return
    # the export replaces the file a link names (atomic_write): '-o latest.csv', a link to
    # the left table, wrote the scores over its records
    names = {path.name, Path(os.path.realpath(path)).name}
    for side in ("left", "right"):
        name, id_column = meta.get(f"{side}_file"), meta.get(f"{side}_id_column")
        if not name or name not in names:
            continue
        try:
            holds_id = id_column in _columns(path)
        except (OSError, ValueError):
            continue  # unreadable: not a table this project read
        if holds_id:
            raise DocketError(f"{target}: is the {side} table this project was built from "
                              f"(its id column {id_column} is there), which an export never "
                              "replaces; write the export to another file")
