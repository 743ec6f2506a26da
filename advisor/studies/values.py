"""Quantities in a study's specification: a number and a unit, written as in case files.

A study varies a key by values the case loader will read again, so every value a study makes
is written back in the unit its specification used ("2.5 mm", "350 W/(m^2*K)"); the loader
then checks that it is the kind of quantity the key expects. Numbers here are magnitudes in
that unit; nothing is converted to SI except to compare parameters given in different units.
"""

from __future__ import annotations

import math
import re

from ..casefile.reader import CaseError

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_ANGLE_UNITS = {"deg", "degree", "degrees", "rad", "radian", "radians"}
_OFFSET_UNITS = {"degC": "delta_degC", "degF": "delta_degF", "°C": "delta_degC"}


def split_quantity(value, where: str) -> tuple[float, str]:
    """(magnitude, unit text) of a case-file value: a number (unit ``""``) or "<number> <unit>".

    Raises
    ------
    CaseError
        If ``value`` is neither; the message starts with ``where``.
    """
    if isinstance(value, bool):
        raise CaseError(f"{where}: expected a number or a quantity such as '25 mm', got {value}")
    if isinstance(value, int | float):
        if not math.isfinite(value):
            raise CaseError(f"{where}: expected a finite number, got {value!r}")
        return float(value), ""
    if isinstance(value, str):
        match = _NUMBER.match(value)
        if match:
            return float(match.group(1)), match.group(2)
    raise CaseError(f"{where}: expected a number or a quantity such as '25 mm', got {value!r}")


def in_unit(value, unit: str, where: str, *, difference: bool = False) -> float:
    """The magnitude of ``value`` in ``unit`` (a plain number is taken as already in it).

    ``difference`` reads temperatures as differences ("10 K" of spread is 10 degC of spread).
    """
    magnitude, given = split_quantity(value, where)
    if not given or given == unit:
        return magnitude
    if not unit:
        raise CaseError(f"{where}: {value!r} has a unit where the other values are plain numbers")
    from ..casefile.units import registry

    ureg = registry()
    target = _OFFSET_UNITS.get(unit, unit) if difference else unit
    source = _OFFSET_UNITS.get(given, given) if difference else given
    try:
        quantity = ureg.Quantity(magnitude, ureg.parse_units(source.replace("^", "**")))
        return float(quantity.to(ureg.parse_units(target.replace("^", "**"))).magnitude)
    except Exception as error:  # pint's errors: unknown or mismatched units
        raise CaseError(f"{where}: {value!r} cannot be written in {unit!r}: {error}") from None


def with_unit(magnitude: float, unit: str):
    """A value the case loader reads: the number itself, or "<number> <unit>"."""
    return float(magnitude) if not unit else f"{float(magnitude)!r} {unit}"


def si_value(value):
    """A case-file value as the solver sees it: SI magnitude (temperatures in °C) for a
    quantity, the value itself for anything else (names, flags, tables)."""
    if isinstance(value, bool) or not isinstance(value, int | float | str):
        return value
    if isinstance(value, int | float):
        return float(value)
    match = _NUMBER.match(value)
    if match is None:
        return value
    magnitude, unit = float(match.group(1)), match.group(2)
    if not unit:
        return magnitude
    if unit in _OFFSET_UNITS:
        return magnitude if unit != "degF" else (magnitude - 32.0) * 5.0 / 9.0
    from ..casefile.units import registry

    ureg = registry()
    try:
        quantity = ureg.Quantity(magnitude, ureg.parse_units(unit.replace("^", "**")))
        if unit in _ANGLE_UNITS:  # case files take angles in degrees
            return float(quantity.to("degree").magnitude)
        return float(quantity.to_base_units().magnitude)
    except Exception:  # not a unit pint knows: keep the text
        return value
