"""Measured temperature curves: a CSV or whitespace table of time and thermocouple columns.

The first line that is not blank and not a ``#`` comment is the header: a name per column,
each with its unit in brackets (``time [s]``, ``core [degC]``) unless the units are given
apart (``units={"time": "min", "core": "degF"}``). One column is named ``time`` (any case);
every other column is a thermocouple, mapped to a probe of the case by its name, or through
``mapping`` (column → probe name, or column → a point ``"x, y"`` with units, which then becomes
a probe of its own). Anything the reader cannot take is refused with a
:class:`MeasuredFileError` naming the file, the line and the column; nothing is read halfway.
"""

from __future__ import annotations

import csv
import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .measured_header import (
    TIME_COLUMN,
    MeasuredFileError,
    column_units,
    header_columns,
    mapped_point,
    unit_converter,
)

_COMMENT = "#"


@dataclass(frozen=True)
class MeasuredCurves:
    """Thermocouple readings against time, each column tied to a probe.

    Attributes
    ----------
    path : Path
        The file read.
    times : ndarray
        Measured times in s, strictly increasing, ≥ 0 (t = 0 is the start of the case's run).
    readings : dict of str to ndarray
        Temperature in °C at each probe (keyed by probe name), one per time.
    columns : dict of str to str
        The file's column name for each probe.
    positions : dict of str to (x, y)
        Points in m given with ``mapping`` for columns that are not probes of the case.
    header_line : int
        The line of the header in the file (1-based), for messages about columns.
    column_numbers : dict of str to int
        The 1-based column of each probe in the file.
    """

    path: Path
    times: np.ndarray
    readings: dict[str, np.ndarray]
    columns: dict[str, str]
    positions: dict[str, tuple[float, float]] = field(default_factory=dict)
    header_line: int = 1
    column_numbers: dict[str, int] = field(default_factory=dict)

    @property
    def probes(self) -> tuple[str, ...]:
        """The probes measured, in the file's column order."""
        return tuple(self.readings)

    @property
    def count(self) -> int:
        """Number of readings (times × thermocouples)."""
        return len(self.times) * len(self.readings)

    def stacked(self) -> np.ndarray:
        """The readings as one array (times × probes), °C."""
        return np.column_stack([self.readings[name] for name in self.probes])


def read_measured(
    path: str | Path,
    probes: Mapping[str, tuple[float, float]],
    *,
    units: Mapping[str, str] | None = None,
    mapping: Mapping[str, str] | None = None,
    parameters: int = 1,
) -> MeasuredCurves:
    """Read a measured file and tie its columns to probes.

    Parameters
    ----------
    path : str or Path
        A table separated by semicolons, commas or (when the header has neither) tabs and
        spaces; ``#`` starts a comment line. Numbers take decimal points.
    probes : mapping of str to (x, y)
        The case's probes (m).
    units : mapping of str to str, optional
        Units of columns whose header gives none (``{"time": "min", "core": "degC"}``).
    mapping : mapping of str to str, optional
        Column → probe name, or column → point ``"x, y"`` with units (``"0 mm, 18 mm"``).
    parameters : int
        Parameters to be fitted: at least ``parameters + 2`` times are required.

    Returns
    -------
    MeasuredCurves

    Raises
    ------
    MeasuredFileError
        Naming the file, line and column of the first problem.

    Examples
    --------
    >>> import tempfile
    >>> path = Path(tempfile.mkdtemp()) / "trial.csv"
    >>> _ = path.write_text("time [min], core [degC]\\n0, 850\\n1, 700\\n2, 580\\n3, 490\\n")
    >>> curves = read_measured(path, {"core": (0.0, 0.0)})
    >>> curves.times.tolist(), curves.readings["core"].tolist()
    ([0.0, 60.0, 120.0, 180.0], [850.0, 700.0, 580.0, 490.0])
    """
    path = Path(path)
    rows = _rows(path)
    if not rows:
        raise MeasuredFileError(path, 0, 0, "the file is empty (no header, no readings)")
    header_line, header = rows[0]
    names, header_units = header_columns(path, header_line, header)
    time_index = _time_column(path, header_line, names)
    given_units = column_units(path, header_line, names, header_units, dict(units or {}))
    targets = _targets(path, header_line, names, time_index, probes, dict(mapping or {}))
    table = _numbers(path, rows[1:], names, given_units)
    if len(table) < parameters + 2:
        raise MeasuredFileError(
            path,
            rows[-1][0],
            0,
            f"{len(table)} rows of readings for {parameters} fitted parameter(s): at least "
            f"{parameters + 2} are needed (the parameters and two degrees of freedom for "
            "the scatter)",
        )
    times = table[:, time_index]
    _check_times(path, [line for line, _ in rows[1:]], times, time_index + 1)
    readings, columns, numbers, positions = {}, {}, {}, {}
    for index, (probe, point) in targets.items():
        readings[probe] = table[:, index].copy()
        columns[probe] = names[index]
        numbers[probe] = index + 1
        if point is not None:
            positions[probe] = point
    return MeasuredCurves(path, times.copy(), readings, columns, positions, header_line, numbers)


