"""The header of a measured file: column names and units, units given apart, points given
for columns, and the error that names the file, line and column of a fault."""

from __future__ import annotations

import re
from pathlib import Path

from ..errors import AdvisorError

TIME_COLUMN = "time"
UNIT = re.compile(r"^\s*(.*?)\s*[\[(]\s*([^\])]*?)\s*[\])]\s*$")  # "core [degC]", "t (min)"
KINDS = {"time": "s", "temperature": "degC"}


class MeasuredFileError(AdvisorError):
    """A measured file the fit cannot take: ``path``, ``line`` (1-based, 0 when the whole file
    is meant) and ``column`` (1-based, 0 for a whole line) say where."""

    def __init__(self, path: Path, line: int, column: int, message: str) -> None:
        where = f"{Path(path).name}"
        if line:
            where += f", line {line}"
        if column:
            where += f", column {column}"
        super().__init__(f"{where}: {message}", argument="measured")
        self.path, self.line, self.column = Path(path), line, column


def header_columns(path: Path, line: int, cells: list[str]) -> tuple[list[str], list[str]]:
    """Each column's name and the unit the header gives it ("" for none)."""
    names, found = [], []
    for number, cell in enumerate(cells, 1):
        match = UNIT.match(cell)
        name, unit = (match.group(1), match.group(2)) if match else (cell.strip(), "")
        if not name:
            raise MeasuredFileError(path, line, number, f"the header cell {cell!r} has no name")
        if name in names:
            raise MeasuredFileError(path, line, number, f"column name {name!r} appears twice")
        names.append(name)
        found.append(unit)
    return names, found


def column_units(
    path: Path, line: int, names: list[str], found: list[str], units: dict[str, str]
) -> list[str]:
    """Each column's unit (the header's, else from ``units``), checked."""
    found = list(found)
    unknown = sorted(set(units) - set(names))
    if unknown:
        raise MeasuredFileError(
            path,
            line,
            0,
            f"units are given for column(s) {unknown} the header does not have; "
            f"its columns are {names}",
        )
    for number, name in enumerate(names, 1):
        if name in units:
            found[number - 1] = units[name]
        kind = "time" if name.lower() == TIME_COLUMN else "temperature"
        if not found[number - 1]:
            raise MeasuredFileError(
                path,
                line,
                number,
                f"column {name!r} has no unit: write it in the header ('{name} [{KINDS[kind]}]')"
                f" or give it with --units {name}={KINDS[kind]}",
            )
        unit_converter(path, line, number, found[number - 1], kind)  # checked now, used later
    return found


def mapped_point(path: Path, line: int, column: int, text: str) -> tuple[float, float]:
    from ..casefile.units import UnitError, quantity

    parts = [p.strip() for p in text.split(",")]
    try:
        if len(parts) != 2:
            raise UnitError(f"expected two coordinates 'x, y', got {text!r}")
        x, y = (quantity(p, "length") for p in parts)
    except UnitError as error:
        raise MeasuredFileError(path, line, column, f"--map point: {error}") from None
    return (x, y)


def unit_converter(path: Path, line: int, column: int, unit: str, kind: str):
    """A function taking an array in ``unit`` to s or °C; an unknown unit is refused."""
    from ..casefile.units import UnitError, quantity

    expected = "time" if kind == "time" else "temperature"
    try:
        zero = quantity(f"0 {unit}", expected)
        one = quantity(f"1 {unit}", expected)
    except UnitError:
        examples = "s, min or h" if kind == "time" else "degC, degF or K"
        raise MeasuredFileError(
            path, line, column, f"unit {unit!r} is not a {expected} unit ({examples})"
        ) from None
    return lambda values: zero + (one - zero) * values  # affine: °F and K convert too
