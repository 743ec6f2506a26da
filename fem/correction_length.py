"""The internal resistance of a section to first order in the Biot number: one steady solve.

The slowest mode of ∇·(k∇u) = −λ·ρc·u with k·∂u/∂n = −h·u on the exposed edges Γ (the others
insulated) is, for small h, u = 1 + u₁ + O(h²) with λ = λ₀ + O(h²), λ₀ = ∫_Γ h / ∫ρc. The
first-order problem is −∇·(k∇u₁) = λ₀·ρc in the section, k·∂u₁/∂n = −h on Γ (compatible: the
load and the outflow balance) and ∫ρc·u₁ = 0 (the normalisation). The Rayleigh quotient
λ = (∫k|∇u|² + ∫_Γ h·u²) / ∫ρc·u², stationary at the mode, is then exact to second order;
with the weak form of u₁ tested by u₁ itself (∫k|∇u₁|² = −∫_Γ h·u₁) it reduces to

    λ = λ₀·(1 + ∫_Γ h·u₁ / ∫_Γ h) + O(h³).

u₁ is proportional to h: with h = h̄·ω (h̄ the area-weighted mean coefficient, ω the relative
one) u₁ = h̄·w, where −∇·(k∇w) = (A_s/∫ρc)·ρc, k·∂w/∂n = −ω on Γ, ∫ρc·w = 0. So
λ = λ₀·(1 − h̄·R) + O(h³) with R = −∫_Γ ω·w / A_s > 0 the internal resistance (m²·K/W), and a
lumped model with h_eff = h/(1 + h̄·R) decays at the slowest mode's rate to second order in Bi.
For one material R = s/k with s = −(area-weighted mean of w·k over Γ) the correction length:
L/3, R/4, R/5 for a slab, a long cylinder and a sphere (β = 3, 4, 5 on the half-thickness or
radius), and whatever the section gives otherwise. With several regions each region's own k
and ρc enter the operator and the load, so R is the section's true first-order resistance; a
length follows from it with whichever conductivity one quotes Biot numbers with.

The pure-Neumann problem is solved with one degree of freedom held at zero (the load is
compatible, so the dropped equation holds by itself), then shifted to zero capacity-weighted
mean. Properties that depend on temperature are taken at one temperature, coefficients
linearised there (:meth:`fem.conditions.Condition.linearised`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse.linalg as spla
from skfem import Basis, FacetBasis, asm

from . import forms
from .assembly import element_for
from .errors import ModelError
from .interfaces import interface_stiffness, interface_terms
from .linalg import NESTED_DISSECTION_FROM
from .model import ThermalModel
from .ordering import nested_dissection


@dataclass(frozen=True)
class CorrectionLength:
    """The first-order internal resistance of a section to its exposed edges.

    Attributes
    ----------
    resistance : float
        R in m²·K/W: the slowest mode decays at λ₀·(1 − h̄·R) + O(h³).
    mean_coefficient : float
        h̄, the area-weighted mean coefficient of the exposed edges, W/(m²·K) (the weights of
        the edges in the solve are their coefficients relative to it).
    exposed_area : float
        Σ A of the exposed edge groups, m² (planar: m per metre of depth).
    temperature : float
        Where properties and coefficients were evaluated, °C.
    """

    resistance: float
    mean_coefficient: float
    exposed_area: float
    temperature: float

    def length(self, conductivity: float) -> float:
        """s = k·R in m, the correction length quoted with ``conductivity`` W/(m·K)."""
        return conductivity * self.resistance

    def coefficient_scale(self, coefficient: float | None = None) -> float:
        """1/(1 + h·R): h_eff/h for ``coefficient`` W/(m²·K) (default the mean one)."""
        h = self.mean_coefficient if coefficient is None else coefficient
        return 1.0 / (1.0 + h * self.resistance)


def correction_length(
    model: ThermalModel, temperature: float, time: float = 0.0
) -> CorrectionLength:
    """The internal resistance R of the model's section (see the module notes).

    Parameters
    ----------
    model : ThermalModel
        Its mesh, element order, regions and exposed groups (``model.exchange_groups``) are
        used; no edge may hold a fixed temperature.
    temperature : float
        °C at which conductivity, heat capacity and coefficients are taken.
    time : float
        s at which coefficients are taken (their relative sizes weight the edges).

    Returns
    -------
    CorrectionLength

    Raises
    ------
    ModelError
        If no edge exchanges heat or an edge holds its temperature (no pure-Neumann problem).

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Insulated, Material, ThermalModel
    >>> strip = Rectangle(0.002, 0.01, edge_names={"top": "cooled", "bottom": "mid",
    ...     "left": "ends", "right": "ends"}).mesh(0.001)
    >>> air = Convection(heat_transfer_coefficient=50.0, ambient=20.0)
    >>> model = ThermalModel(strip, Material(20.0, 5000.0, 800.0),
    ...     {"cooled": air, "mid": Insulated(), "ends": Insulated()}, initial_temperature=100.0,
    ...     element_order=2)
    >>> round(correction_length(model, 100.0).length(20.0) / 0.01, 4)  # a slab: L/3
    0.3333
    """
    groups = model.exchange_groups
    if not groups:
        raise ModelError(
            "no edge exchanges heat, so there is no internal resistance to the surroundings; "
            "give an edge group a Convection or Radiation condition",
            argument="boundaries",
        )
    if model.fixed:
        raise ModelError(
            f"edge groups {sorted(model.fixed)} hold their temperature: the correction length "
            "needs every edge to exchange heat or be insulated",
            argument="boundaries",
        )
    mesh, axisymmetric = model.section.mesh, model.section.axisymmetric
    element = element_for(model)
    basis = Basis(mesh, element)
    stiffness, capacity = _matrices(model, basis, element, temperature)
    if model.interfaces:  # contact resistances are internal resistances too
        terms = interface_terms(model, element, basis)
        stiffness = (stiffness + interface_stiffness(terms, basis.N)).tocsr()
    weights = {
        g: asm(
            forms.shape_integral,
            FacetBasis(mesh, element, facets=mesh.boundaries[g]),
            axisymmetric=axisymmetric,
        )
        for g in groups
    }
    areas = {g: float(weights[g].sum()) for g in groups}
    exposed = sum(areas.values())
    coefficients = _coefficients(model, temperature, time)
    mean = sum(coefficients[g] * areas[g] for g in groups) / exposed
    # edges weighted by their coefficients; all alike when none has one yet (h = 0 at t)
    relative = {g: coefficients[g] / mean if mean > 0 else 1.0 for g in groups}
    outflow = sum(relative[g] * weights[g] for g in groups)

    stored = capacity @ np.ones(basis.N)  # ∫ρc φ_i dV
    load = exposed / stored.sum() * stored - outflow  # sums to zero: compatible
    w = np.zeros(basis.N)
    held = np.arange(1, basis.N)  # dof 0 held at zero fixes the constant
    w[held] = _solve_definite(stiffness[held][:, held], load[held], basis.doflocs[:, held])
    w -= (stored @ w) / stored.sum()
    resistance = -float(outflow @ w) / exposed
    return CorrectionLength(resistance, float(mean), float(exposed), float(temperature))


def _solve_definite(matrix, load: np.ndarray, points: np.ndarray) -> np.ndarray:
    """x with matrix·x = load for a symmetric positive definite ``matrix``: SuperLU in
    symmetric mode without pivoting, ordered as the solver's step matrices are
    (:mod:`fem.linalg`): minimum degree, or nested dissection of the mesh for large ones."""
    order = None
    if len(load) >= NESTED_DISSECTION_FROM:
        order = nested_dissection(matrix.tocsr(), points)
        matrix, load = matrix[order][:, order], load[order]
    factor = spla.splu(
        matrix.tocsc(),
        permc_spec="NATURAL" if order is not None else "MMD_AT_PLUS_A",
        diag_pivot_thresh=0.0,
        options={"SymmetricMode": True},
    )
    solution = factor.solve(load)
    if order is None:
        return solution
    unpermuted = np.empty_like(solution)
    unpermuted[order] = solution
    return unpermuted


def _matrices(model: ThermalModel, basis: Basis, element, temperature: float):
    """K with each region's k(T) and M with its ρc(T), at one ``temperature``."""
    mesh, axisymmetric = model.section.mesh, model.section.axisymmetric
    stiffness = capacity = None
    for region, cells in mesh.subdomains.items():
        material = model.materials[region]
        whole = len(cells) == mesh.t.shape[1]
        region_basis = basis if whole else Basis(mesh, element, elements=cells)
        conduction = material.conduction_at(temperature)  # k, or an orthotropic tensor
        k = forms.conduction_matrix(region_basis, conduction, axisymmetric)
        c = asm(
            forms.heat_capacity,
            region_basis,
            volumetric_heat_capacity=float(material.heat_capacity_at(temperature)),
            axisymmetric=axisymmetric,
        )
        stiffness = k if stiffness is None else stiffness + k
        capacity = c if capacity is None else capacity + c
    return stiffness.tocsr(), capacity.tocsr()


def _coefficients(model: ThermalModel, temperature: float, time: float) -> dict[str, float]:
    """Σ linearised h of the exchanging conditions of each exposed group, W/(m²·K)."""
    found = dict.fromkeys(model.exchange_groups, 0.0)
    for name, condition in model.conditions():
        if condition.exchanges:
            found[name] += max(condition.linearised(temperature, time).coefficient, 0.0)
    return found
