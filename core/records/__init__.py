"""Records in: reading tables, choosing and mapping fields, normalising values."""
