"""docket's library: records in, scored candidate pairs, a review queue and a decision log out.

Front ends use :class:`Project` and the dataclasses in :mod:`docket.core.types`; nothing here
imports a user interface.
"""

from .build import NewProject
from .errors import DocketError
from .project import Project

__all__ = ["DocketError", "NewProject", "Project"]
