"""summary.json of a run no lumped model applies to: the run, its field's extremes and checks,
and the advisor's answer in words."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

from ..caution import CAUTION
from .atomic import write_text


def write_field_summary_json(results, path: Path, files: list[str]) -> None:
    """Write the summary of ``results`` (:class:`advisor.field_results.FieldResults`)."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        written_by = version("soakwise")
    except PackageNotFoundError:
        written_by = "unknown"
    solution = results.solution
    stats, checks = solution.stats, solution.checks
    data = {
        "soakwise_version": written_by,
        "caution": CAUTION,
        "title": results.title,
        "lumped_model": {"applies": False, "reason": results.reason},
        "final": {
            "time_s": float(solution.times[-1]),
            "mean_degC": float(solution.mean[-1]),
            "minimum_degC": float(solution.minimum[-1]),
            "maximum_degC": float(solution.maximum[-1]),
        },
        "peak_internal_difference_K": float(np.max(solution.internal_difference)),
        "output_times_s": [float(t) for t in solution.output_times],
        "checks": {
            "energy_balance_error": checks.energy_balance_error,
            "temperature_excursion_K": checks.temperature_excursion,
            "warnings": list(checks.warnings),
            "notes": list(checks.notes),
        },
        "solver": {"method": stats.method, "steps": stats.steps, "unknowns": stats.unknowns},
        "files": files,
    }
    write_text(Path(path), json.dumps(data, indent=1, allow_nan=False) + "\n")
