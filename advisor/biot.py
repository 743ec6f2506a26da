"""Biot numbers of a section, each with the length scale it uses and why."""

from __future__ import annotations

from dataclasses import dataclass

from fem import ThermalModel

from .errors import AdvisorError
from .lumped import LumpedModel, exchange_conductance

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
    weighted by surface area is used, at t = 0, radiation linearised at the initial
    temperature; with several materials the lowest conductivity (the worst case). V and A_s
    are the section's volume and exchanging surface (per metre of depth for planar sections,
    revolved for axisymmetric ones).
    """
    groups = model.exchange_groups
    if not groups:
        raise AdvisorError("the model has no edge that exchanges heat, so it has no Biot number")
    facts = model.section.facts
    exposed = sum(facts.surface_areas[n] for n in groups)
    lumped = LumpedModel.of(model)
    h_mean = exchange_conductance(model, lumped.initial_temperature, 0.0)[0] / exposed
    k = min(m.nominal_conductivity for m in model.materials.values())
    volume_to_surface = facts.volume / exposed
    farthest = model.section.max_distance_to(groups)
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
