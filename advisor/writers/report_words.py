"""Numbers, times, lengths, properties and quantity names as the report writes them."""

from __future__ import annotations

import numpy as np

from .plot_style import clock

_UNIT_SUFFIXES = (
    ("_J_per_K", "J/K"),
    ("_W_per_K", "W/K"),
    ("_W_per_m2_K", "W/(m²·K)"),
    ("_degC", "°C"),
    ("_per_s", "1/s"),
    ("_s", "s"),
    ("_K", "K"),
)

_QUANTITY_WORDS = {
    "classical": "classical lumped estimate",
    "corrected": "corrected lumped model",
    "fitted exponential": "fitted single exponential",
    "two-node (core)": "two-node model, core node",
    "two-node": "two-node model",
    "mean": "field mean",
    "slowest": "slowest point of the field",
    "hottest": "hottest point of the field",
    "coldest": "coldest point of the field",
}


def number(value: float | None, digits: int = 4) -> str:
    """``value`` to ``digits`` significant figures; a dash for None."""
    if value is None:
        return "—"
    return f"{float(value):.{digits}g}"


def duration(seconds: float | None) -> str:
    """A time as seconds and, when long, as minutes and hours too."""
    if seconds is None:
        return "not within the run"
    if seconds < 120:
        return f"{seconds:.4g} s"
    return f"{seconds:.5g} s ({clock(seconds)})"


def millimetres(length: float) -> str:
    """A length given in m, written in mm."""
    return f"{1000 * length:.4g} mm"


def parameter_words(key: str) -> tuple[str, str]:
    """A ``parameters()`` key split into words and a unit."""
    for suffix, unit in _UNIT_SUFFIXES:
        if key.endswith(suffix):
            return key[: -len(suffix)].replace("_", " "), unit
    return key.replace("_", " "), ""


def quantity_words(key: str) -> str:
    """A model or field quantity key in words."""
    if key.startswith("probe:"):
        return f"probe {key[len('probe:') :]}"
    return _QUANTITY_WORDS.get(key, key)


def condition_text(condition, end_time: float) -> str:
    """One boundary condition in words."""
    return condition.describe(end_time)


def property_text(value, unit: str) -> str:
    """A material property: a constant, or a table's range and temperature span."""
    if isinstance(value, float | int):
        return f"{value:.4g} {unit}"
    low, high = value.range
    t0, t1 = value.temperatures[0], value.temperatures[-1]
    return f"{low:.4g} to {high:.4g} {unit} (table, {t0:.4g} to {t1:.4g} °C)"


def initial_text(value) -> str:
    """The initial temperature: uniform, per region, or the field of an earlier run."""
    if isinstance(value, float | int):
        return f"{value:.4g} °C, uniform"
    if isinstance(value, dict):
        return "; ".join(f"{region}: {t:.4g} °C" for region, t in value.items())
    values = np.asarray(value, dtype=float)
    return f"the field of an earlier run, {values.min():.4g} to {values.max():.4g} °C"
