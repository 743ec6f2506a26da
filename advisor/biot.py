"""Biot numbers of a section, each with the length scale it uses and why."""

from __future__ import annotations

from dataclasses import dataclass

from fem import ThermalModel

from .errors import AdvisorError

COMMON_LIMIT = 0.1  # common practice: lumped estimates are usually accepted below Bi = 0.1


@dataclass(frozen=True)
class BiotNumber:
    """Bi = h·L / k for one choice of the length L.

    Attributes
    ----------
    name : str
        Short identifier of the length scale.
    value : float
        The Biot number (dimensionless).
    length : float
        The length scale L in m.
    heat_transfer_coefficient : float
        The surface-weighted mean h over the heat-exchanging edges in W/(m²·K).
    explanation : str
        What the length is and how to read the number.
    """

    name: str
    value: float
    length: float
    heat_transfer_coefficient: float
    explanation: str


def biot_numbers(model: ThermalModel) -> tuple[BiotNumber, ...]:
    """Biot numbers of the model's section under its convective conditions.

    Only edges that exchange heat count as exposed. With several coefficients the mean
    weighted by surface area is used. V and A_s are the section's volume and exchanging
    surface (per metre of depth for planar sections, revolved for axisymmetric ones).
    """
    exchange = model.convection
    if not exchange:
        raise AdvisorError("the model has no edge that exchanges heat, so it has no Biot number")
    facts = model.section.facts
    surfaces = {n: facts.surface_areas[n] for n in exchange}
    exposed = sum(surfaces.values())
    h_mean = sum(c.heat_transfer_coefficient * surfaces[n] for n, c in exchange.items()) / exposed
    k = model.material.conductivity
    volume_to_surface = facts.volume / exposed
    farthest = model.section.max_distance_to(exchange)
    return (
        BiotNumber(
            "volume_to_surface",
            h_mean * volume_to_surface / k,
            volume_to_surface,
            h_mean,
            "length = volume / exchanging surface (V/A_s; planar: area / exposed perimeter); "
            "the number the lumped rule of thumb "
            f"uses: below {COMMON_LIMIT} (common practice) one temperature usually stands for "
            "the part",
        ),
        BiotNumber(
            "conduction_distance",
            h_mean * farthest / k,
            farthest,
            h_mean,
            "length = largest distance from any point of the section to a heat-exchanging "
            "edge; the ratio of the slowest internal path's resistance to the surface "
            "resistance",
        ),
    )
