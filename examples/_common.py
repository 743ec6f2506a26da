"""What every example script does with a case file: load, solve, assess, write."""

from __future__ import annotations

from pathlib import Path

from advisor import assess, write_results
from advisor.casefile.case import load_case
from fem import solve


def run_case_file(name: str, out: Path | None = None, overrides: dict | None = None):
    """Run ``examples/<name>.toml`` (with ``overrides``, e.g. a coarser mesh) and return the
    assessment; write the results folder to ``out`` when given."""
    case = load_case(Path(__file__).with_name(f"{name}.toml"), overrides)
    solution = solve(case.model(), case.end_time, **case.run_options)
    assessment = assess(solution, **case.advisor_options)
    if out is not None:
        write_results(assessment, out, force=True)
    return assessment
