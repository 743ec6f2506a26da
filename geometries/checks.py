"""Checks of the values that shapes and sections are built from, raising
:class:`GeometryError` with the offending value."""

from __future__ import annotations

import math

import numpy as np

from .errors import GeometryError


def check_name(value: object, what: str) -> str:
    """``value`` if it is a non-empty string (an edge group or region name)."""
    if not isinstance(value, str) or not value.strip():
        raise GeometryError(f"{what} must be a non-empty string, got {value!r}")
    return value


def check_length(value: object, what: str) -> float:
    """``value`` as a float if it is a finite length > 0 (m)."""
    if not isinstance(value, int | float | np.floating | np.integer) or not (
        math.isfinite(value) and value > 0
    ):
        shown = f"{value!r} m" if isinstance(value, int | float) else repr(value)
        raise GeometryError(f"{what} must be a finite length > 0 m, got {shown}")
    return float(value)


def check_point(value: object, what: str) -> tuple[float, float]:
    """``value`` as a finite point (x, y) in m."""
    try:
        x, y = (float(v) for v in value)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise GeometryError(f"{what} must be a point (x, y) in m, got {value!r}") from None
    if not (math.isfinite(x) and math.isfinite(y)):
        raise GeometryError(f"{what} must be a finite point, got {value!r}")
    return (x, y)


def format_point(point) -> str:
    """A point (x, y) for a message, six significant digits."""
    return f"({point[0]:.6g}, {point[1]:.6g})"
