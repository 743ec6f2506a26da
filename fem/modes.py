"""The slowest eigenpair of a model: how fast its last temperature difference dies away.

The semi-discrete system M·T' + A·T = b decays, once the fast modes are gone, like
exp(−λ₁·t) with λ₁ the smallest generalised eigenvalue of A·φ = λ·M·φ on the free degrees of
freedom (a fixed temperature holds its nodes). A is the operator with every boundary
condition linearised at one surface temperature (:meth:`ConductionSystem.linearised_operator`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse.linalg as spla
from scipy.linalg import eigh

from .system import ConductionSystem

DENSE_LIMIT = 400  # below this many unknowns a dense eigensolver is simpler and safe


@dataclass(frozen=True)
class Eigenpair:
    """The smallest generalised eigenpair on the free degrees of freedom.

    Attributes
    ----------
    rate : float
        λ₁ in 1/s (e-folding time 1/λ₁).
    shape : ndarray
        The mode φ₁ at the free degrees of freedom (arbitrary scale and sign).
    dofs : ndarray
        Those degrees of freedom.
    """

    rate: float
    shape: np.ndarray
    dofs: np.ndarray


def slowest_eigenpair(
    system: ConductionSystem, temperature: float, time: float = 0.0
) -> Eigenpair:
    """λ₁ and φ₁ of A·φ = λ·M·φ, k, ρc and the conditions linearised at ``temperature`` °C and
    ``time`` s: dense below :data:`DENSE_LIMIT` unknowns, shift-invert Lanczos above."""
    free = system.free_dofs
    operator = system.linearised_operator(temperature, time)
    a = operator[free][:, free].tocsc()
    # ρc at the same temperature as k and h (a table's nominal value would mix two states)
    capacity = system.capacity_tangent(np.full(system.size, float(temperature)))
    m = capacity[free][:, free].tocsc()
    if len(free) <= DENSE_LIMIT:
        values, vectors = eigh(a.toarray(), m.toarray(), subset_by_index=[0, 0])
    else:
        values, vectors = spla.eigsh(a, k=1, M=m, sigma=0.0, which="LM")
    return Eigenpair(float(values[0]), vectors[:, 0], free)
