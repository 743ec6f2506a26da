"""The slowest mode against the lumped model: how fast the last temperature difference dies
away compared with the rate one temperature would give.

The field's slowest decay is exp(−λ₁·t) with λ₁ the smallest generalised eigenvalue of the
model's operator (:func:`fem.modes.slowest_eigenpair`). A lumped model decays at
h·A_s/(ρ·c·V). Their ratio does not depend on time: near 1 the lumped model is right about the
rate; below 1 the part is slower than the lumped model says. It implies the coefficient
h_equivalent = λ₁·ρ·c·V/A_s that a lumped model would need to decay at the true rate.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fem import ConductionSystem, ThermalModel, assemble
from fem.modes import Eigenpair, slowest_eigenpair

from ..errors import AdvisorError
from .lumped import exchange_conductance, heat_capacity, mean_initial


@dataclass(frozen=True)
class SlowestMode:
    """The section's slowest decay against the lumped model's.

    Attributes
    ----------
    rate : float
        λ₁ in 1/s (e-folding time 1/λ₁).
    lumped_rate : float
        Σh·A_s / (ρ·c·V) in 1/s.
    ratio : float
        rate / lumped_rate (1 for a perfectly lumped part, below 1 when conduction lags).
    equivalent_coefficient : float
        The mean h in W/(m²·K) a lumped model would need to decay at ``rate``.
    core_to_mean : float
        Ratio of the mode shape's value at its largest to its volume mean: how much more the
        slowest point lags than the mean in the late stage (1 for a uniform mode).
    """

    rate: float
    lumped_rate: float
    ratio: float
    equivalent_coefficient: float
    core_to_mean: float


def slowest_mode(
    model: ThermalModel, system: ConductionSystem | None = None, pair: Eigenpair | None = None
) -> SlowestMode:
    """The first generalised eigenvalue of the model's operator at t = 0, every condition
    linearised at the initial mean temperature (radiation by its secant coefficient), against
    the lumped model's rate. ``system``: the model's assembled system, if there is one;
    ``pair``: that eigenpair, if already found.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel
    >>> air = Convection(heat_transfer_coefficient=10.0, ambient=20.0)
    >>> model = ThermalModel(Rectangle(0.02, 0.02).mesh(size=0.004),
    ...     Material(200.0, 2700.0, 900.0), {s: air for s in ("left", "right", "top", "bottom")},
    ...     initial_temperature=100.0)
    >>> round(slowest_mode(model).ratio, 3)  # Bi = 0.0005: the lumped rate is right
    1.0
    """
    if not model.exchange_groups and not model.fixed:
        raise AdvisorError("a part that exchanges no heat has no decaying mode")
    system = assemble(model) if system is None else system.for_model(model)
    t0 = mean_initial(model)
    if pair is None:
        pair = slowest_eigenpair(system, t0, 0.0)
    shape = np.abs(pair.shape)
    weights = system.volume_weights[pair.dofs]
    core_to_mean = float(shape.max() / (weights @ shape / weights.sum()))

    conductance, _ = exchange_conductance(model, t0, 0.0)
    capacity_total = heat_capacity(model, t0)
    lumped_rate = conductance / capacity_total if conductance > 0 else float("nan")
    surface = sum(model.section.facts.surface_areas[g] for g in model.exchange_groups)
    return SlowestMode(
        rate=pair.rate,
        lumped_rate=lumped_rate,
        ratio=pair.rate / lumped_rate if conductance > 0 else float("nan"),
        equivalent_coefficient=pair.rate * capacity_total / surface
        if surface > 0
        else float("nan"),
        core_to_mean=core_to_mean,
    )