def _rows(path: Path) -> list[tuple[int, list[str]]]:
    """(line number, cells) of every line that is not blank or a comment."""
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except FileNotFoundError:
        raise MeasuredFileError(path, 0, 0, "the measured file does not exist") from None
    except UnicodeDecodeError as error:
        line = path.read_bytes()[: error.start].count(b"\n") + 1
        raise MeasuredFileError(path, line, 0, "not UTF-8 text") from None
    except OSError as error:
        raise MeasuredFileError(path, 0, 0, f"cannot be read: {error.strerror}") from None
    lines = text.splitlines()
    content = [(n, s) for n, s in enumerate(lines, 1) if s.strip() and not _is_comment(s)]
    if not content:
        return []
    header = content[0][1]
    for delimiter in (";", ","):  # a semicolon first: loggers with decimal commas use it
        if delimiter in header:
            return [(n, [c.strip() for c in _csv_cells(s, delimiter)]) for n, s in content]
    rows = [(n, s.split()) for n, s in content]
    return [(rows[0][0], _joined_units(rows[0][1]))] + rows[1:]


def _csv_cells(line: str, delimiter: str) -> list[str]:
    """One CSV line's cells (each line alone: a reading never spans lines)."""
    return next(csv.reader([line], delimiter=delimiter, skipinitialspace=True), [])


def _is_comment(line: str) -> bool:
    return line.lstrip().startswith(_COMMENT)


def _joined_units(cells: list[str]) -> list[str]:
    """A whitespace header's cells with a lone ``[unit]`` joined to the name before it."""
    joined: list[str] = []
    for cell in cells:
        if joined and cell[:1] in "[(":
            joined[-1] = f"{joined[-1]} {cell}"
        else:
            joined.append(cell)
    return joined


def _time_column(path: Path, line: int, names: list[str]) -> int:
    times = [i for i, name in enumerate(names) if name.lower() == TIME_COLUMN]
    if not times:
        raise MeasuredFileError(
            path, line, 0, f"no column named 'time' among {names}: name the time column 'time'"
        )
    if len(names) < 2:
        raise MeasuredFileError(path, line, 0, "no thermocouple column beside the time")
    return times[0]


