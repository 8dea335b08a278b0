"""How alike two records are: comparators, the Fellegi–Sunter model, the ranker, the
scorer and the decision rule."""
