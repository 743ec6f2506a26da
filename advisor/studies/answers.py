"""The scalar answers of one run, the columns a study stores for every case.

Names carry their unit (``_s`` seconds, ``_K`` kelvin, ``_degC``); fractions and Biot numbers
are plain. A time to target is empty (NaN) when the case has no target or the model does not
reach it within the run.
"""

from __future__ import annotations

import math

# column: (SQLite type, description)
ANSWER_COLUMNS: dict[str, tuple[str, str]] = {
    "biot_volume_to_surface": ("REAL", "Biot number on V/A_s"),
    "biot_four_area_over_perimeter": ("REAL", "Biot number on 4A/P"),
    "biot_conduction_distance": ("REAL", "Biot number on the largest conduction distance"),
    "target_degC": ("REAL", "the advisor's target temperature"),
    "time_to_target_classical_s": ("REAL", "classical lumped model's time to target"),
    "time_to_target_corrected_s": ("REAL", "corrected lumped model's time to target"),
    "time_to_target_fitted_s": ("REAL", "fitted exponential's time to target"),
    "time_to_target_mean_s": ("REAL", "field mean's time to target"),
    "time_to_target_slowest_s": ("REAL", "slowest point's time to target"),
    "error_classical_slowest": (
        "REAL",
        "largest classical error vs the slowest point, of |T0-T∞|",
    ),
    "error_classical_mean": ("REAL", "largest classical error vs the field mean, of |T0-T∞|"),
    "error_corrected_slowest": ("REAL", "largest corrected error vs the slowest point"),
    "error_corrected_mean": ("REAL", "largest corrected error vs the field mean"),
    "energy_error": ("REAL", "largest lumped stored-energy error, of a full approach's"),
    "peak_difference_K": ("REAL", "largest internal temperature difference"),
    "peak_difference_time_s": ("REAL", "when it occurs"),
    "slowest_mode_ratio": ("REAL", "slowest mode's decay rate over the lumped rate"),
    "verdict_rating": ("TEXT", "adequate, marginal or inadequate"),
    "verdict_quantity": ("TEXT", "what the verdict is about"),
    "verdict_error": ("REAL", "the verdict's error fraction"),
    "verdict_direction": ("TEXT", "the direction of the lumped estimate's error"),
    "end_time_s": ("REAL", "end of the run"),
    "unknowns": ("INTEGER", "degrees of freedom"),
    "steps": ("INTEGER", "time steps taken"),
    "rejected_steps": ("INTEGER", "steps rejected by the error control"),
    "factorisations": ("INTEGER", "matrix factorisations"),
    "solves": ("INTEGER", "triangular solves"),
    "newton_iterations": ("INTEGER", "Newton iterations"),
    "energy_balance_error": ("REAL", "the run's energy balance check"),
    "check_warnings": ("INTEGER", "warnings of the run's own checks"),
    "solve_seconds": ("REAL", "assembly, factorisation and stepping, s"),
    "run_seconds": ("REAL", "meshing, solve and assessment, s"),
}

_TIMES = {
    "classical": "time_to_target_classical_s",
    "corrected": "time_to_target_corrected_s",
    "fitted exponential": "time_to_target_fitted_s",
    "mean": "time_to_target_mean_s",
    "slowest": "time_to_target_slowest_s",
}


def answers(results) -> dict:
    """The :data:`ANSWER_COLUMNS` of one run's :class:`advisor.pipeline.Results`."""
    a = results.assessment
    solution = a.solution
    stats, checks = solution.stats, solution.checks
    row = {f"biot_{b.name}": float(b.value) for b in a.biot}
    row["target_degC"] = a.target
    for name, column in _TIMES.items():
        row[column] = a.time_to_target.get(name)
    for model in ("classical", "corrected"):
        for quantity in ("slowest", "mean"):
            error = a.errors.get(f"{model} vs {quantity}")
            row[f"error_{model}_{quantity}"] = None if error is None else error.fraction
    row.update(
        energy_error=a.energy_error,
        peak_difference_K=a.peak_internal_difference,
        peak_difference_time_s=a.peak_internal_difference_time,
        slowest_mode_ratio=a.mode.ratio,
        verdict_rating=a.verdict.rating,
        verdict_quantity=a.verdict.quantity,
        verdict_error=a.verdict.error,
        verdict_direction=a.verdict.direction,
        end_time_s=float(solution.times[-1]),
        unknowns=stats.unknowns,
        steps=stats.steps,
        rejected_steps=stats.rejected_steps,
        factorisations=stats.factorisations,
        solves=stats.solves,
        newton_iterations=stats.newton_iterations,
        energy_balance_error=checks.energy_balance_error,
        check_warnings=len(checks.warnings),
        solve_seconds=stats.assembly_seconds
        + stats.factorisation_seconds
        + stats.stepping_seconds,
        run_seconds=results.wall_seconds,
    )
    return {name: _plain(row.get(name)) for name in ANSWER_COLUMNS}


def _plain(value):
    """A value SQLite stores: None for missing or not finite, Python numbers and text."""
    if value is None or isinstance(value, str):
        return value
    if isinstance(value, bool):
        return int(value)
    number = float(value)
    if not math.isfinite(number):
        return None
    return int(value) if float(number).is_integer() and isinstance(value, int) else number
