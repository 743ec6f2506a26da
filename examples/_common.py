"""What every example script does with a case file: load it, run it, write its results."""

from __future__ import annotations

from pathlib import Path

from advisor.casefile import load_case
from advisor.pipeline import run_case, write_results


def run_case_file(name: str, out: Path | None = None, overrides: dict | None = None):
    """Run ``examples/<name>.toml`` (with ``overrides``, e.g. a coarser mesh) and return the
    assessment; write the results folder to ``out`` when given."""
    results = run_case(load_case(Path(__file__).with_name(f"{name}.toml"), overrides))
    if out is not None:
        write_results(results, out, force=True)
    return results.assessment
