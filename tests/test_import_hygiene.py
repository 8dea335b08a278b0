"""The core is a library whose imports point one way: down the floors of DEVELOPERS.md.

Floors, lowest first. A module may import its own floor and the floors below it; within a floor
the module graph has no cycle. Nothing in the core imports a user interface.
"""

import pkgutil
import subprocess
import sys
from pathlib import Path

import docket.core

from .import_graph import first_cycle, imports, modules

FLOORS = [
    {"errors", "types", "results", "wording", "intervals"},  # plain data and arithmetic
    {"records"},
    {"pairs"},
    {"matching"},
    {"ordering"},
    {"storage"},
    {"reviewing"},
    {"quality"},
    {"matchers"},
    {"exports"},
    # the facade and its verbs ("" is docket.core itself)
    {"project", "team_verbs", "report_verbs", "matcher_verbs", "queue_verbs", "report", ""},
]
UI = ("textual", "rich")
CORE = Path(docket.core.__file__).parent


MODULES = modules("docket.core", CORE)


def _floor(module: str) -> int:
    part = module.removeprefix("docket.core").lstrip(".").split(".")[0]
    for rank, names in enumerate(FLOORS):
        if part in names:
            return rank
    raise AssertionError(f"{module} sits on no floor; add its sub-package to FLOORS and "
                         "DEVELOPERS.md")


def _imports(module: str, path: Path) -> list[tuple[int, str]]:
    return imports(module, path, MODULES)


def test_every_core_module_is_seen() -> None:
    # the walk below must cover the sub-packages, not only the top level
    assert "docket.core.storage.store" in MODULES
    assert len(MODULES) > 40


def test_core_imports_no_user_interface() -> None:
    bad = [f"{MODULES[m].relative_to(CORE)}:{line} imports {target}"
           for m in MODULES for line, target in _imports(m, MODULES[m])
           if target.split(".")[0] in UI or target.startswith("docket.tui")]
    assert not bad, "\n".join(bad)


def test_core_imports_point_down() -> None:
    bad = []
    for m, path in MODULES.items():
        for line, target in _imports(m, path):
            if target.startswith("docket.core") and _floor(target) > _floor(m):
                bad.append(f"{path.relative_to(CORE)}:{line} imports {target}, a higher floor")
    assert not bad, "\n".join(bad)


def test_core_module_graph_has_no_cycle() -> None:
    cycle = first_cycle(MODULES)
    assert cycle is None, "import cycle: " + " -> ".join(cycle or [])


def test_importing_every_core_module_loads_no_user_interface() -> None:
    # a fresh interpreter, so modules the test run itself imported do not hide a leak
    code = ("import sys, importlib, pkgutil, docket.core as c\n"
            "for info in pkgutil.walk_packages(c.__path__, 'docket.core.'):\n"
            "    importlib.import_module(info.name)\n"
            "bad = [m for m in sys.modules if m.split('.')[0] in ('textual', 'rich') "
            "or m.startswith('docket.tui')]\n"
            "print(len([m for m in sys.modules if m.startswith('docket.core')]), bad)\n"
            "sys.exit(1 if bad else 0)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert done.returncode == 0, done.stdout + done.stderr
    assert int(done.stdout.split()[0]) == len(MODULES), done.stdout


def test_walk_finds_every_module() -> None:
    walked = {i.name for i in pkgutil.walk_packages(docket.core.__path__, "docket.core.")}
    assert walked | {"docket.core"} == set(MODULES)
