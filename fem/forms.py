"""Every scikit-fem form of the project: the weak form of transient conduction.

ρc ∫ ∂T/∂t v dV + ∫ k ∇T·∇v dV + ∫_Γ h T v dS = ∫_Γ h T∞ v dS

Planar sections are per metre of depth (dV = dA, dS = ds). Axisymmetric sections are revolved
about x = 0 with x the radius: dV = 2πr dA and dS = 2πr ds, so every quantity is for the whole
solid of revolution, and the axis needs no condition (the weight vanishes there). Coefficients
come in by keyword (``w.name``) so one form serves every region and edge group.
"""

import numpy as np
from skfem import BilinearForm, LinearForm
from skfem.helpers import dot, grad


def _measure(w):
    """dV/dA (or dS/ds): 2πr for axisymmetric sections, 1 for planar ones."""
    return 2.0 * np.pi * w.x[0] if w.axisymmetric else 1.0


@BilinearForm
def heat_capacity(u, v, w):
    """Capacity entries ∫ ρc φ_j φ_i dV; ``w.volumetric_heat_capacity`` in J/(m³·K)."""
    return w.volumetric_heat_capacity * u * v * _measure(w)


@BilinearForm
def conduction(u, v, w):
    """Stiffness entries ∫ k ∇φ_j·∇φ_i dV; ``w.conductivity`` in W/(m·K)."""
    return w.conductivity * dot(grad(u), grad(v)) * _measure(w)


@BilinearForm
def surface_exchange(u, v, w):
    """Robin entries ∫_Γ h φ_j φ_i dS; ``w.heat_transfer_coefficient`` in W/(m²·K)."""
    return w.heat_transfer_coefficient * u * v * _measure(w)


@LinearForm
def shape_integral(v, w):
    """∫ φ_i dV on cells (volume weights) or ∫ φ_i dS on facets (surface weights)."""
    return v * _measure(w)
