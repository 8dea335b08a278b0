"""Files out: scores, gold labels, training sets and clusters."""
