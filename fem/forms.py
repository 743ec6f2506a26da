"""Every scikit-fem form of the project: the weak form of transient conduction.

ρc ∫ ∂T/∂t v dA + ∫ k ∇T·∇v dA + ∫_Γ h T v ds = ∫_Γ h T∞ v ds   (planar, per metre of depth)

Coefficients come in by keyword (``w.name``) so one form serves every region and edge group.
"""

from skfem import BilinearForm, LinearForm
from skfem.helpers import dot, grad


@BilinearForm
def heat_capacity(u, v, w):
    """Capacity (mass) entries ∫ ρc φ_j φ_i dA; ``w.volumetric_heat_capacity`` in J/(m³·K)."""
    return w.volumetric_heat_capacity * u * v


@BilinearForm
def conduction(u, v, w):
    """Stiffness entries ∫ k ∇φ_j·∇φ_i dA; ``w.conductivity`` in W/(m·K)."""
    return w.conductivity * dot(grad(u), grad(v))


@BilinearForm
def surface_exchange(u, v, w):
    """Robin matrix entries ∫_Γ h φ_j φ_i ds; ``w.heat_transfer_coefficient`` in W/(m²·K)."""
    return w.heat_transfer_coefficient * u * v


@LinearForm
def shape_integral(v, _):
    """∫ φ_i over the basis' domain: area weights on cells, length weights on facets."""
    return v
