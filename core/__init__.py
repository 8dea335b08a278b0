"""docket's library: records in, scored candidate pairs, a review queue and a decision log out.

Front ends use :class:`Project` and the dataclasses in :mod:`docket.core.types`; nothing here
imports a user interface.
"""

from typing import Any

from .errors import DocketError
from .project import Project

__all__ = ["DocketError", "NewProject", "Project"]


def __getattr__(name: str) -> Any:
    # NewProject lives with the build code, which needs pandas: load it only when asked for.
    if name == "NewProject":
        from .storage.build import NewProject
        return NewProject
    raise AttributeError(name)
