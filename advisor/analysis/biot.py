"""Biot numbers of a section, each with the length scale it uses and why."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from fem import ThermalModel

from ..errors import AdvisorError
from .lumped import mean_coefficient, mean_initial
from .verdict import COMMON_LIMIT

EXPOSED_SHARE = 0.05  # our rule: an edge below 5 % of the largest coefficient is insulated
# for the conduction distance (h = 5 inside a hollow profile against 800 outside)


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
        The range of the number over the run, as coefficients and the conductivity vary with
        time and temperature (the same region's conductivity as ``value``: the range is over
        time, never across regions); ``high`` is the worst case.
    explanation : str
        What the length is and how to read the number.
    regions : dict of str to float
        The number at the start with each region's own conductivity (several regions only;
        ``value`` uses the lowest).
    """

    name: str
    value: float
    length: float
    heat_transfer_coefficient: float
    low: float
    high: float
    explanation: str
    regions: dict[str, float] = field(default_factory=dict)


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
    lowest conductivity is used (the worst case), at every temperature, and each region's own
    number is kept in ``regions``. V and A_s are the section's volume and exchanging surface
    (per metre of depth for planar sections, revolved for axisymmetric ones). The conduction
    distance counts an edge as insulated when its coefficient is below :data:`EXPOSED_SHARE`
    of the largest edge's (its explanation names the edges left out).
    """
    groups = model.exchange_groups
    if not groups:
        raise AdvisorError("the model has no edge that exchanges heat, so it has no Biot number")
    t0 = mean_initial(model)
    low_t, high_t = temperature_range or (t0, t0)
    h0 = mean_coefficient(model, t0, 0.0)
    conductivities = {r: float(m.conductivity_at(t0)) for r, m in model.materials.items()}
    k0 = min(conductivities.values())
    hs, ks = _coefficient_range(model, end_time, low_t, high_t)
    lengths, left_out = _lengths(model, t0)

    def number(name: str, length: float) -> BiotNumber:
        explanation = EXPLANATIONS[name]
        if name == "conduction_distance" and left_out:
            explanation += (
                f"; edges whose coefficient is below {100 * EXPOSED_SHARE:g} % of the "
                f"largest count as insulated here: {', '.join(left_out)}"
            )
        return BiotNumber(
            name,
            h0 * length / k0,
            length,
            h0,
            min(hs) * length / max(ks),
            max(hs) * length / min(ks),
            explanation,
            {r: h0 * length / k for r, k in conductivities.items()}
            if len(conductivities) > 1
            else {},
        )

    return tuple(number(name, length) for name, length in lengths.items())


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


def _lengths(model: ThermalModel, temperature: float) -> tuple[dict[str, float], list[str]]:
    """The length scales in m, in report order (4A/P only for planar sections), and the
    exchanging edge groups the conduction distance counts as insulated."""
    groups = model.exchange_groups
    facts = model.section.facts
    exposed_surface = sum(facts.surface_areas[g] for g in groups)
    lengths = {"volume_to_surface": facts.volume / exposed_surface}
    if not facts.axisymmetric:
        exposed_length = sum(facts.edge_lengths[g] for g in groups)
        lengths["four_area_over_perimeter"] = 4 * facts.area / exposed_length
    exposed, left_out = exposed_groups(model, temperature)
    lengths["conduction_distance"] = model.section.max_distance_to(exposed)
    return lengths, left_out


def exposed_groups(model: ThermalModel, temperature: float) -> tuple[list[str], list[str]]:
    """The exchanging edge groups whose coefficient at the start (each condition linearised
    at ``temperature`` °C) is at least :data:`EXPOSED_SHARE` of the largest, and the others
    described as "name (h = 5 W/(m²·K))"."""
    coefficients = dict.fromkeys(model.exchange_groups, 0.0)
    for name, condition in model.conditions():
        if name in coefficients and condition.flows:
            coefficients[name] += condition.linearised(temperature, 0.0).coefficient
    largest = max(coefficients.values(), default=0.0)
    kept = [g for g, h in coefficients.items() if h >= EXPOSED_SHARE * largest]
    left = [
        f"{g} (h = {h:.3g} W/(m²·K))"
        for g, h in coefficients.items()
        if h < EXPOSED_SHARE * largest
    ]
    return (kept or list(model.exchange_groups)), left


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
        from scipy.optimize import minimize_scalar  # 0.12 s to import: coefficients of T only

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
    # The lowest conductivity at each temperature, as the value uses: a range over time and
    # temperature, not across regions (those are BiotNumber.regions).
    ks = [
        min(float(m.conductivity_at(float(t_))) for m in model.materials.values())
        for t_ in np.linspace(low_t, high_t, 9)
    ]
    return hs, ks
