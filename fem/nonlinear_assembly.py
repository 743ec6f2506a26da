"""Conduction with k(T) by product approximation: the Kirchhoff transform Φ(T) = ∫k dT is
interpolated from its nodal values like the temperature itself,

    K(T)·T → Σ_j K⁰_ij·Φ(T_j),

K⁰ = ∫∇φ_i·∇φ_j dV the region's stiffness for a unit conductivity, assembled once (Christie,
Griffiths, Mitchell & Zienkiewicz, "Product approximation for non-linear problems in the
finite element method", *IMA J. Numer. Anal.* 1, 1981, from memory; the Kirchhoff transform as
in Carslaw & Jaeger, ch. I). A steady k(T) field has Φ harmonic, which the interpolant
reproduces at the nodes of a wall exactly. A residual then costs the table at the region's
nodes and one sparse product, and the tangent K⁰·diag(k(T_j)) is the unit matrix with its
columns scaled: a product over its stored entries, no element loop.

The stored heat stays ∫H(T)φ_i dV with H at the quadrature points (:mod:`fem.quadrature`).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from skfem import asm

from . import forms
from .materials import Material, PropertyTable


class RegionProducts:
    """The unit stiffness of one region and its conduction with k(T) by product
    approximation (nothing is assembled when k is one number).

    Parameters
    ----------
    basis : skfem.CellBasis
        The region's basis (its elements only).
    axisymmetric : bool
        Weight by 2πr for a section revolved about x = 0.
    material : Material
    reference : float
        Temperature where Φ = ∫k dT is zero, °C.
    """

    def __init__(self, basis, axisymmetric: bool, material: Material, reference: float):
        self.material, self.reference = material, reference
        self.nodes = np.unique(basis.element_dofs)
        # An orthotropic tensor has no Kirchhoff transform: the system integrates it itself.
        self.varying_conductivity = (
            isinstance(material.conductivity, PropertyTable) and material.orthotropic is None
        )
        if self.varying_conductivity:
            self._stiffness = _unit(forms.conduction, basis, axisymmetric, "conductivity")

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


def nodal_conductivity(system, temperature: np.ndarray) -> np.ndarray:
    """k at each node of ``system`` at the nodal ``temperature`` (W/(m·K)): its region's (the
    smaller principal value of an orthotropic one), the larger where regions meet. Called
    once per factorisation, so the regions' nodes are found here each time."""
    scale = np.zeros(system.size)
    for region, basis in system.region_bases.items():
        nodes = np.unique(basis.element_dofs)
        k = system.model.materials[region].conductivity_at(temperature[nodes])
        scale[nodes] = np.maximum(scale[nodes], k)
    return scale


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
