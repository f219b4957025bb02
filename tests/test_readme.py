"""The README's quickstart runs as printed, and its commands are the ones CI runs."""

from __future__ import annotations

import doctest
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
README = ROOT / "README.md"


def test_quickstart_runs_as_printed():
    result = doctest.testfile(
        str(README),
        module_relative=False,
        optionflags=doctest.NORMALIZE_WHITESPACE | doctest.ELLIPSIS,
        verbose=False,
    )
    assert result.attempted >= 10, "the quickstart lost its examples"
    assert result.failed == 0


def test_ci_runs_the_test_command_readme_gives():
    commands = re.findall(r"```bash\n(.*?)```", README.read_text(), flags=re.S)
    test_lines = [line for block in commands for line in block.splitlines() if "pytest" in line]
    assert test_lines, "README names no test command"
    pytest_call = test_lines[0].split("&&")[-1].strip()
    assert pytest_call in (ROOT / ".ci" / "run").read_text()


def test_readme_carries_the_caution():
    text = " ".join(README.read_text().lower().replace(">", " ").split())
    assert "preliminary analysis" in text and "not for flight operations" in text
