"""The README's commands run as written from a clean clone: every one parses, and every file
it reads ships with the repository (or is made by a command before it)."""

from __future__ import annotations

import itertools
import re
import shlex
from pathlib import Path

import pytest

from docket.tui.cli import build_parser
from docket.tui.cli_checks import parse

ROOT = Path(__file__).resolve().parents[1]
READS = ("--left", "--right", "--from", "--pairs", "--predictions", "--lm-template")


def docket_lines() -> list[str]:
    """Each ``docket ...`` command of the README's sh blocks, continuation lines joined."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    out = []
    for block in re.findall(r"```sh\n(.*?)```", text, flags=re.S):
        for line in block.replace("\\\n", " ").splitlines():
            line = line.split(" # ")[0].strip()
            for part in line.split("&&"):
                if part.strip().startswith("docket "):
                    out.append(part.strip())
    return out


def test_the_quickstart_is_there() -> None:
    lines = docket_lines()
    assert any(x.startswith("docket new vets.docket") for x in lines)
    assert any(x.startswith("docket label vets.docket") for x in lines)


@pytest.mark.parametrize("line", docket_lines())
def test_each_readme_command_parses_and_its_inputs_exist(line: str) -> None:
    words = shlex.split(line)[1:]
    parse(build_parser(), words)  # a renamed option or command fails here (exit 2)
    for option, value in itertools.pairwise(words):
        if option in READS:
            assert (ROOT / value).is_file(), f"{line}: {value} is not in the repository"
