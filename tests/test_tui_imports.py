"""The front end's modules import one way: apps over screens over widgets, commands over one
shared base; and the front end reaches the project only through the facade."""

import re
from pathlib import Path

import docket.tui

from .import_graph import first_cycle, imports, modules

TUI = Path(docket.tui.__file__).parent
MODULES = modules("docket.tui", TUI)
APPS = ("docket.tui.review_app", "docket.tui.team_app")


def test_every_tui_module_is_seen() -> None:
    assert "docket.tui.screens.review" in MODULES and "docket.tui.cli_base" in MODULES


def test_tui_has_no_import_cycle() -> None:
    cycle = first_cycle(MODULES)
    assert cycle is None, "import cycle: " + " -> ".join(cycle or [])


def test_screens_and_widgets_never_import_an_app_or_a_command() -> None:
    bad = [f"{m} imports {t}" for m, p in MODULES.items()
           if m.startswith(("docket.tui.screens", "docket.tui.widgets"))
           for _, t in imports(m, p, MODULES)
           if t in APPS or t.startswith("docket.tui.cli")]
    assert not bad, "\n".join(bad)


def test_command_modules_share_only_the_base() -> None:
    # cli.py gathers the command modules; they import the base, never cli.py itself (only the
    # entry point above it, launch.py, loads cli.py)
    bad = [f"{m} imports {t}" for m, p in MODULES.items()
           if m not in ("docket.tui.cli", "docket.tui.launch")
           for _, t in imports(m, p, MODULES) if t == "docket.tui.cli"]
    assert not bad, "\n".join(bad)


def test_no_connection_or_sql_in_the_front_end() -> None:
    sql = re.compile(r"\.connection\b|\.execute\(|\.reading\(|\.transaction\(|\bSELECT\b"
                     r"|\bINSERT\b|\bUPDATE\b")
    bad = [f"{p.relative_to(TUI)}:{n}: {line.strip()}" for p in MODULES.values()
           for n, line in enumerate(p.read_text().splitlines(), 1) if sql.search(line)]
    assert not bad, "\n".join(bad)


# Project, the plain data it returns (types, results), its errors, and the helpers docket.core names
FACADE = {"docket.core", "docket.core.project", "docket.core.types", "docket.core.results",
          "docket.core.errors"}


def test_front_end_reaches_the_core_only_through_the_facade() -> None:
    bad = [f"{m}:{line} imports {t}" for m, p in MODULES.items()
           for line, t in imports(m, p, MODULES)
           if t.startswith("docket.core") and t not in FACADE]
    assert not bad, "\n".join(bad)


def test_the_facade_names_what_it_lends() -> None:
    # every helper docket.core lends is importable from it, so the rule above costs nothing
    import docket.core
    missing = [n for n in docket.core.__all__ if getattr(docket.core, n, None) is None]
    assert not missing, missing
