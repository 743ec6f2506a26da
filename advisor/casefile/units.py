"""Quantities with units from case files, parsed with pint.

A value is a number (SI, temperatures in °C) or a string "<number> <unit>" such as "25 mm",
"150 W/(m^2*K)", "480 degC", "10 min". Each key expects one kind of quantity; a string of the
wrong kind ("25 kg" for a length) is an error that names what was expected.
"""

from __future__ import annotations

import importlib
import math
import re
import sys
from functools import lru_cache

# kind: (SI unit pint converts to, what the user is told)
KINDS = {
    "length": ("m", "a length such as '25 mm'"),
    "time": ("s", "a time such as '10 min'"),
    "temperature": ("degC", "a temperature such as '480 degC'"),
    "temperature_difference": ("K", "a temperature difference such as '0.1 K'"),
    "heat_transfer_coefficient": ("W/(m^2*K)", "a coefficient such as '150 W/(m^2*K)'"),
    "contact_resistance": ("m^2*K/W", "a contact resistance such as '2e-4 m^2*K/W'"),
    "conductivity": ("W/(m*K)", "a conductivity such as '45 W/(m*K)'"),
    "density": ("kg/m^3", "a density such as '7850 kg/m^3'"),
    "specific_heat": ("J/(kg*K)", "a specific heat such as '480 J/(kg*K)'"),
    "heat_flux": ("W/m^2", "a heat flux such as '2 kW/m^2'"),
    "specific_energy": ("J/kg", "a latent heat such as '334 kJ/kg'"),
    "power_density": ("W/m^3", "a heat generation such as '5 MW/m^3'"),
    "angle": ("degree", "an angle such as '30 deg'"),
    "velocity": ("m/s", "a speed such as '3 m/s'"),
    "number": ("", "a plain number"),
}

LONGEST_UNIT = 40  # characters of a unit: "W/(m^2*K)" is 9
# a power of a power ("m**9**9**9") would have pint compute a number of millions of digits
_TOWER = re.compile(r"(\*\*|\^)[^a-zA-Z]*(\*\*|\^)|(\*\*|\^)\s*\(?\s*[-+]?\d{3}")
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


class UnitError(ValueError):
    """A value that is not a quantity of the expected kind; the message says what is."""


def _shown(value) -> str:
    """``repr(value)`` cut to about 80 characters for a message."""
    text = repr(value) if not isinstance(value, list | dict) else f"a {type(value).__name__}"
    return text if len(text) <= 80 else f"{text[:60]} ... {text[-15:]}"


@lru_cache(maxsize=1)
def _pint():
    """pint, imported without its optional dask support: when dask is installed pint imports
    it on import (0.08 s of every command that reads a case), and no quantity here is ever a
    dask array. Where dask is already loaded it is left as it is."""
    if "pint" in sys.modules or "dask" in sys.modules:
        return importlib.import_module("pint")
    sys.modules["dask"] = None  # makes ``import dask`` fail, so pint takes dask as absent
    try:
        return importlib.import_module("pint")
    finally:
        del sys.modules["dask"]


@lru_cache(maxsize=1)
def registry():
    """The unit registry (a ``pint.UnitRegistry``), from pint's own disk cache where it can
    keep one (0.01 s against 0.11 s to parse its definitions each time); a cache that cannot
    be read or written is passed over."""
    pint = _pint()
    try:
        return pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # an unwritable home, a cache file another process is writing
        return pint.UnitRegistry()


def quantity(value, kind: str) -> float:
    """The magnitude of ``value`` in the SI unit of ``kind`` (°C for temperatures)."""
    unit, described = KINDS[kind]
    if isinstance(value, bool):
        raise UnitError(f"expected {described}, got {_shown(value)}")
    if isinstance(value, int | float):
        number = float(value)
    elif isinstance(value, str):
        match = _NUMBER.match(value)
        if match is None:
            raise UnitError(f"expected {described}, got {_shown(value)} (a number, then a unit)")
        magnitude, text = float(match.group(1)), match.group(2)
        if not text:
            number = magnitude
        elif kind == "number":
            raise UnitError(f"expected a plain number, got {_shown(value)}")
        else:
            number = _converted(magnitude, text, kind, value)
    else:
        raise UnitError(f"expected {described}, got {_shown(value)}")
    if not math.isfinite(number):
        raise UnitError(f"expected {described}, got {_shown(value)} (not finite)")
    return number


def _converted(magnitude: float, text: str, kind: str, value: str) -> float:
    """``magnitude`` of the unit ``text`` in the SI unit of ``kind``, through pint; every
    failure of pint's parser (unbalanced brackets, a dangling operator, a division by zero,
    a character it has no token for) is a :class:`UnitError`."""
    unit, described = KINDS[kind]
    if len(text) > LONGEST_UNIT or _TOWER.search(text):
        raise UnitError(f"expected {described}, got {_shown(value)}: not a unit pint can read")
    ureg = registry()
    if kind == "temperature_difference":  # "8 degC" of difference is 8 K, not 281 K
        text = re.sub(r"\bdeg(C|F)\b", r"delta_deg\1", text)
    try:
        given = ureg.Quantity(magnitude, ureg.parse_units(text.replace("^", "**")))
        return float(given.to(unit.replace("^", "**")).magnitude)
    except _pint().errors.DimensionalityError:
        raise UnitError(
            f"expected {described}, got {_shown(value)}: '{text}' is a different kind of unit"
        ) from None
    except Exception:  # pint's parser fails in many ways: TokenError, AssertionError, ...
        raise UnitError(
            f"expected {described}, got {_shown(value)}: unknown unit {_shown(text)}"
        ) from None


_TEMPERATURE_SYMBOLS = {"degC": "°C", "degF": "°F", "K": "K", "kelvin": "K", "celsius": "°C"}


def unit_of(raw) -> str | None:
    """The unit a case wrote a value in ("45 mm" → "mm"); None for a bare number."""
    if not isinstance(raw, str):
        return None
    match = _NUMBER.match(raw)
    return match.group(2) or None if match else None


def shown_in(value: float, kind: str, unit: str | None, digits: int = 4) -> str:
    """``value`` (SI, temperatures in °C) written in ``unit`` to ``digits`` significant
    figures; without a unit in the SI one (m, °C). The one way messages give a value back in
    the units the case wrote it in."""
    if kind == "temperature":
        if unit is None:
            return f"{value:.{digits}g} °C"
        ureg = registry()
        converted = ureg.Quantity(value, ureg.degC).to(ureg.parse_units(unit)).magnitude
        return f"{converted:.{digits}g} {_TEMPERATURE_SYMBOLS.get(unit, unit)}"
    if unit is None:
        return f"{value:.{digits}g} m"
    scale = quantity(f"1 {unit}", kind)  # SI per unit
    return f"{value / scale:.{digits}g} {unit}"
