"""The project's own promises: CI runs the README's test command as written."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def readme_commands() -> list[str]:
    setup = (ROOT / "README.md").read_text(encoding="utf-8").split("## Set-up", 1)[1]
    setup = setup.split("\n## ", 1)[0]
    return [block.strip() for block in re.findall(r"```sh\n(.*?)```", setup, re.S)]


def test_readme_setup_has_two_commands():
    commands = readme_commands()
    assert len(commands) == 2, commands
    assert "soakwise demo" in commands[0]
    assert "pytest" in commands[1]


def test_ci_runs_the_readme_test_command_exactly():
    ci_lines = [line.strip() for line in (ROOT / ".ci" / "run").read_text().splitlines()]
    assert readme_commands()[1] in ci_lines
