"""histories.csv: every per-step history of a run beside the lumped models, one row a step.

The header names each column with its unit in square brackets (``mean [degC]``,
``heat flow quenched [W/m]``); planar sections are per metre of depth, so their heat flows
and energies are in W/m and J/m, axisymmetric ones (whole solid of revolution, locations as
r and z) in W and J. Numbers are written in full
precision (Python's shortest round-trip form) so a reader gets back exactly what was computed.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np

from ..analysis.assessment import Assessment
from .atomic import write_text
from .report_words import quantity_words


def history_columns(assessment: Assessment) -> dict[str, np.ndarray]:
    """The columns of histories.csv, header → values at ``solution.times``, in file order."""
    solution = assessment.solution
    axisymmetric = solution.model.section.axisymmetric
    per_depth = "" if axisymmetric else "/m"
    watts, joules = f"W{per_depth}", f"J{per_depth}"
    first, second = ("r", "z") if axisymmetric else ("x", "y")
    columns: dict[str, np.ndarray] = {
        "time [s]": solution.times,
        "mean [degC]": solution.mean,
        "minimum [degC]": solution.minimum,
        "maximum [degC]": solution.maximum,
        "internal difference [K]": solution.internal_difference,
        f"minimum {first} [m]": solution.minimum_location[:, 0],
        f"minimum {second} [m]": solution.minimum_location[:, 1],
        f"maximum {first} [m]": solution.maximum_location[:, 0],
        f"maximum {second} [m]": solution.maximum_location[:, 1],
    }
    for name, history in solution.probes.items():
        columns[f"probe {name} [degC]"] = history
    for name, history in assessment.model_temperatures.items():
        columns[f"lumped {name} [degC]"] = history
    if assessment.quench is not None:
        words = "cooling rate" if assessment.quench.cooling else "heating rate"
        for name, curve in assessment.quench.curves.items():
            columns[f"{words} {quantity_words(name)} [K/s]"] = curve.rates
    for name, history in solution.heat_flow.items():
        columns[f"heat flow {name} [{watts}]"] = history
    columns[f"generated heat [{watts}]"] = solution.generated
    columns[f"stored energy [{joules}]"] = solution.stored_energy
    columns[f"absorbed heat [{joules}]"] = solution.absorbed_heat
    return columns


def write_histories_csv(assessment: Assessment, path: Path) -> None:
    """Write :func:`history_columns` to ``path`` (UTF-8, comma-separated) atomically."""
    columns = history_columns(assessment)
    rows = np.column_stack([np.asarray(v, dtype=float) for v in columns.values()]).tolist()
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(columns)
    writer.writerows([[repr(x) for x in row] for row in rows])
    write_text(Path(path), buffer.getvalue())
