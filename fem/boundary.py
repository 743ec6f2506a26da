"""Former home of the boundary conditions, now :mod:`fem.conditions` (one module per kind);
kept so that existing imports keep working."""

from .conditions import (
    BoundaryCondition,
    Condition,
    Convection,
    FixedTemperature,
    HeatFlux,
    Insulated,
    Radiation,
    conditions,
)
from .temperatures import ABSOLUTE_ZERO

__all__ = [
    "ABSOLUTE_ZERO",
    "BoundaryCondition",
    "Condition",
    "Convection",
    "FixedTemperature",
    "HeatFlux",
    "Insulated",
    "Radiation",
    "conditions",
]
