"""A study's table: one row per case, read from its store, exported as CSV and Parquet, or
handed to pandas.

Columns, in order:

- ``case``: the case's place in the study (from 0);
- ``status``: ``done`` or ``failed``; ``error``: why a case failed (empty when done);
- ``wall_seconds``: the worker's time on the case (loading, meshing, solving, assessing), s;
- one column per varied key, named by its key path (``section.mesh_size``,
  ``boundaries.quenched.convection.coefficient``): the value as the solver sees it, in SI
  units with temperatures in °C (a length in m, a coefficient in W/(m²·K)); a value that is
  not a quantity (a name) as written;
- the answers, as in :data:`advisor.studies.answers.ANSWER_COLUMNS`: ``biot_volume_to_surface``,
  ``biot_four_area_over_perimeter``, ``biot_conduction_distance``, ``target_degC``,
  ``time_to_target_classical_s``, ``time_to_target_corrected_s``,
  ``time_to_target_fitted_s``, ``time_to_target_mean_s``, ``time_to_target_slowest_s``,
  ``error_classical_slowest``, ``error_classical_mean``, ``error_corrected_slowest``,
  ``error_corrected_mean`` (fractions of the initial difference |T0 − T∞|), ``energy_error``,
  ``peak_difference_K``, ``peak_difference_time_s``, ``slowest_mode_ratio``,
  ``verdict_rating``, ``verdict_quantity``, ``verdict_error``, ``verdict_direction``,
  ``end_time_s``, ``unknowns``, ``steps``, ``rejected_steps``, ``factorisations``, ``solves``,
  ``newton_iterations``, ``energy_balance_error``, ``check_warnings``, ``solve_seconds``,
  ``run_seconds``. Empty (NaN) where a case failed or an answer does not exist.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

from ..errors import AdvisorError
from .store import FILE_NAME, StudyStore
from .values import si_value

CSV_NAME, PARQUET_NAME = "study.csv", "study.parquet"
FIRST = ("case", "status", "error", "wall_seconds")


def study_rows(store: StudyStore) -> tuple[list[str], list[dict]]:
    """The study's table with the standard library: (column names, one dict per case)."""
    columns, rows = store.rows()
    keys: list[str] = []
    table = []
    for row in rows:
        record = dict(zip(columns, row, strict=True))
        overrides = json.loads(record.pop("overrides"))
        for key in overrides:
            if key not in keys:
                keys.append(key)
        table.append({**{k: record[k] for k in FIRST}, **_si(overrides), **record})
    answers = [c for c in columns if c not in FIRST and c != "overrides"]
    return [*FIRST, *keys, *answers], table


def _si(overrides: dict) -> dict:
    return {key: si_value(value) for key, value in overrides.items()}


def write_csv(store: StudyStore, path: Path) -> Path:
    """Write the study's table to ``path`` (atomically); empty cells where there is no value."""
    from ..writers.atomic import write_text

    columns, table = study_rows(store)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=columns, lineterminator="\n")
    writer.writeheader()
    writer.writerows(table)
    write_text(Path(path), buffer.getvalue())
    return Path(path)


def to_dataframe(store: StudyStore):
    """The study's table as a pandas DataFrame (pandas is imported here, on first use)."""
    try:
        import pandas as pd
    except ImportError:
        raise AdvisorError(
            "a study's table as a DataFrame needs pandas: pip install 'soakwise[studies]'"
        ) from None
    columns, table = study_rows(store)
    frame = pd.DataFrame.from_records(table, columns=columns)
    return frame.fillna({"error": ""}) if "error" in frame else frame


def write_parquet(store: StudyStore, path: Path) -> Path | None:
    """Write the table as Parquet when pandas and pyarrow are installed; else None."""
    try:
        import pandas  # noqa: F401
        import pyarrow  # noqa: F401
    except ImportError:
        return None
    frame = to_dataframe(store)
    temporary = Path(path).with_name(Path(path).name + ".partial")
    frame.to_parquet(temporary, index=False)
    temporary.replace(path)
    return Path(path)


def read_study(folder: str | Path):
    """The table of the study in ``folder`` (its ``study.sqlite``) as a pandas DataFrame.

    One row per stored case, columns as in the module's description; the study may still be
    running (every finished case is there).

    Examples
    --------
    >>> import tempfile
    >>> folder = Path(tempfile.mkdtemp())
    >>> StudyStore(folder / "study.sqlite").close()
    >>> list(read_study(folder).columns[:4])
    ['case', 'status', 'error', 'wall_seconds']
    """
    path = Path(folder) / FILE_NAME
    if not path.is_file():
        raise AdvisorError(f"{folder}: no study here ({FILE_NAME} is missing)")
    with StudyStore(path) as store:
        return to_dataframe(store)
