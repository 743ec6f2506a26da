"""A correlation's characteristic length from the section, and the surface temperatures a run
can reach from its initial and fluid temperatures: what :class:`CorrelationConvection` needs
before it builds its table."""

from __future__ import annotations

import numpy as np

from ..errors import ModelError
from .correlation import CorrelationConvection

ROUND_TOLERANCE = 0.02  # an edge group is round when its box's sides agree within 2 %
RANGE_MARGIN = 0.05  # the table reaches 5 % of the span beyond the initial and fluid extremes
SMALLEST_SPAN = 50.0  # K: a part starting at the fluid's temperature still gets a table

# Which length a correlation takes from its edge group's bounding box (x across, y up).
DERIVED = {
    "natural-horizontal-cylinder": "diameter",
    "forced-cylinder": "diameter",
    "natural-vertical-plate": "height",
    "forced-plate": "longer",
    "forced-plate-turbulent": "longer",
    "natural-plate-facing-up": "half-width",
    "natural-plate-facing-down": "half-width",
    "jet-round-nozzle": "half-longer",
    "jet-slot-nozzle": "half-longer",
}
_WORDS = {
    "diameter": "the diameter of the round edge group's bounding box",
    "height": "the edge group's height",
    "longer": "the longer side of the edge group's bounding box",
    "half-width": "half the edge group's width (area/perimeter of a long strip)",
    "half-longer": "half the longer side of the edge group's bounding box",
}


def bind_correlations(boundaries: dict, section_mesh, initial) -> dict:
    """``boundaries`` with every :class:`CorrelationConvection` given its length (derived from
    its edge group where not given) and the surface range of the run.

    Parameters
    ----------
    boundaries : dict of str to condition or tuple of conditions
        The conditions of each edge group.
    section_mesh : geometries.SectionMesh
        The meshed section.
    initial : float or dict of str to float
        The initial temperature, °C (one, or one per region).

    Returns
    -------
    dict
        The same mapping, correlation conditions replaced by bound ones.
    """
    correlations = [
        c
        for value in boundaries.values()
        for c in (value if isinstance(value, tuple | list) else (value,))
        if isinstance(c, CorrelationConvection)
    ]
    if not correlations:
        return boundaries
    fluids = [c.fluid_temperature for c in correlations]
    surface_range, hottest = _surface_range(initial, fluids), _extremes(initial, fluids)[1]
    bound = {}
    for group, value in boundaries.items():
        items = value if isinstance(value, tuple | list) else (value,)
        bound[group] = tuple(
            _bind(item, group, section_mesh, surface_range, hottest)
            if isinstance(item, CorrelationConvection)
            else item
            for item in items
        )
    return bound


def _bind(condition: CorrelationConvection, group: str, section_mesh, surface_range, hottest):
    surface_range = _within_liquid(condition, surface_range, hottest)
    try:
        if condition.length is not None:
            return condition.with_section(None, "", surface_range)
        length, origin = derived_length(condition.correlation, group, section_mesh)
        return condition.with_section(length, origin, surface_range)
    except ModelError as error:
        raise ModelError(
            f"edge group {group!r}, the {condition.correlation} correlation: {error}",
            argument=error.argument,
        ) from None


def derived_length(correlation: str, group: str, section_mesh) -> tuple[float, str]:
    """The characteristic length of ``correlation`` on edge ``group``, m, and how it was found,
    from the group's bounding box: a cylinder's diameter (a round group: its sides agree); a
    vertical plate's height; a plate's length along the flow as the longer side; a horizontal
    strip's area/perimeter as half its width; a jet's averaging radius or half-width as half
    the longer side."""
    mesh = section_mesh.mesh
    if group not in mesh.boundaries:
        raise ModelError(f"edge group {group!r} is not in the section", argument="length")
    nodes = np.unique(mesh.facets[:, mesh.boundaries[group]])
    width, height = (float(np.ptp(mesh.p[axis, nodes])) for axis in (0, 1))
    rule = DERIVED[correlation]
    lengths = {
        "diameter": 0.5 * (width + height),
        "height": height,
        "longer": max(width, height),
        "half-width": 0.5 * width,
        "half-longer": 0.5 * max(width, height),
    }
    if rule == "diameter" and abs(width - height) > ROUND_TOLERANCE * max(width, height):
        raise ModelError(
            f"the {correlation} correlation on edge group {group!r} needs a diameter; the "
            f"group is not round (its box is {width * 1e3:.4g} x {height * 1e3:.4g} mm): give "
            "length",
            argument="length",
        )
    if not lengths[rule] > 0:
        raise ModelError(
            f"the {correlation} correlation on edge group {group!r}: {_WORDS[rule]} is 0 "
            f"(its box is {width * 1e3:.4g} x {height * 1e3:.4g} mm): give length",
            argument="length",
        )
    return lengths[rule], _WORDS[rule] + ", derived"


def _extremes(initial, fluid_temperatures) -> tuple[float, float]:
    """The lowest and highest of the initial temperatures and the fluids', °C."""
    values = list(initial.values()) if isinstance(initial, dict) else [initial]
    try:
        known = [float(np.min(v)) for v in values] + [float(np.max(v)) for v in values]
    except (TypeError, ValueError):
        raise ModelError(
            "a correlation's surface range needs initial temperatures as numbers; give "
            "surface_range",
            argument="surface_range",
        ) from None
    return min(known + fluid_temperatures), max(known + fluid_temperatures)


def _surface_range(initial, fluid_temperatures) -> tuple[float, float]:
    """The initial and fluid temperatures' extremes, widened beyond the initial ones a little
    (sources or other conditions may carry the surface somewhat beyond)."""
    values = list(initial.values()) if isinstance(initial, dict) else [initial]
    low, high = _extremes(initial, fluid_temperatures)
    span = high - low
    margin = max(RANGE_MARGIN * span, SMALLEST_SPAN if span < 1.0 else 0.0)
    starts = [float(np.min(v)) for v in values] + [float(np.max(v)) for v in values]
    # a surface goes beyond the fluid's temperature only by what the part starts beyond it
    low = min([v - margin for v in starts] + fluid_temperatures)
    high = max([v + margin for v in starts] + fluid_temperatures)
    return low, high


def _within_liquid(condition: CorrelationConvection, surface_range, hottest: float):
    """For a liquid, the range's margin stops at the liquid's boiling point; a part starting
    above it keeps its range (and the table refuses it)."""
    if condition.fluid == "air":
        return surface_range
    from ..fluid_properties import fluid_range

    low, high = surface_range
    limit = fluid_range(condition.fluid)[1]
    return (low, min(high, limit)) if hottest <= limit else surface_range
