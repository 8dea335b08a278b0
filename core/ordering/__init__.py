"""The review queue's arithmetic: priority, the audit slice and overlap."""
