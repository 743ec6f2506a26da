"""The fit's results folder: fit.json, residuals.csv, fitted.toml (and fitted-case.toml), the
plots and fit.html, written whole under a temporary name and renamed, with the marker that lets
``--force`` replace it later (the rules of :mod:`advisor.results_folder`)."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np

from ..caution import CAUTION
from ..folder_room import check_can_write
from ..results_folder import MARKER, PLOT_FOLDER, _write_marker, check_results_folder, staged_write
from .atomic import write_text
from .report_document import Picture
from .version import soakwise_version


def fit_summary(outcome, files: list[str]) -> dict:
    """Everything fit.json holds: values, errors, bands, correlations, residuals against the
    stated uncertainty, the lumped comparison and the verdict."""
    result = outcome.result
    return {
        "written_by": f"soakwise {soakwise_version('(version unknown)')}",
        "title": outcome.title,
        "measured_file": outcome.measured.path.name,
        "probes": {p: outcome.measured.columns[p] for p in outcome.measured.probes},
        "parameters": [
            {
                "name": name,
                "unit": unit,
                "value": float(value),
                "standard_error": float(error),
                "interval_95": [float(low), float(high)],
            }
            for name, unit, value, error, (low, high) in zip(
                result.names,
                result.units,
                result.values,
                result.standard_errors,
                result.band,
                strict=True,
            )
        ],
        "correlation": np.round(result.correlation, 6).tolist(),
        "rms_residual_K": result.rms_residual,
        "uncertainty_K": result.uncertainty,
        "scatter_K": result.scatter,
        "degrees_of_freedom": result.degrees_of_freedom,
        "regularisation": {"rule": result.regularisation_rule, "lambda_K2": result.regularisation},
        "condition_number": result.condition_number,
        "sensitivity_K_per_10_percent": [float(s) for s in result.sensitivities],
        "verdict": {"rating": result.verdict.rating, "reasons": list(result.verdict.reasons)},
        "lumped": [
            {
                "probe": r.probe,
                "time_constant_s": r.time_constant,
                "coefficient_W_per_m2_K": r.coefficient,
                "field_coefficient_W_per_m2_K": r.field_coefficient,
                "bias": r.bias,
                "biot": r.biot,
                "rms_residual_K": r.rms_residual,
                "sentence": r.sentence(),
            }
            for r in outcome.lumped
        ],
        "cost": {"transient_solves": result.trials, "fit_seconds": result.seconds},
        "files": files,
        "caution": CAUTION,
    }


def write_residuals_csv(outcome, path: Path) -> None:
    """time, then per thermocouple: measured, fitted, fitted − measured and the band's
    half-width (K)."""
    measured, result = outcome.measured, outcome.result
    header = ["time [s]"]
    for name in measured.probes:
        header += [
            f"{name} measured [degC]",
            f"{name} fitted [degC]",
            f"{name} residual [K]",
            f"{name} band [K]",
        ]
    rows = []
    readings = measured.stacked()
    for i, t in enumerate(measured.times):
        row = [f"{t:.10g}"]
        for j in range(len(measured.probes)):
            row += [
                f"{readings[i, j]:.10g}",
                f"{result.predicted[i, j]:.10g}",
                f"{result.residuals[i, j]:.6g}",
                f"{result.predicted_band[i, j]:.6g}",
            ]
        rows.append(row)

    def writer(temporary: Path) -> None:
        with temporary.open("w", newline="", encoding="utf-8") as handle:
            table = csv.writer(handle)
            table.writerow(header)
            table.writerows(rows)

    from .atomic import write_with

    write_with(Path(path), writer)


def write_fit_folder(outcome, folder: Path, *, force: bool = False) -> list[Path]:
    """Write the fit's results folder; return its files relative to ``folder``.

    Raises
    ------
    ResultsFolderExistsError
        If ``folder`` exists and may not be replaced; nothing is written.
    CannotWriteError
        If the folder cannot be written (no permission, no room); nothing is written.
    """
    folder = Path(folder)
    check_results_folder(folder, force=force)
    check_can_write(folder)
    return staged_write(folder, force, lambda staging: _write_files(outcome, staging))


def _write_files(outcome, staging: Path) -> list[Path]:
    from .fit_plots import FIT_PLOTS, write_fit_plots
    from .fit_report import write_fit_report

    plots = [p.relative_to(staging) for p in write_fit_plots(outcome, staging / PLOT_FOLDER)]
    write_residuals_csv(outcome, staging / "residuals.csv")
    write_text(staging / "fitted.toml", outcome.fragment)
    files = [Path("fit.json"), Path("fit.html"), Path("residuals.csv"), Path("fitted.toml")]
    if outcome.fitted_case:
        write_text(staging / "fitted-case.toml", outcome.fitted_case)
        files.append(Path("fitted-case.toml"))
    files += plots + [Path(MARKER)]
    names = [f.as_posix() for f in files]
    pictures = [Picture(p.as_posix(), *FIT_PLOTS[p.stem]) for p in plots if p.stem in FIT_PLOTS]
    write_fit_report(outcome, staging / "fit.html", pictures, names)
    text = json.dumps(fit_summary(outcome, names), indent=1, ensure_ascii=False)
    write_text(staging / "fit.json", text + "\n")
    _write_marker(staging / MARKER, names)
    return files
