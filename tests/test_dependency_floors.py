"""The declared dependency floors are the versions CI installs, and every package docket
imports is declared (an undeclared import works only while something else pulls it in)."""

from __future__ import annotations

import ast
import re
import sys
import tomllib
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
# import name -> distribution name, where they differ
DISTRIBUTION = {"sklearn": "scikit-learn", "sqlite_utils": "sqlite-utils",
                "textual_plotext": "textual-plotext", "yaml": "pyyaml"}


def _floors(specs: list[str]) -> dict[str, str]:
    floors = {}
    for spec in specs:
        name, _, version = re.split(r"(>=)", spec.split(";")[0].strip(), maxsplit=1)
        floors[re.sub(r"\[.*\]", "", name).strip().lower()] = version.strip()
    return floors


def _project() -> dict:
    return tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))["project"]


def _declared() -> dict[str, str]:
    return _floors(_project()["dependencies"])


def test_ci_installs_exactly_the_declared_floors() -> None:
    pinned = {}
    for line in (REPO / ".ci" / "floors.txt").read_text(encoding="utf-8").splitlines():
        line = line.split("#")[0].strip()
        if line:
            name, version = line.split("==")
            pinned[name.strip().lower()] = version.strip()
    declared = {**_declared(), **_floors(_project()["optional-dependencies"]["dask"])}
    assert set(pinned) == set(declared)
    for name, floor in declared.items():
        # a floor "1.5" is met by the pin "1.5.0"
        assert pinned[name].startswith(floor), (name, floor, pinned[name])


def test_every_imported_package_is_declared() -> None:
    declared = set(_declared())
    optional = {"dask", "distributed"}  # the optional engine, imported only when asked for
    stdlib = set(sys.stdlib_module_names)
    missing = set()
    for folder in ("core", "tui"):
        for path in (REPO / folder).rglob("*.py"):
            for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
                names = []
                if isinstance(node, ast.Import):
                    names = [a.name for a in node.names]
                elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                    names = [node.module]
                for name in names:
                    top = name.split(".")[0]
                    if top in stdlib or top in optional or top in ("docket", "__future__"):
                        continue
                    if DISTRIBUTION.get(top, top).lower() not in declared:
                        missing.add(f"{top} ({path.relative_to(REPO)})")
    assert not missing, f"imported but not declared: {sorted(missing)}"
