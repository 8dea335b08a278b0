"""Screens: review (the main one) and the modal help, find and note screens."""

from .find import PairPicker
from .help import HelpScreen
from .note import NoteScreen
from .review import ReviewScreen

__all__ = ["HelpScreen", "NoteScreen", "PairPicker", "ReviewScreen"]
