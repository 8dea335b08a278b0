"""Widgets of the review screen: the pair card, the evidence panel and the status line."""

from .evidence import EvidencePanel, YourSide
from .key_bar import KeyBar
from .pair_card import CardOptions, PairCardView
from .status_line import Pace, StatusLine

__all__ = ["CardOptions", "EvidencePanel", "KeyBar", "Pace", "PairCardView", "StatusLine",
           "YourSide"]
