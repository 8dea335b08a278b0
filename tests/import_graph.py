"""The import graph of an installed package, read from its source (imports inside functions and
under TYPE_CHECKING included): for the tests that keep the layers pointing one way."""

from __future__ import annotations

import ast
from pathlib import Path


def modules(package: str, folder: Path) -> dict[str, Path]:
    """Every module of the package under ``folder``, by dotted name."""
    found = {}
    for path in sorted(folder.rglob("*.py")):
        parts = list(path.relative_to(folder).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts.pop()
        found[".".join([package, *parts])] = path
    return found


def imports(module: str, path: Path, known: dict[str, Path]) -> list[tuple[int, str]]:
    """(line, imported module) for every import in the file."""
    package = module if path.name == "__init__.py" else module.rpartition(".")[0]
    found = []
    for node in ast.walk(ast.parse(path.read_text(), str(path))):
        if isinstance(node, ast.Import):
            found += [(node.lineno, a.name) for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")
                anchor = anchor[:len(anchor) - node.level + 1]
                base = ".".join(anchor + ([base] if base else []))
            for alias in node.names:
                sub = f"{base}.{alias.name}"
                found.append((node.lineno, sub if sub in known else base))
    return found


def first_cycle(known: dict[str, Path]) -> list[str] | None:
    """One import cycle among ``known`` modules, or None."""
    graph = {m: sorted({t for _, t in imports(m, p, known) if t in known and t != m})
             for m, p in known.items()}
    state: dict[str, int] = {}

    def visit(m: str, trail: list[str]) -> list[str] | None:
        state[m] = 1
        for t in graph[m]:
            if state.get(t) == 1:
                return [*trail, m, t]
            if t not in state and (found := visit(t, [*trail, m])):
                return found
        state[m] = 2
        return None

    for m in sorted(graph):
        if m not in state and (found := visit(m, [])):
            return found
    return None
