"""Widgets of the review screen: the pair card, the evidence panel and the status line."""

from .evidence import EvidencePanel, YourSide
from .pair_card import CardOptions, PairCardView
from .status_line import Pace, StatusLine

__all__ = ["CardOptions", "EvidencePanel", "Pace", "PairCardView", "StatusLine", "YourSide"]
