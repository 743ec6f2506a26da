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


def test_readme_case_example_is_a_valid_case(tmp_path):
    from advisor.casefile.case import load_case

    text = (ROOT / "README.md").read_text(encoding="utf-8")
    example = text.split("A complete annotated example", 1)[1].split("```toml\n", 1)[1]
    case_file = tmp_path / "example.toml"
    case_file.write_text(example.split("```", 1)[0], encoding="utf-8")
    case = load_case(case_file)
    assert case.title == "Bored steel block, furnace then oil"
    assert set(case.boundaries) == {"outside", "corners", "bore", "symmetry", "clamped"}
    assert case.run_options["stop"].quantity == "core"
