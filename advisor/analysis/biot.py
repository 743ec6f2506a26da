"""Biot numbers of a section, each with the length scale it uses and why."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import minimize_scalar

from fem import ThermalModel

from ..errors import AdvisorError
from .lumped import mean_coefficient, mean_initial

COMMON_LIMIT = 0.1  # common practice: lumped estimates are usually accepted below Bi = 0.1


@dataclass(frozen=True)
class BiotNumber:
    """Bi = h·L / k for one choice of the length L.

    Attributes
    ----------
    name : str
        Short identifier of the length scale.
    value : float
        The Biot number at the start (dimensionless).
    length : float
        The length scale L in m.
    heat_transfer_coefficient : float
        The surface-weighted mean h (radiation linearised) at the start, W/(m²·K).
    low, high : float
        The range of the number over the run, as coefficients and conductivity vary with time
        and temperature; ``high`` is the worst case.
    explanation : str
        What the length is and how to read the number.
    """

    name: str
    value: float
    length: float
    heat_transfer_coefficient: float
    low: float
    high: float
    explanation: str


def biot_numbers(
    model: ThermalModel,
    *,
    end_time: float = 0.0,
    temperature_range: tuple[float, float] | None = None,
) -> tuple[BiotNumber, ...]:
    """Biot numbers of the model's section under its surface conditions.

    Only edges that exchange heat count as exposed. With several coefficients the mean weighted
    by surface area is used; each condition enters with its coefficient linearised at the
    surface temperature (radiation as εσ(T² + T_s²)(T + T_s)). The value is for the
    start; the range covers coefficients over [0, ``end_time``] and temperatures in
    ``temperature_range`` (°C; default the initial temperature). With several materials the
    lowest conductivity is used (the worst case). V and A_s are the section's volume and
    exchanging surface (per metre of depth for planar sections, revolved for axisymmetric ones).
    """
    groups = model.exchange_groups
    if not groups:
        raise AdvisorError("the model has no edge that exchanges heat, so it has no Biot number")
    t0 = mean_initial(model)
    low_t, high_t = temperature_range or (t0, t0)
    h0 = mean_coefficient(model, t0, 0.0)
    k0 = min(float(m.conductivity_at(t0)) for m in model.materials.values())
    hs, ks = _coefficient_range(model, end_time, low_t, high_t)

    def number(name: str, length: float) -> BiotNumber:
        return BiotNumber(
            name,
            h0 * length / k0,
            length,
            h0,
            min(hs) * length / max(ks),
            max(hs) * length / min(ks),
            EXPLANATIONS[name],
        )

    return tuple(number(name, length) for name, length in _lengths(model).items())


EXPLANATIONS = {
    "volume_to_surface": (
        "L = V / A_s (planar: area / exposed perimeter), the length of the lumped rule "
        f"of thumb: below {COMMON_LIMIT} (common practice) one temperature usually "
        "stands for the part"
    ),
    "four_area_over_perimeter": (
        "L = 4 × area / exposed perimeter (the hydraulic-diameter convention), twice the "
        "planar V/A_s length: numbers quoted this way are larger by 2 for the same part"
    ),
    "conduction_distance": (
        "L = the largest distance from any point to a heat-exchanging edge: the "
        "half-thickness of a plate, the radius of a round; it measures the slowest "
        "internal path against the surface"
    ),
}


def _lengths(model: ThermalModel) -> dict[str, float]:
    """The length scales in m, in report order (4A/P only for planar sections)."""
    groups = model.exchange_groups
    facts = model.section.facts
    exposed_surface = sum(facts.surface_areas[g] for g in groups)
    lengths = {"volume_to_surface": facts.volume / exposed_surface}
    if not facts.axisymmetric:
        exposed_length = sum(facts.edge_lengths[g] for g in groups)
        lengths["four_area_over_perimeter"] = 4 * facts.area / exposed_length
    lengths["conduction_distance"] = model.section.max_distance_to(groups)
    return lengths


def _coefficient_range(model, end_time, low_t, high_t):
    """Surface coefficients and conductivities over the run: h on a grid of times and surface
    temperatures, its extremes then refined in temperature (a coefficient that follows the
    surface temperature may peak sharply between grid points, as nucleate boiling does)."""
    steady = all(c.is_constant() for _, c in model.conditions())
    times = np.linspace(0.0, max(end_time, 0.0), 1 if steady else 65)
    temperatures = np.linspace(low_t, high_t, 65 if high_t > low_t else 1)
    grid = np.array(
        [
            [mean_coefficient(model, float(t_), float(time)) for t_ in temperatures]
            for time in times
        ]
    )
    hs = list(grid.ravel())
    if len(temperatures) > 1:
        for sign in (1.0, -1.0):  # the largest, then the smallest
            i, j = np.unravel_index(np.argmax(sign * grid), grid.shape)
            time = float(times[i])
            bracket = (
                temperatures[max(j - 1, 0)],
                temperatures[min(j + 1, len(temperatures) - 1)],
            )
            best = minimize_scalar(
                lambda t_, time=time, sign=sign: -sign * mean_coefficient(model, t_, time),
                bounds=bracket,
                method="bounded",
                options={"xatol": 1e-6 * (high_t - low_t)},
            )
            hs.append(-sign * float(best.fun))
    ks = [
        float(m.conductivity_at(float(t_)))
        for m in model.materials.values()
        for t_ in np.linspace(low_t, high_t, 9)
    ]
    return hs, ks
