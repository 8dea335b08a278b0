"""Candidate pairs: blocking rules (given or chosen automatically)."""
