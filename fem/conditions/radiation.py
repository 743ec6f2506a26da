"""Grey-body radiation to large surroundings: q = εσ(T_sur⁴ − T⁴) into the part, temperatures
in kelvin.

One linearisation serves the lumped model, the Biot numbers and the slowest mode: the secant
coefficient h_r = εσ(T² + T_s²)(T + T_s), evaluated at the part's temperature T. It gives the
exact radiated flux at that temperature, h_r·(T_s − T) = εσ(T_s⁴ − T⁴), so the lumped model
integrates the true law, and it tends to the tangent 4εσT³ as T → T_s. The field equations use
the law itself, with its exact tangent 4εσT³ for Newton's method.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ModelError
from ..schedules import Schedule, schedule_text
from ..temperatures import to_kelvin
from .base import Condition, Linearised, SurfaceEdge, register, temperature_field

STEFAN_BOLTZMANN = 5.670374419e-8  # W/(m²·K⁴), CODATA 2018 exact value


@register
@dataclass(frozen=True)
class Radiation(Condition):
    """Grey-body radiation to large surroundings: q = ε·σ·(T_sur⁴ − T⁴), temperatures in
    kelvin inside the solver.

    Parameters
    ----------
    emissivity : float
        ε in [0, 1].
    surroundings : float or schedule
        Temperature of the surroundings in °C.
    """

    name = "radiation"
    label = "radiation"
    linear = False
    exchanges = True
    units = {"surroundings": "_degC"}

    emissivity: float
    surroundings: float | Schedule

    def __post_init__(self) -> None:
        e = self.emissivity
        if not (isinstance(e, int | float) and not isinstance(e, bool) and 0 <= e <= 1):
            raise ModelError(
                f"Radiation emissivity must be in [0, 1], got {e!r}", argument="emissivity"
            )
        surroundings = temperature_field(
            self.surroundings, "Radiation surroundings", "surroundings"
        )
        object.__setattr__(self, "surroundings", surroundings)

    def driving_temperatures(self, end_time: float) -> tuple[float, ...]:
        return self.surroundings.extremes(end_time)

    def outflow(self, edge: SurfaceEdge, temperature: np.ndarray, time: float) -> np.ndarray:
        """∫ εσ(T⁴ − T_sur⁴) φ_i dS: the heat radiated away from each node, W."""
        t = to_kelvin(edge.interpolate(temperature))
        s = to_kelvin(self.surroundings(time))
        return edge.integrate(self.emissivity * STEFAN_BOLTZMANN * (t**4 - s**4))

    def outflow_tangent(self, edge: SurfaceEdge, temperature: np.ndarray, time: float):
        """∫ 4εσT³ φ_j φ_i dS, W/K."""
        t = to_kelvin(edge.interpolate(temperature))
        return edge.exchange(4.0 * self.emissivity * STEFAN_BOLTZMANN * t**3)

    def linearised(self, temperature: float, time: float) -> Linearised:
        """h_r = εσ(T² + T_s²)(T + T_s) (the secant; see the module's note)."""
        surroundings = self.surroundings(time)
        t, s = to_kelvin(temperature), to_kelvin(surroundings)
        return Linearised(
            self.emissivity * STEFAN_BOLTZMANN * (t * t + s * s) * (t + s), surroundings
        )

    def describe(self, end_time: float) -> str:
        return (
            f"radiation, emissivity {self.emissivity:.3g}, surroundings at "
            f"{schedule_text(self.surroundings, '°C', end_time)}"
        )
