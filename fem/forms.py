"""Every scikit-fem form of the project: the weak form of transient conduction.

ρc ∂T/∂t (as dH/dt, H = ∫ρc dT) + ∇·(−k ∇T) = q̇ in the section (−K ∇T with the
conductivity tensor K of an orthotropic region), with on its edges the heat
flux q(T, t) into the part that each boundary condition states (:mod:`fem.conditions`). The
edge forms know no particular condition: an exchange with a coefficient and a load with a flux,
either given at the quadrature points, serve every kind.

Planar sections are per metre of depth (dV = dA, dS = ds). Axisymmetric sections are revolved
about x = 0 with x the radius: dV = 2πr dA and dS = 2πr ds, so every quantity is for the whole
solid of revolution, and the axis needs no condition (the weight vanishes there). Coefficients
come in by keyword (``w.name``): numbers, or arrays at the quadrature points for properties
that depend on temperature.
"""

import numpy as np
from skfem import BilinearForm, LinearForm, asm
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
def conduction_tensor(u, v, w):
    """Stiffness entries ∫ (K ∇φ_j)·∇φ_i dV of an orthotropic region; K = [[k_xx, k_xy],
    [k_xy, k_yy]] from ``w.k_xx``, ``w.k_xy``, ``w.k_yy`` in W/(m·K) (x is r in an
    axisymmetric section, where the same form holds: ∇·q = (1/r)∂(r q_r)/∂r + ∂q_z/∂z)."""
    du, dv = grad(u), grad(v)
    flux_x = w.k_xx * du[0] + w.k_xy * du[1]
    flux_y = w.k_xy * du[0] + w.k_yy * du[1]
    return (flux_x * dv[0] + flux_y * dv[1]) * _measure(w)


def conduction_matrix(basis, conductivity, axisymmetric: bool):
    """The stiffness of one region for a ``conductivity`` k (W/(m·K)) or, orthotropic, its
    (2, 2) tensor: the isotropic form stays the one for a number."""
    if np.ndim(conductivity) == 0:
        return asm(conduction, basis, conductivity=float(conductivity), axisymmetric=axisymmetric)
    k = np.asarray(conductivity, dtype=float)
    return asm(
        conduction_tensor,
        basis,
        k_xx=float(k[0, 0]),
        k_xy=float(k[0, 1]),
        k_yy=float(k[1, 1]),
        axisymmetric=axisymmetric,
    )


@BilinearForm
def conduction_tangent(u, v, w):
    """Derivative of the conduction residual for k(T): ∫ (k ∇δ + k'(T) δ ∇T)·∇φ_i dV.

    ``w.conductivity`` and ``w.conductivity_slope`` (W/(m·K²)) at the quadrature points,
    ``w.temperature`` the current field."""
    flux = w.conductivity * grad(u) + w.conductivity_slope * u * grad(w.temperature)
    return dot(flux, grad(v)) * _measure(w)


@LinearForm
def conduction_residual(v, w):
    """∫ k(T) ∇T·∇φ_i dV for the current field ``w.temperature``."""
    return w.conductivity * dot(grad(w.temperature), grad(v)) * _measure(w)


@LinearForm
def enthalpy(v, w):
    """∫ H(T) φ_i dV with ``w.enthalpy`` = ∫ρc dT (J/m³) at the quadrature points."""
    return w.enthalpy * v * _measure(w)


@BilinearForm
def surface_exchange(u, v, w):
    """Robin entries ∫_Γ c φ_j φ_i dS; ``w.coefficient`` in W/(m²·K), a number or an array at
    the quadrature points (a condition's linear coefficient or its tangent)."""
    return w.coefficient * u * v * _measure(w)


@LinearForm
def surface_load(v, w):
    """∫_Γ q φ_i dS; ``w.flux`` in W/m², a number or an array at the quadrature points."""
    return w.flux * v * _measure(w)


@LinearForm
def shape_integral(v, w):
    """∫ φ_i dV on cells (volume weights) or ∫ φ_i dS on facets (surface weights)."""
    return v * _measure(w)
