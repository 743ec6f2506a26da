"""The fitted coefficients as case-file text: ``[boundaries.<group>]`` tables in the case
format, and the whole case with those tables put in place of the old ones.

Only what a fit produces and what sits beside it on a group is written: convection (a number,
a ``linear`` schedule of time, or a curve of surface temperature), radiation and a constant
heat flux, with ambients that are constant or ``linear``/``steps`` schedules.
"""

from __future__ import annotations

import re
import sys

import numpy as np

from ..errors import AdvisorError

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

H_UNIT = "W/(m^2*K)"


def _number(value: float) -> str:
    return f"{float(value):.6g}"


def _quantity(value: float, unit: str) -> str:
    return f'"{_number(value)} {unit}"'


def _schedule(value, unit: str) -> str:
    """A constant or a linear/steps schedule of time in TOML."""
    from fem import Constant, PiecewiseLinear, Steps

    if isinstance(value, int | float):
        return _quantity(value, unit)
    if isinstance(value, Constant):
        return _quantity(value.value, unit)
    if isinstance(value, PiecewiseLinear | Steps):
        style = "linear" if isinstance(value, PiecewiseLinear) else "steps"
        pairs = ", ".join(
            f'["{_number(t)} s", {_quantity(v, unit)}]'
            for t, v in zip(value.times, value.values, strict=True)
        )
        return f"{{ {style} = [{pairs}] }}"
    raise AdvisorError(
        f"a fitted case cannot be written with the schedule {value!r}: only constants and "
        "linear or steps schedules of time",
        argument="fit",
    )


def _condition(condition) -> str:
    from fem import Convection, HeatFlux, Radiation, SurfaceCurve, SurfaceTemperatureConvection

    if isinstance(condition, Convection):
        h = _schedule(condition.heat_transfer_coefficient, H_UNIT)
        ambient = _schedule(condition.ambient, "degC")
        return f"convection = {{ coefficient = {h}, ambient = {ambient} }}"
    if isinstance(condition, SurfaceTemperatureConvection) and len(condition.curve) == 1:
        curve = condition.curve[0][1]
        if isinstance(curve, SurfaceCurve) and curve.quantity == "coefficient":
            temperatures = ", ".join(_quantity(t, "degC") for t in curve.surface_temperatures)
            values = ", ".join(_quantity(v, H_UNIT) for v in curve.values)
            return (
                f"convection = {{ coefficient = {{ surface_temperatures = [{temperatures}], "
                f"values = [{values}] }}, ambient = {_schedule(condition.ambient, 'degC')} }}"
            )
    if isinstance(condition, Radiation):
        return (
            f"radiation = {{ emissivity = {_number(condition.emissivity)}, "
            f"surroundings = {_schedule(condition.surroundings, 'degC')} }}"
        )
    if isinstance(condition, HeatFlux):
        return f"flux = {_schedule(condition.flux, 'W/m^2')}"
    raise AdvisorError(
        f"a fitted case cannot be written with the condition {type(condition).__name__} on a "
        "fitted edge group",
        argument="fit",
    )


def boundary_fragment(boundaries: dict, groups: list[str], heading: str = "") -> str:
    """``[boundaries.<group>]`` tables for ``groups``, in the case format.

    Parameters
    ----------
    boundaries : dict of str to tuple of conditions
        The fitted model's conditions.
    groups : list of str
        The fitted edge groups.
    heading : str
        Comment lines put first (each line gets a ``#``).

    Examples
    --------
    >>> from fem import Convection
    >>> print(boundary_fragment({"air": (Convection(412.5, 20.0),)}, ["air"]), end="")
    [boundaries.air]
    convection = { coefficient = "412.5 W/(m^2*K)", ambient = "20 degC" }
    """
    lines = [f"# {line}".rstrip() for line in heading.splitlines()]
    for group in groups:
        lines.append(f"[boundaries.{_key(group)}]")
        lines += [_condition(c) for c in boundaries[group]]
        lines.append("")
    return "\n".join(lines).rstrip("\n") + "\n"


def _key(name: str) -> str:
    return name if re.fullmatch(r"[A-Za-z0-9_-]+", name) else f'"{name}"'


def spliced_case(case_text: str, fragment: str, groups: list[str]) -> str:
    """The case's text with the tables of ``groups`` under ``[boundaries]`` removed and
    ``fragment`` appended; checked by reading it back.

    Raises
    ------
    AdvisorError
        If the case writes those groups in a way that cannot be cut out line by line (inline
        tables, dotted keys), or if the result does not read back with the fitted tables.
    """
    kept, skipping = [], False
    heads = [
        re.compile(rf"^\s*\[\s*boundaries\s*\.\s*\"?{re.escape(g)}\"?\s*[\].]") for g in groups
    ]
    for line in case_text.splitlines():
        if re.match(r"^\s*\[", line):
            skipping = any(head.match(line) for head in heads)
        if not skipping:
            kept.append(line)
    text = "\n".join(kept).rstrip() + "\n\n" + fragment
    try:
        read = tomllib.loads(text)
        wanted = tomllib.loads(fragment)["boundaries"]
    except tomllib.TOMLDecodeError as error:
        message = f"the fitted case does not read back: {error}"
        raise AdvisorError(message, argument="fit") from None
    for group in groups:
        if read.get("boundaries", {}).get(group) != wanted[group]:
            raise AdvisorError(
                f"the case writes the boundaries of {group!r} in a form that cannot be replaced "
                "line by line; use the fragment fitted.toml by hand",
                argument="fit",
            )
    return text


def decimals(error: float) -> int:
    """Decimal places that show a standard error ``error`` to two significant digits."""
    if not (error > 0 and np.isfinite(error)):
        return 3
    return max(0, 1 - int(np.floor(np.log10(error))))


def with_interval(name: str, value: float, low: float, high: float, unit: str, error: float):
    """'name = value unit (95 % interval low to high)', to the digits the error warrants."""
    d = decimals(error)
    unit = f" {unit}" if unit else ""
    return f"{name} = {value:.{d}f}{unit} (95 % interval {low:.{d}f} to {high:.{d}f})"


def uncertainty_comment(names, values, band, units, errors) -> str:
    """Lines 'name = value unit (95 % interval low to high)' for the fragment's heading."""
    rows = zip(names, values, np.asarray(band), units, errors, strict=True)
    return "\n".join(
        with_interval(name, value, low, high, unit, error)
        for name, value, (low, high), unit, error in rows
    )
