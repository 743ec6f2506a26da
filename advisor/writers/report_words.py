"""Numbers, times, lengths, properties and quantity names as the report writes them."""

from __future__ import annotations

import math
import re
from collections.abc import Sequence

import numpy as np

from ..analysis.lumped_terms import exchange_conductance, heat_capacity
from ..time_words import duration_text

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
    value = float(value)
    if value != 0 and 1e-4 <= abs(value) < 1e9:  # positional: no scientific notation here
        return np.format_float_positional(
            value, precision=digits, unique=False, fractional=False, trim="-"
        )
    return f"{value:.{digits}g}"


def duration(seconds: float | None) -> str:
    """A time as a person reads it (``"3 h 10 min"``, ``"4 min 12 s"``, ``"38.2 s"``)."""
    if seconds is None:
        return "not within the run"
    return duration_text(seconds)


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


def time_constant_text(lumped, end_time: float) -> str:
    """A lumped model's τ in words: one value when it is constant, one per stage when the
    conditions change in steps (at most four stages), else its range ("τ varies").

    τ = ρcV / Σ h·A at the model's initial temperature, each stage's coefficients taken in the
    middle of the stage (a stage counts as constant when its quarter and three-quarter points
    agree); with radiation or a temperature-dependent h or property τ also varies with
    temperature, and the text says so.
    """
    if lumped.closed_form:
        return f"τ = {duration_text(lumped.time_constant)}"
    model, t0 = lumped.model, lumped.initial_temperature
    capacity = heat_capacity(model, t0)

    def tau(time: float) -> float:
        conductance, _ = exchange_conductance(model, t0, time, lumped.coefficient_scale)
        return capacity / conductance

    points = [0.0, *(t for t in model.breakpoints(end_time) if 0.0 < t < end_time), end_time]
    stages = list(zip(points[:-1], points[1:], strict=True))
    values = [tau(a + 0.5 * (b - a)) for a, b in stages]
    steady = all(
        math.isclose(tau(a + 0.25 * (b - a)), tau(a + 0.75 * (b - a)), rel_tol=1e-9)
        for a, b in stages
    )
    linear = model.is_linear
    if linear and steady and len(stages) <= 4:
        changes = [(0.0, values[0])]
        for (start, _), value in zip(stages[1:], values[1:], strict=True):
            if not math.isclose(value, changes[-1][1], rel_tol=1e-9):  # only the ambient moved
                changes.append((start, value))
        later = [f"{duration_text(v)} from t = {duration_text(a)}" for a, v in changes[1:]]
        return ", then ".join([f"τ = {duration_text(values[0])}", *later])
    sampled = [tau(t) for t in np.linspace(0.0, end_time, 65)] + values
    low, high = min(sampled), max(sampled)
    if math.isclose(low, high, rel_tol=1e-3):  # steady in time: it moves with temperature
        return f"τ ≈ {duration_text(values[0])} at the start (changes with temperature)"
    spread = f"{duration_text(low)} to {duration_text(high)}"
    return f"τ varies ({spread}" + ("" if linear else " at the start temperature") + ")"


_FILE_KINDS = {
    ".vtu": "VTK frames",
    ".png": "PNG pictures",
    ".svg": "SVG pictures",
    ".csv": "CSV tables",
    ".h5": "HDF5 files",
}
_NUMBERED = re.compile(r"^(?P<stem>.*?)(?P<number>\d+)(?P<suffix>\.[^./]+)$")


def file_summary(names: Sequence[str], least: int = 4) -> list[str]:
    """The files of a results folder as a person reads the list: a numbered series of at
    least ``least`` files in one line ("51 VTK frames, fields/temperature_0000–0050.vtu"),
    every other file by name, in the order given."""
    series: dict[tuple[str, str, int], list[str]] = {}
    for name in names:
        found = _NUMBERED.match(name)
        if found:
            key = (found["stem"], found["suffix"], len(found["number"]))
            series.setdefault(key, []).append(found["number"])
    lines: list[str] = []
    done: set[tuple[str, str, int]] = set()
    for name in names:
        found = _NUMBERED.match(name)
        key = (found["stem"], found["suffix"], len(found["number"])) if found else None
        if key is None or len(series[key]) < least:
            lines.append(name)
        elif key not in done:
            done.add(key)
            numbers = sorted(series[key])
            kind = _FILE_KINDS.get(key[1].lower(), f"{key[1]} files")
            lines.append(f"{len(numbers)} {kind}, {key[0]}{numbers[0]}–{numbers[-1]}{key[1]}")
    return lines
