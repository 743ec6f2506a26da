"""Assembly of the semi-discrete system M·dT/dt + A·T = b for a thermal model."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from skfem import Basis, ElementTriP1, ElementTriP2, FacetBasis, asm

from . import forms
from .model import ThermalModel


@dataclass(frozen=True)
class ExchangeEdge:
    """What one convective edge group needs to report its heat flow.

    Heat flow into the part through the group, in W (planar: per metre of depth):
    Q(T) = h·(T∞·S − weights·T), with S the group's surface area.
    """

    heat_transfer_coefficient: float
    ambient: float
    surface_area: float
    weights: np.ndarray

    def heat_flow(self, temperature: np.ndarray) -> float:
        h = self.heat_transfer_coefficient
        return h * (self.ambient * self.surface_area - float(self.weights @ temperature))


@dataclass(frozen=True)
class ConductionSystem:
    """The assembled system of a thermal model (planar: all quantities per metre of depth;
    axisymmetric: for the whole solid of revolution).

    Attributes
    ----------
    capacity : scipy.sparse.csr_matrix
        M, J/K.
    operator : scipy.sparse.csr_matrix
        A = K + H (conduction plus surface exchange), W/K.
    load : ndarray
        b, the surface exchange with the ambient, W.
    volume_weights : ndarray
        ∫φ_i dV / V: ``volume_weights @ T`` is the volume-weighted mean temperature, °C.
    probe_matrix : scipy.sparse.csr_matrix
        Interpolation to the model's probes.
    vertex_dofs : ndarray
        Degrees of freedom at the mesh vertices, in vertex order.
    exchange : dict of str to ExchangeEdge
        Heat-flow functionals of the convective edge groups.
    """

    capacity: sp.csr_matrix
    operator: sp.csr_matrix
    load: np.ndarray
    volume_weights: np.ndarray
    probe_matrix: sp.csr_matrix
    vertex_dofs: np.ndarray
    exchange: dict[str, ExchangeEdge]

    @property
    def size(self) -> int:
        return self.load.shape[0]


def assemble(model: ThermalModel) -> ConductionSystem:
    """Assemble M, A and b once for the whole run."""
    mesh = model.section.mesh
    element = ElementTriP1() if model.element_order == 1 else ElementTriP2()
    basis = Basis(mesh, element)
    material = model.material
    axisymmetric = model.section.axisymmetric

    capacity = asm(
        forms.heat_capacity,
        basis,
        volumetric_heat_capacity=material.volumetric_heat_capacity,
        axisymmetric=axisymmetric,
    )
    operator = asm(
        forms.conduction, basis, conductivity=material.conductivity, axisymmetric=axisymmetric
    )
    load = np.zeros(basis.N)
    exchange = {}
    for name, condition in model.convection.items():
        edge = FacetBasis(mesh, element, facets=mesh.boundaries[name])
        h = condition.heat_transfer_coefficient
        operator = operator + asm(
            forms.surface_exchange, edge, heat_transfer_coefficient=h, axisymmetric=axisymmetric
        )
        weights = asm(forms.shape_integral, edge, axisymmetric=axisymmetric)
        load += h * condition.ambient * weights
        exchange[name] = ExchangeEdge(h, condition.ambient, float(weights.sum()), weights)

    volume_weights = asm(forms.shape_integral, basis, axisymmetric=axisymmetric)
    volume_weights /= volume_weights.sum()
    points = np.array([model.probes[name] for name in model.probes], dtype=float).reshape(-1, 2)
    probe_matrix = _probe_matrix(basis, points.T, model.section.locate(points.T))
    return ConductionSystem(
        capacity=capacity.tocsr(),
        operator=operator.tocsr(),
        load=load,
        volume_weights=volume_weights,
        probe_matrix=probe_matrix,
        vertex_dofs=basis.nodal_dofs[0].copy(),
        exchange=exchange,
    )


def _probe_matrix(basis: Basis, points: np.ndarray, cells: np.ndarray) -> sp.csr_matrix:
    """Interpolation from the degrees of freedom to ``points`` (2, n) lying in ``cells``."""
    if points.shape[1] == 0:
        return sp.csr_matrix((0, basis.N))
    reference = basis.mapping.invF(points[:, :, np.newaxis], tind=cells)
    values = np.array(
        [basis.elem.gbasis(basis.mapping, reference, k, tind=cells)[0] for k in range(basis.Nbfun)]
    )  # (local shape function, point, 1)
    rows = np.tile(np.arange(points.shape[1]), basis.Nbfun)
    cols = basis.element_dofs[:, cells].ravel()
    return sp.csr_matrix((values.ravel(), (rows, cols)), shape=(points.shape[1], basis.N))