def _targets(
    path: Path,
    line: int,
    names: list[str],
    time_index: int,
    probes: Mapping[str, tuple[float, float]],
    mapping: dict[str, str],
) -> dict[int, tuple[str, tuple[float, float] | None]]:
    """Column index → (probe name, given point or None) for every thermocouple column."""
    missing = sorted(set(mapping) - set(names))
    if missing:
        raise MeasuredFileError(
            path,
            line,
            0,
            f"--map names column(s) {missing} the file does not have; its columns are {names}",
        )
    targets: dict[int, tuple[str, tuple[float, float] | None]] = {}
    for index, name in enumerate(names):
        if index == time_index:
            continue
        target = mapping.get(name, name)
        if target in probes:
            targets[index] = (target, None)
        elif name in mapping and "," in target:
            targets[index] = (name, mapped_point(path, line, index + 1, target))
        else:
            raise MeasuredFileError(
                path,
                line,
                index + 1,
                f"column {name!r} is not a probe of the case (its probes are "
                f"{sorted(probes)}): rename the column, or map it with --map "
                f"'{name}=PROBE' or --map '{name}=X, Y' (a point with units)",
            )
    taken: dict[str, int] = {}
    for index, (probe, _) in targets.items():
        if probe in taken:
            raise MeasuredFileError(
                path,
                line,
                index + 1,
                f"probe {probe!r} is measured by two columns ({names[taken[probe]]!r} too)",
            )
        taken[probe] = index
    return targets


def _numbers(path: Path, rows, names: list[str], units: list[str]) -> np.ndarray:
    """The readings as floats in s and °C, every cell checked."""
    table = np.empty((len(rows), len(names)))
    for r, (line, cells) in enumerate(rows):
        if len(cells) != len(names):
            column = min(len(cells), len(names)) + 1 if len(cells) > len(names) else 0
            raise MeasuredFileError(
                path, line, column, f"{len(cells)} cells, the header has {len(names)} columns"
            )
        for c, cell in enumerate(cells):
            try:
                value = float(cell)
            except ValueError:
                shown = cell if len(cell) <= 40 else cell[:37] + "..."
                hint = " (write decimal points, not commas)" if "," in cell else ""
                raise MeasuredFileError(
                    path, line, c + 1, f"{shown!r} in column {names[c]!r} is not a number{hint}"
                ) from None
            if not math.isfinite(value):
                raise MeasuredFileError(
                    path,
                    line,
                    c + 1,
                    f"{cell!r} in column {names[c]!r}: readings must be "
                    "finite numbers (drop the row, or fill the gap from the logger's record)",
                )
            table[r, c] = value
    for c, name in enumerate(names):
        kind = "time" if name.lower() == TIME_COLUMN else "temperature"
        table[:, c] = unit_converter(path, 0, c + 1, units[c], kind)(table[:, c])
    return table


def _check_times(path: Path, lines: list[int], times: np.ndarray, column: int) -> None:
    if times[0] < 0:
        raise MeasuredFileError(
            path,
            lines[0],
            column,
            f"time {times[0]:g} s is before the start of the run "
            "(t = 0 is when the case's run starts): shift the times",
        )
    steps = np.diff(times)
    bad = np.flatnonzero(steps <= 0)
    if bad.size:
        i = int(bad[0]) + 1
        raise MeasuredFileError(
            path,
            lines[i],
            column,
            f"time {times[i]:g} s does not follow {times[i - 1]:g} s (line {lines[i - 1]}): "
            "times must increase strictly",
        )


def check_positions(curves: MeasuredCurves, section_mesh) -> None:
    """Refuse a mapped point that lies outside the section, naming its column.

    Parameters
    ----------
    curves : MeasuredCurves
    section_mesh : geometries.SectionMesh
        The case's meshed section (its point location decides).

    Raises
    ------
    MeasuredFileError
    """
    from geometries import GeometryError

    for probe, point in curves.positions.items():
        try:
            section_mesh.locate(np.asarray(point, dtype=float).reshape(2, 1))
        except (GeometryError, ValueError):
            raise MeasuredFileError(
                curves.path,
                curves.header_line,
                curves.column_numbers[probe],
                f"column {curves.columns[probe]!r} is mapped to the point "
                f"({1000 * point[0]:g} mm, {1000 * point[1]:g} mm), which lies outside the "
                "section: check the coordinates against the case's section",
            ) from None
