"""Honest figures: the audit sample, quality estimates and their intervals, evaluation."""
