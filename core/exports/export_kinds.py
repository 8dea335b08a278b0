"""``docket export --what``: from a kind of export to the rows written, and the writing.

The rows are a data frame, or, for ``--for-lm``, ``LmRows``: JSON-ready records (one per pair)
made a chunk at a time as they are written.
"""

from __future__ import annotations

from typing import Any

from ..errors import DocketError
from ..storage.project_file import ProjectFile

EXPORTS = ("gold", "training", "clusters", "conflicts", "missed")


def export_rows(project: ProjectFile, what: str, *, test_share: float = 0.2, seed: int = 0,
                split_by: str = "record", all_records: bool = False, for_lm: bool = False,
                lm_template: str | None = None) -> Any:
    """The frame (or, with ``for_lm``, the ``LmRows``) of the ``what`` export."""
    from . import gold_export as ge
    if lm_template and not for_lm:
        raise DocketError("--lm-template shapes the --for-lm text: add --for-lm")
    if for_lm:
        from .lm_export import lm_rows
        from .lm_text import LmTemplate
        return lm_rows(project, what, LmTemplate.load(lm_template), test_share, seed, split_by)
    if what == "gold":
        return ge.gold_frame(project)
    if what == "training":
        return ge.training_frame(project, test_share, seed, split_by)
    if what == "clusters":
        return ge.clusters_frame(project, all_records)
    if what == "conflicts":
        return ge.conflicts_frame(project)
    if what == "missed":
        from ..reviewing.missed import frame
        with project.reading() as conn:
            return frame(conn)
    raise DocketError(f"--what {what}: use one of scores, {', '.join(EXPORTS)}")


def write_rows(rows: Any, target: str, fmt: str | None, guard: bool = True) -> int:
    """Write what ``export_rows`` (or ``scores_frame``) returned; the number of rows."""
    from .exporting import output_format, write_frame, write_jsonl_parts
    from .lm_export import LmRows
    if isinstance(rows, LmRows | list):
        kind = fmt or ("jsonl" if target == "-" else output_format(target, None))
        if kind != "jsonl":
            raise DocketError("--for-lm writes JSON lines: give a .jsonl file, or "
                              "--format jsonl")
        return write_jsonl_parts(rows.chunks() if isinstance(rows, LmRows) else [rows], target)
    write_frame(rows, target, fmt, guard)
    return len(rows)
