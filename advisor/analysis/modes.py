"""The slowest mode of a section: how fast its last temperature difference dies away.

The semi-discrete system M·T' + A·T = b decays, once the fast modes are gone, like
exp(−λ₁·t) with λ₁ the smallest generalised eigenvalue of A·φ = λ·M·φ. A lumped model decays
at h·A_s/(ρ·c·V). Their ratio does not depend on time: near 1 the lumped model is right about
the rate; below 1 the part is slower than the lumped model says. It implies the coefficient
h_equivalent = λ₁·ρ·c·V/A_s that a lumped model would need to decay at the true rate.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse.linalg as spla
from scipy.linalg import eigh

from fem import ThermalModel, assemble
from fem.forms import KELVIN, STEFAN_BOLTZMANN

from ..errors import AdvisorError
from .lumped import exchange_conductance, heat_capacity, mean_initial

DENSE_LIMIT = 400  # below this many unknowns a dense eigensolver is simpler and safe


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


def slowest_mode(model: ThermalModel) -> SlowestMode:
    """The first generalised eigenvalue of the model's operator at t = 0 (radiation
    linearised at the initial temperature), by shift-invert Lanczos.

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
    system = assemble(model)
    t0 = mean_initial(model)
    operator = system.exchange_operator(0.0)
    for name, r in model.radiation.items():  # linearised: 4εσT³ about the mean temperature
        t = 0.5 * (t0 + r.surroundings(0.0)) + KELVIN
        matrix = system.edges[name].exchange_matrix  # ∫ φ_j φ_i dS
        operator = operator + 4 * r.emissivity * STEFAN_BOLTZMANN * t**3 * matrix
    capacity = system.capacity
    free = system.free_dofs
    a = operator[free][:, free].tocsc()
    m = capacity[free][:, free].tocsc()
    if len(free) <= DENSE_LIMIT:
        values, vectors = eigh(a.toarray(), m.toarray(), subset_by_index=[0, 0])
    else:
        values, vectors = spla.eigsh(a, k=1, M=m, sigma=0.0, which="LM")
    rate = float(values[0])
    shape = np.abs(vectors[:, 0])
    weights = system.volume_weights[free]
    core_to_mean = float(shape.max() / (weights @ shape / weights.sum()))

    conductance, _ = exchange_conductance(model, t0, 0.0)
    capacity_total = heat_capacity(model, t0)
    lumped_rate = conductance / capacity_total if conductance > 0 else float("nan")
    surface = sum(model.section.facts.surface_areas[g] for g in model.exchange_groups)
    return SlowestMode(
        rate=rate,
        lumped_rate=lumped_rate,
        ratio=rate / lumped_rate if conductance > 0 else float("nan"),
        equivalent_coefficient=rate * capacity_total / surface if surface > 0 else float("nan"),
        core_to_mean=core_to_mean,
    )
