"""Material properties of a solid region."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import ModelError


@dataclass(frozen=True)
class Material:
    """A solid with constant properties.

    Parameters
    ----------
    conductivity : float
        Thermal conductivity k in W/(m·K); > 0.
    density : float
        Density ρ in kg/m³; > 0.
    specific_heat : float
        Specific heat capacity c in J/(kg·K); > 0.
    name : str
        A label for reports.

    Examples
    --------
    >>> steel = Material(conductivity=45.0, density=7850.0, specific_heat=475.0)
    >>> round(steel.diffusivity * 1e6, 2)  # mm²/s
    12.07
    """

    conductivity: float
    density: float
    specific_heat: float
    name: str = "material"

    def __post_init__(self) -> None:
        for field_name, unit in (
            ("conductivity", "W/(m*K)"),
            ("density", "kg/m^3"),
            ("specific_heat", "J/(kg*K)"),
        ):
            value = getattr(self, field_name)
            if not np.isfinite(value) or value <= 0:
                raise ModelError(
                    f"Material {field_name} must be a finite value > 0 {unit}, got {value!r}"
                )

    @property
    def volumetric_heat_capacity(self) -> float:
        """ρ·c in J/(m³·K)."""
        return self.density * self.specific_heat

    @property
    def diffusivity(self) -> float:
        """Thermal diffusivity α = k/(ρ·c) in m²/s."""
        return self.conductivity / self.volumetric_heat_capacity
