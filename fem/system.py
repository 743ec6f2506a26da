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

    Heat flow into the part through the group, in W per metre of depth:
    Q(T) = h·(T∞·L − weights·T).
    """

    heat_transfer_coefficient: float
    ambient: float
    length: float
    weights: np.ndarray

    def heat_flow(self, temperature: np.ndarray) -> float:
        h = self.heat_transfer_coefficient
        return h * (self.ambient * self.length - float(self.weights @ temperature))


@dataclass(frozen=True)
class ConductionSystem:
    """The assembled system of a planar thermal model (all quantities per metre of depth).

    Attributes
    ----------
    capacity : scipy.sparse.csr_matrix
        M, J/K.
    operator : scipy.sparse.csr_matrix
        A = K + H (conduction plus surface exchange), W/K.
    load : ndarray
        b, the surface exchange with the ambient, W.
    area_weights : ndarray
        ∫φ_i dA / area: ``area_weights @ T`` is the area-weighted mean temperature, °C.
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
    area_weights: np.ndarray
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

    capacity = asm(
        forms.heat_capacity, basis, volumetric_heat_capacity=material.volumetric_heat_capacity
    )
    operator = asm(forms.conduction, basis, conductivity=material.conductivity)
    load = np.zeros(basis.N)
    exchange = {}
    for name, condition in model.convection.items():
        edge = FacetBasis(mesh, element, facets=mesh.boundaries[name])
        h = condition.heat_transfer_coefficient
        operator = operator + asm(forms.surface_exchange, edge, heat_transfer_coefficient=h)
        weights = asm(forms.shape_integral, edge)
        load += h * condition.ambient * weights
        exchange[name] = ExchangeEdge(h, condition.ambient, float(weights.sum()), weights)

    area_weights = asm(forms.shape_integral, basis)
    area_weights /= area_weights.sum()
    if model.probes:
        points = np.array([model.probes[name] for name in model.probes], dtype=float).T
        probe_matrix = sp.csr_matrix(basis.probes(points))
    else:
        probe_matrix = sp.csr_matrix((0, basis.N))
    return ConductionSystem(
        capacity=capacity.tocsr(),
        operator=operator.tocsr(),
        load=load,
        area_weights=area_weights,
        probe_matrix=probe_matrix,
        vertex_dofs=basis.nodal_dofs[0].copy(),
        exchange=exchange,
    )
