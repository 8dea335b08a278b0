"""docket's library: records in, scored candidate pairs, a review queue and a decision log out.

Front ends use :class:`Project` (the facade), the dataclasses in :mod:`docket.core.types`, the
errors in :mod:`docket.core.errors`, and the few helpers named in ``__all__`` below: how to
word odds and factors, the personal-data caution, the parsers of ``--map`` and ``--field``,
counts with their nouns, and the writers of the rows the facade returns. Nothing here imports a
user interface.
"""

from importlib import import_module
from typing import Any

from .errors import DocketError
from .project import Project

# name -> (module under docket.core, name there). Loaded when first asked for, so opening the
# review screen does not import pandas for a helper it never calls.
_ELSEWHERE = {
    "NewProject": ("storage.build", "NewProject"),
    "CAUTION": ("report", "CAUTION"),
    "one_to_one_suggestion": ("report", "one_to_one_suggestion"),
    "one_field_note": ("report", "one_field_note"),
    "em_rounds": ("report", "em_rounds"),
    "flat_note": ("report", "flat_note"),
    "crowded_note": ("report", "crowded_note"),
    "MODEL_NAMES": ("matching.explain", "MODEL_NAMES"),
    "odds_text": ("matching.explain", "odds_text"),
    "factor_text": ("matching.explain", "factor_text"),
    "parse_map": ("records.fields", "parse_map"),
    "parse_kinds": ("records.fields", "parse_kinds"),
    "DEFAULT_THRESHOLDS": ("quality.evaluate", "DEFAULT_THRESHOLDS"),
    "QUEUE_ORDERS": ("ordering.queue_order", "MODES"),
    "FailureGroup": ("matchers.failures", "FailureGroup"),
    "file_trouble": ("storage.file_health", "explain"),
    "output_cut_short": ("storage.file_health", "output_cut_short"),
    "output_format": ("exports.exporting", "output_format"),
    "refuse_folder": ("exports.exporting", "refuse_folder"),
    "atomic_write": ("exports.exporting", "atomic_write"),
    "write_rows": ("exports.export_kinds", "write_rows"),
    "write_scores": ("exports.scores_export", "write_scores"),
    "score_to_parts": ("exports.score_all", "score_to_parts"),
    "many": ("wording", "many"),
    "noun": ("wording", "noun"),
}

__all__ = ["DocketError", "Project", *_ELSEWHERE]


def __getattr__(name: str) -> Any:
    if name not in _ELSEWHERE:
        raise AttributeError(name)
    module, attr = _ELSEWHERE[name]
    value = getattr(import_module(f".{module}", __name__), attr)
    globals()[name] = value
    return value
