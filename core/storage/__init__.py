"""The project file: schema, building and writing it, the decision log, refits, and the
open file that the facade extends."""
