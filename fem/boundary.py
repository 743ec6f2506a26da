"""Boundary conditions, one per edge group."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import ModelError


@dataclass(frozen=True)
class Convection:
    """Heat exchange with a fluid: q = h·(T∞ − T) into the part (a Robin condition).

    Parameters
    ----------
    heat_transfer_coefficient : float
        h in W/(m²·K); > 0.
    ambient : float
        Fluid temperature T∞ in °C; above absolute zero.
    """

    heat_transfer_coefficient: float
    ambient: float

    def __post_init__(self) -> None:
        h = self.heat_transfer_coefficient
        if not np.isfinite(h) or h <= 0:
            raise ModelError(
                f"Convection heat_transfer_coefficient must be a finite value > 0 W/(m^2*K), "
                f"got {h!r}; use Insulated() for an edge without heat exchange"
            )
        if not np.isfinite(self.ambient) or self.ambient <= -273.15:
            raise ModelError(
                f"Convection ambient must be a temperature above -273.15 degC, "
                f"got {self.ambient!r}"
            )


@dataclass(frozen=True)
class Insulated:
    """No heat flow across the edge: an insulated face or a symmetry line.

    Parameters
    ----------
    reason : str
        ``"insulated"``, ``"symmetry"`` or ``"axis"`` (the axis of an axisymmetric section);
        reported, with no effect on the equations.
    """

    reason: str = "insulated"

    def __post_init__(self) -> None:
        if self.reason not in ("insulated", "symmetry", "axis"):
            raise ModelError(
                f"Insulated reason must be 'insulated', 'symmetry' or 'axis', got {self.reason!r}"
            )


BoundaryCondition = Convection | Insulated
