"""Assembly of a thermal model's :class:`fem.system.ConductionSystem`: everything that does not
change during a run, once — the bases of the section and its regions, the capacity M and
stiffness K at the nominal properties, the edge terms, the source and volume weights, the
fixed and free degrees of freedom and the interpolation to the probes; and the model's initial
state as a field."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from skfem import Basis, ElementTriP1, ElementTriP2, FacetBasis, asm

from . import forms
from .interfaces import interface_stiffness, interface_terms
from .materials import Material
from .model import ThermalModel
from .quadrature import EdgeTerms
from .system import ConductionSystem


def element_for(model: ThermalModel):
    return ElementTriP1() if model.element_order == 1 else ElementTriP2()


def assemble(model: ThermalModel) -> ConductionSystem:
    """Assemble everything that does not change during the run."""
    mesh = model.section.mesh
    element = element_for(model)
    axisymmetric = model.section.axisymmetric
    basis = Basis(mesh, element)
    region_bases = {  # a region that is the whole section shares the section's basis
        r: basis if len(e) == mesh.t.shape[1] else Basis(mesh, element, elements=e)
        for r, e in mesh.subdomains.items()
    }
    capacity, stiffness = _matrices(model, region_bases)
    interfaces = interface_terms(model, element, basis)  # contact resistances, if any
    if interfaces:
        stiffness = (stiffness + interface_stiffness(interfaces, basis.N)).tocsr()
    source_weights = {
        r: asm(forms.shape_integral, region_bases[r], axisymmetric=axisymmetric)
        for r in model.heat_sources
    }
    volume_weights = asm(forms.shape_integral, basis, axisymmetric=axisymmetric)
    volume_weights /= volume_weights.sum()
    fixed_dofs, free = _fixed_dofs(model, basis)
    points = np.array([model.probes[name] for name in model.probes], dtype=float).reshape(-1, 2)
    probe_matrix = _probe_matrix(basis, points.T, model.section.locate(points.T))
    return ConductionSystem(
        model=model,
        basis=basis,
        region_bases=region_bases,
        size=int(basis.N),
        capacity=capacity,
        stiffness=stiffness,
        edges=_edge_terms(model, element),
        source_weights=source_weights,
        volume_weights=volume_weights,
        probe_matrix=probe_matrix,
        vertex_dofs=basis.nodal_dofs[0].copy(),
        fixed_dofs=fixed_dofs,
        free_dofs=free,
        interfaces=interfaces,
    )


def _matrices(model: ThermalModel, region_bases: dict[str, Basis]):
    """The capacity M (J/K) and stiffness K (W/K) at the nominal properties."""
    axisymmetric = model.section.axisymmetric
    capacity = stiffness = None
    for region, region_basis in region_bases.items():
        material: Material = model.materials[region]
        # Temperature-dependent properties are assembled later at the field's temperatures;
        # these constant matrices then only hold the pattern and are not used.
        c = asm(
            forms.heat_capacity,
            region_basis,
            volumetric_heat_capacity=float(material.volumetric_heat_capacity),
            axisymmetric=axisymmetric,
        )
        s = forms.conduction_matrix(region_basis, material.conduction_at(), axisymmetric)
        capacity = c if capacity is None else capacity + c
        stiffness = s if stiffness is None else stiffness + s
    return capacity.tocsr(), stiffness.tocsr()


def _edge_terms(model: ThermalModel, element) -> dict[str, EdgeTerms]:
    """Edge terms for every group with a condition through which heat flows."""
    mesh, axisymmetric = model.section.mesh, model.section.axisymmetric
    edges: dict[str, EdgeTerms] = {}
    for name, group_conditions in model.boundaries.items():
        flowing = tuple(c for c in group_conditions if c.flows)
        if flowing:
            edge = FacetBasis(mesh, element, facets=mesh.boundaries[name])
            weights = asm(forms.shape_integral, edge, axisymmetric=axisymmetric)
            edges[name] = EdgeTerms(edge, weights, float(weights.sum()), axisymmetric, flowing)
    return edges


def _fixed_dofs(model: ThermalModel, basis: Basis) -> tuple[dict[str, np.ndarray], np.ndarray]:
    """The held degrees of freedom of each fixed-temperature group (a shared corner goes to
    the first) and the free ones."""
    fixed_dofs: dict[str, np.ndarray] = {}
    taken: set[int] = set()
    for name in model.fixed:
        facets = model.section.mesh.boundaries[name]
        dofs = [d for d in basis.get_dofs(facets=facets).all() if d not in taken]
        taken.update(dofs)
        fixed_dofs[name] = np.array(sorted(dofs), dtype=np.int64)
    free = np.setdiff1d(np.arange(basis.N), np.array(sorted(taken), dtype=np.int64))
    return fixed_dofs, free


def initial_field(system: ConductionSystem) -> np.ndarray:
    """The model's initial state as a field (°C at every degree of freedom)."""
    model = system.model
    value = model.initial_temperature
    if isinstance(value, np.ndarray):
        return value.copy()
    if isinstance(value, float):
        return np.full(system.size, value)
    # One temperature per region: a node on an interface takes the later region's value.
    field_ = np.empty(system.size)
    for region, basis in system.region_bases.items():
        dofs = np.unique(basis.element_dofs)  # a region basis holds only its own elements
        field_[dofs] = value[region]
    return field_


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
