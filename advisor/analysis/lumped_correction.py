"""The corrected lumped model's coefficient factor, from the section's correction length.

The corrected model is the classical one (:mod:`advisor.analysis.lumped`) with every
coefficient replaced by h_eff = h / (1 + h·s/k), s the section's correction length: the
first-order perturbation of the slowest mode for small Biot number, found by one steady solve
on the model's own mesh (:mod:`fem.correction_length`). A lumped model with h_eff then decays
at the slowest mode's rate to second order in Bi, for any section. For a slab, a long cylinder
and a sphere s = L/3, R/4, R/5, which is the improved lumped model h_eff = h / (1 + Bi/β),
β = 3, 4, 5 with Bi on the half-thickness or radius, of Cotta & Mikhailov, *Heat Conduction:
Lumped Analysis, Integral Transforms, Symbolic Computation*, Wiley 1997, ch. 2 (Hermite
H1,1/H0,0 approximation; from memory). The shape factor reported is β = d/s with d the
largest conduction distance, so Bi_d/β = h·s/k.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from fem import ThermalModel

from .lumped_terms import mean_initial

if TYPE_CHECKING:
    from .biot import BiotNumber


@dataclass(frozen=True)
class Correction:
    """The corrected lumped model's coefficient factor and how it was found.

    Attributes
    ----------
    shape : float
        β = d/s with d the largest conduction distance: h_eff = h/(1 + Bi_d/β).
    scale : float
        h_eff/h = 1/(1 + h·s/k) at the start.
    length : float
        s in m, the correction length, quoted with ``conductivity``.
    conductivity : float
        k in W/(m·K) that s and the Biot numbers are quoted with (the lowest of the regions at
        the initial mean temperature); every region's own k enters the solve.
    note : str
        How it was found, in words.
    """

    shape: float
    scale: float
    length: float
    conductivity: float
    note: str


def correction_factor(model: ThermalModel, biot: Sequence[BiotNumber]) -> Correction:
    """The corrected lumped model's factor from the section's own correction length.

    One steady solve (:func:`fem.correction_length.correction_length`) at the initial mean
    temperature, coefficients linearised there at t = 0, gives the internal resistance
    R = s/k; h_eff = h/(1 + h̄·R) with h̄ the mean coefficient of the Biot numbers.
    """
    from fem.correction_length import correction_length

    by_name = {b.name: b for b in biot}
    distance = by_name["conduction_distance"]
    t0 = mean_initial(model)
    found = correction_length(model, t0, 0.0)
    conductivity = min(float(m.conductivity_at(t0)) for m in model.materials.values())
    length = found.length(conductivity)
    beta = distance.length / length
    scale = found.coefficient_scale(distance.heat_transfer_coefficient)
    regions = len(model.materials)
    which_k = (
        f"k = {conductivity:.4g} W/(m·K)"
        if regions == 1
        else f"each region's own k in the solve, s quoted with the lowest, {conductivity:.4g} "
        "W/(m·K)"
    )
    if not all(m.is_constant for m in model.materials.values()):
        which_k += f", properties at the initial mean {t0:.4g} °C"
    note = (
        f"correction length s = {1000 * length:.4g} mm from one steady solve on the section "
        f"(the slowest mode to first order in Bi; {which_k}); β = d/s = {beta:.4g} with the "
        f"conduction distance d = {1000 * distance.length:.4g} mm (slab 3, long cylinder 4, "
        f"sphere 5): h_eff = h/(1 + {distance.value:.3g}/{beta:.4g})"
    )
    return Correction(float(beta), float(scale), float(length), conductivity, note)


def correction(model: ThermalModel, biot: Sequence[BiotNumber]) -> tuple[float, float, str]:
    """β, the coefficient scale h_eff/h and the note of :func:`correction_factor`."""
    found = correction_factor(model, biot)
    return found.shape, found.scale, found.note
