"""The temperature-dependent terms of a region by product approximation: the nonlinear
functions are interpolated from their nodal values like the temperature itself.

Stored heat and conduction of a region whose ρc or k depends on temperature are

    C_i(T) = Σ_j M⁰_ij·H(T_j),   K(T)·T → Σ_j K⁰_ij·Φ(T_j),   Φ(T) = ∫ k dT (Kirchhoff),

M⁰ = ∫φ_iφ_j dV and K⁰ = ∫∇φ_i·∇φ_j dV the region's matrices of unit properties, assembled
once (Christie, Griffiths, Mitchell & Zienkiewicz, "Product approximation for non-linear
problems in the finite element method", *IMA J. Numer. Anal.* 1, 1981, from memory; for
conduction the Kirchhoff transform of Carslaw & Jaeger, ch. I, applied to the interpolant). The
heat stored is still Σ_j m_j·H(T_j) with m_j = Σ_i M⁰_ij, so the discrete energy balance holds
exactly; a steady k(T) field has Φ harmonic, which the interpolant reproduces at the nodes.

A residual then costs the tables at the region's nodes and one sparse product per term, and a
tangent is the unit matrix with its columns scaled (M⁰·diag(ρc(T_j)), K⁰·diag(k(T_j))): a
product over its stored entries, no element loop.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from skfem import asm

from . import forms
from .materials import Material, PropertyTable


class RegionProducts:
    """Unit matrices of one region and its nonlinear terms by product approximation.

    Parameters
    ----------
    basis : skfem.CellBasis
        The region's basis (its elements only).
    axisymmetric : bool
        Weight by 2πr for a section revolved about x = 0.
    material : Material
    reference : float
        Temperature where the enthalpy is zero, °C.
    """

    def __init__(self, basis, axisymmetric: bool, material: Material, reference: float):
        self.material, self.reference = material, reference
        self.nodes = np.unique(basis.element_dofs)
        self.size = basis.N
        self.varying_capacity = not material.constant_capacity
        # An orthotropic tensor has no Kirchhoff transform: the system integrates it itself.
        self.varying_conductivity = (
            isinstance(material.conductivity, PropertyTable) and material.orthotropic is None
        )
        if self.varying_capacity:
            self._mass = _unit(
                forms.heat_capacity, basis, axisymmetric, "volumetric_heat_capacity"
            )
        if self.varying_conductivity:
            self._stiffness = _unit(forms.conduction, basis, axisymmetric, "conductivity")

    def stored(self, temperature: np.ndarray) -> np.ndarray:
        """Σ_j M⁰_ij·H(T_j): the region's heat stored per node, J (planar: J/m)."""
        nodal = self.material.enthalpy(temperature[self.nodes], self.reference)
        return self._mass[0] @ nodal

    def capacity_tangent(self, temperature: np.ndarray) -> sp.csr_matrix:
        """dC/dT = M⁰·diag(ρc(T_j)), J/K."""
        return _scaled(self._mass, self.material.heat_capacity_at(temperature[self.nodes]))

    def conduction(self, temperature: np.ndarray) -> np.ndarray:
        """Σ_j K⁰_ij·Φ(T_j), Φ = ∫ k dT from the reference: the heat conducted out of each
        node, W."""
        table = self.material.conductivity
        nodal = table.integral(temperature[self.nodes], self.reference)
        return self._stiffness[0] @ nodal

    def conduction_tangent(self, temperature: np.ndarray) -> sp.csr_matrix:
        """d(conduction)/dT = K⁰·diag(k(T_j)), W/K."""
        values = self.material.conductivity_at(temperature[self.nodes])
        return _scaled(self._stiffness, values)


def _scaled(unit, values: np.ndarray) -> sp.csr_matrix:
    """The full unit matrix with the column of the region's k-th node scaled by values[k]."""
    _, columns, matrix = unit
    data = matrix.data * values[columns]
    return sp.csr_matrix((data, matrix.indices, matrix.indptr), shape=matrix.shape)


def _unit(form, basis, axisymmetric: bool, name: str):
    """The unit matrix with its columns numbered by the region's nodes (for products with
    nodal values of the region), those column positions, and the full matrix."""
    matrix = asm(form, basis, axisymmetric=axisymmetric, **{name: 1.0}).tocsr()
    matrix.sum_duplicates()
    matrix.sort_indices()
    nodes = np.unique(basis.element_dofs)
    position = np.full(basis.N, -1, dtype=np.int64)
    position[nodes] = np.arange(nodes.size)
    columns = position[matrix.indices]
    restricted = sp.csr_matrix((matrix.data, columns, matrix.indptr), shape=(basis.N, nodes.size))
    return restricted, columns, matrix
