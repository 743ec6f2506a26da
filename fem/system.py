"""The semi-discrete system C(T)' + G(T, t) = 0 for a thermal model.

C(T) is the heat stored (∫H(T)φ_i dV, J; the capacity matrix M times T when ρc is constant) and
G(T, t) = K(T)·T + Σ h(t)·H_g·T − b(t) + R(T, t) the net heat leaving each node (W):
conduction, the linear part of every boundary condition (coefficients h with the unit exchange
matrices H_g, loads in b, with the sources), and the nonlinear remainders R the conditions
evaluate themselves (:mod:`fem.conditions`). Everything that does not depend on temperature is
assembled once (:func:`fem.assembly.assemble`); temperature-dependent parts (k(T), ρc(T),
nonlinear conditions) are assembled when asked for, at the quadrature points of the current
field.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np
import scipy.sparse as sp
from skfem import Basis, asm

from . import forms
from .errors import ModelError
from .interfaces import interface_stiffness
from .model import ThermalModel
from .nonlinear_assembly import RegionProducts
from .quadrature import EdgeTerms, QuadratureOperator, remembered
from .stored_heat import PointEnthalpy

ENTHALPY_REFERENCE = 0.0  # °C: H(T) = ∫ρc dT from here; differences are all that matter


def inner(a: np.ndarray, b: np.ndarray) -> float:
    """a·b for the per-step histories. einsum, not BLAS: OpenBLAS's threaded dot waits for a
    busy core (measured up to 15 ms at 100k unknowns on two loaded cores, einsum 0.12 ms)."""
    return float(np.einsum("i,i->", a, b))


@dataclass
class ConductionSystem:
    """The assembled pieces of a model's equations (planar: per metre of depth).

    Attributes
    ----------
    model : ThermalModel
    size : int
        Degrees of freedom.
    capacity : scipy.sparse.csr_matrix
        M (J/K); the equations use it only when ρc is constant in every region.
    stiffness : scipy.sparse.csr_matrix
        K (W/K); the equations use it only when k is constant in every region.
    edges : dict of str to EdgeTerms
    source_weights : dict of str to ndarray
        ∫_region φ_i dV for each heat-generating region.
    volume_weights : ndarray
        ∫φ_i dV / V: ``volume_weights @ T`` is the volume-weighted mean, °C.
    probe_matrix : scipy.sparse.csr_matrix
        Interpolation to the probes.
    vertex_dofs : ndarray
        Degrees of freedom at the mesh vertices, in vertex order.
    fixed_dofs : dict of str to ndarray
        Degrees of freedom of each fixed-temperature group (a shared corner goes to the first).
    interfaces : dict of str to fem.interfaces.InterfaceTerms
        The contact interfaces; their conductance terms are part of ``stiffness``.
    """

    model: ThermalModel
    basis: Basis
    region_bases: dict[str, Basis]
    size: int
    capacity: sp.csr_matrix
    stiffness: sp.csr_matrix
    edges: dict[str, EdgeTerms]
    source_weights: dict[str, np.ndarray]
    volume_weights: np.ndarray
    probe_matrix: sp.csr_matrix
    vertex_dofs: np.ndarray
    fixed_dofs: dict[str, np.ndarray]
    free_dofs: np.ndarray = field(default_factory=lambda: np.empty(0, dtype=np.int64))
    interfaces: dict = field(default_factory=dict)

    @property
    def axisymmetric(self) -> bool:
        return self.model.section.axisymmetric

    def with_boundaries(self, boundaries) -> ConductionSystem:
        """The same assembled system under other boundary conditions of the same pattern (see
        :meth:`for_model`): a loop over coefficients, ambients or schedules assembles once."""
        return self.for_model(dataclasses.replace(self.model, boundaries=boundaries))

    def for_model(self, model: ThermalModel) -> ConductionSystem:
        """This system's matrices for ``model``, when they are the same: the same section
        object (as a mesh cache hands it out), materials, element order, heat-source regions
        and probes, and conditions of the same pattern (the same edge groups carrying heat and
        holding their temperature). Coefficients, ambients, fluxes, sources, schedules and the
        initial state may differ.

        Raises
        ------
        ModelError
            If the matrices do not apply to ``model``; assemble it instead.
        """
        old = self.model
        same = (
            model.section is old.section
            and model.element_order == old.element_order
            and model.materials == old.materials
            and set(model.heat_sources) == set(old.heat_sources)
            and model.probes == old.probes
        )
        if not same:
            raise ModelError(
                "the assembled system is for another section, material, element order, source "
                "region or probe set: assemble the new model",
                argument="model",
            )
        flowing = {
            name: tuple(c for c in group if c.flows) for name, group in model.boundaries.items()
        }
        flowing = {name: group for name, group in flowing.items() if group}
        if set(flowing) != set(self.edges) or set(model.fixed) != set(self.fixed_dofs):
            raise ModelError(
                "the assembled system needs the same edge groups carrying heat "
                f"{sorted(self.edges)} and holding their temperature {sorted(self.fixed_dofs)}; "
                f"got {sorted(flowing)} and {sorted(model.fixed)}: assemble the new model",
                argument="boundaries",
            )
        edges = {name: edge.with_conditions(flowing[name]) for name, edge in self.edges.items()}
        return dataclasses.replace(self, model=model, edges=edges, **self._interfaces_for(model))

    def _interfaces_for(self, model: ThermalModel) -> dict:
        """The interface terms and stiffness for ``model``'s conductances (same interfaces)."""
        if model.interfaces == self.model.interfaces:
            return {}
        if {n: i.regions for n, i in model.interfaces.items()} != {
            n: t.interface.regions for n, t in self.interfaces.items()
        }:
            raise ModelError(
                f"the assembled system has the interfaces {sorted(self.interfaces)}; "
                f"got {sorted(model.interfaces)}: assemble the new model",
                argument="interfaces",
            )
        terms = {n: t.with_interface(model.interfaces[n]) for n, t in self.interfaces.items()}
        stiffness = self.stiffness - interface_stiffness(self.interfaces, self.size)
        stiffness = (stiffness + interface_stiffness(terms, self.size)).tocsr()
        return {"interfaces": terms, "stiffness": stiffness}

    def flowing(self):
        """Every (edge terms, condition) pair through which heat flows, in group order."""
        return [(edge, c) for edge in self.edges.values() for c in edge.conditions]

    # -- linear pieces --------------------------------------------------------------------
    def exchange_operator(self, time: float) -> sp.csr_matrix:
        """A(t) = K + Σ h_g(t)·H_g for constant conductivity (W/K)."""
        operator = self.stiffness
        for edge, condition in self.flowing():
            h = condition.exchange_coefficient(time)
            if h:
                operator = operator + h * edge.exchange_matrix
        return operator.tocsr()

    def exchange_key(self, time: float) -> tuple[float, ...]:
        """The coefficients A(t) depends on: equal keys mean equal matrices."""
        return tuple(c.exchange_coefficient(time) for _, c in self.flowing())

    def linearised_operator(self, temperature: float, time: float) -> sp.csr_matrix:
        """K + Σ h_g·H_g with every condition's coefficient linearised at one surface
        ``temperature`` °C (the secant: see :meth:`fem.conditions.Condition.linearised`), W/K;
        K with k at that temperature too."""
        operator = self.stiffness
        if not self._constant_conductivity:
            operator = self.conduction_tangent(np.full(self.size, float(temperature)))
        for edge, condition in self.flowing():
            h = condition.linearised(temperature, time).coefficient
            if h:
                operator = operator + h * edge.exchange_matrix
        return operator.tocsr()

    def load(self, time: float) -> np.ndarray:
        """b(t): the conditions' loads (convection towards the ambient, fluxes) and sources
        (W)."""
        b = np.zeros(self.size)
        for edge, condition in self.flowing():
            supplied = condition.supplied(time)
            if supplied:
                b += supplied * edge.weights
        for region, q in self.model.heat_sources.items():
            b += q(time) * self.source_weights[region]
        return b

    # -- the full residual pieces -----------------------------------------------------------
    @cached_property
    def products(self) -> dict[str, RegionProducts]:
        """The unit matrices of each region whose k or ρc depends on temperature, for its
        terms by product approximation (built on first use: only nonlinear runs need them)."""
        return {
            region: RegionProducts(
                basis, self.axisymmetric, self.model.materials[region], ENTHALPY_REFERENCE
            )
            for region, basis in self.region_bases.items()
            if not self.model.materials[region].is_constant
        }

    @cached_property
    def _constant_parts(self) -> tuple[sp.csr_matrix, sp.csr_matrix]:
        """The stiffness and capacity (W/K, J/K) of the regions where k, and where ρc, is
        one number: assembled once, so a small region with k(T) or latent heat costs only its
        own share of a residual."""
        stiffness = interface_stiffness(self.interfaces, self.size)  # zero without contacts
        capacity = sp.csr_matrix((self.size, self.size))
        for region, basis in self.region_bases.items():
            material = self.model.materials[region]
            if isinstance(material.conductivity, float):  # an orthotropic one's tensor too
                stiffness = stiffness + forms.conduction_matrix(
                    basis, material.conduction_at(), self.axisymmetric
                )
            if material.constant_capacity:
                capacity = capacity + asm(
                    forms.heat_capacity,
                    basis,
                    volumetric_heat_capacity=material.volumetric_heat_capacity,
                    axisymmetric=self.axisymmetric,
                )
        return stiffness.tocsr(), capacity.tocsr()

    def stored(self, temperature: np.ndarray) -> np.ndarray:
        """C(T): ∫ H(T) φ_i dV per node, J (planar: J/m)."""
        if self._constant_capacity:
            return self.capacity @ temperature
        return remembered(self, "_stored_memo", temperature, self._stored)

    def _stored(self, temperature: np.ndarray) -> np.ndarray:
        total = _product(self._constant_parts[1], temperature)
        for (operator, _), enthalpy in zip(self._storing, self._point_enthalpies, strict=True):
            total += operator.integrate(enthalpy(operator.interpolate(temperature)))
        return total

    @cached_property
    def _point_enthalpies(self) -> tuple[PointEnthalpy, ...]:
        """The enthalpy of each region of :attr:`_storing` at its quadrature points, into
        buffers kept for the run (:mod:`fem.stored_heat`)."""
        return tuple(
            PointEnthalpy(material, ENTHALPY_REFERENCE, operator.values.shape[0])
            for operator, material in self._storing
        )

    def capacity_tangent(self, temperature: np.ndarray) -> sp.csr_matrix:
        """dC/dT: ∫ ρc(T) φ_j φ_i dV (J/K)."""
        if self._constant_capacity:
            return self.capacity
        total = self._constant_parts[1]
        for operator, material in self._storing:
            t = operator.interpolate(temperature)
            mass = operator.mass(material.heat_capacity_at(t))
            total = mass if total.nnz == 0 else total + mass  # no sum with an empty matrix
        return total.tocsr()

    @cached_property
    def _tensor_conducting(self) -> tuple[tuple[QuadratureOperator, object], ...]:
        """(gather to the quadrature points, material) of each orthotropic region whose
        principal conductivities depend on temperature: no Kirchhoff transform serves a
        tensor, so its conduction is integrated at the quadrature points."""
        return tuple(
            (QuadratureOperator(basis, self.axisymmetric, gradients=True), material)
            for region, basis in self.region_bases.items()
            if (material := self.model.materials[region]).orthotropic is not None
            and not isinstance(material.conductivity, float)
        )

    @cached_property
    def _storing(self) -> tuple[tuple[QuadratureOperator, object], ...]:
        """(gather to the quadrature points, material) of each region whose ρc depends on
        temperature: its stored heat is ∫ H(T) φ_i dV with H at the quadrature points."""
        return tuple(
            (QuadratureOperator(basis, self.axisymmetric), self.model.materials[region])
            for region, basis in self.region_bases.items()
            if not self.model.materials[region].constant_capacity
        )

    def net_outflow(self, temperature: np.ndarray, time: float) -> np.ndarray:
        """G(T, t): heat leaving each node (W), conduction included."""
        g = self._conduction(temperature) - self.load(time)
        for edge, condition in self.flowing():
            h = condition.exchange_coefficient(time)
            if h:
                g += h * (edge.exchange_matrix @ temperature)
            remainder = condition.outflow(edge, temperature, time)
            if remainder is not None:
                g += remainder
        return g

    def outflow_tangent(
        self, temperature: np.ndarray, time: float, remainders: bool = True
    ) -> sp.csr_matrix:
        """dG/dT (W/K); without the nonlinear conditions' terms unless ``remainders``."""
        if self._constant_conductivity:
            total = self.exchange_operator(time)
        else:  # K(T) and the exchange, not K + exchange − K: two sums fewer
            total = self.conduction_tangent(temperature)
            for edge, condition in self.flowing():
                h = condition.exchange_coefficient(time)
                if h:
                    total = total + h * edge.exchange_matrix
        if remainders:
            surface = self.surface_tangent(temperature, time)
            if surface is not None:
                total = total + surface
        return total.tocsr()

    def surface_tangent(self, temperature: np.ndarray, time: float) -> sp.csr_matrix | None:
        """The nonlinear conditions' part of dG/dT (W/K), nonzero on
        :attr:`nonlinear_surface_nodes` only; None without such conditions."""
        total = None
        for edge, condition in self.flowing():
            tangent = condition.outflow_tangent(edge, temperature, time)
            if tangent is not None:
                total = tangent if total is None else total + tangent
        return total

    def surface_outflow(self, temperature: np.ndarray, time: float) -> np.ndarray:
        """The nonlinear conditions' part of G(T, t) (W), nonzero on
        :attr:`nonlinear_surface_nodes` only: what :meth:`net_outflow` adds beyond its linear
        terms."""
        total = np.zeros(self.size)
        for edge, condition in self.flowing():
            if not condition.linear:
                remainder = condition.outflow(edge, temperature, time)
                if remainder is not None:
                    total += remainder
        return total

    @cached_property
    def nonlinear_surface_nodes(self) -> np.ndarray:
        """Degrees of freedom of the edge groups with a nonlinear condition (radiation,
        h(T_s)): where the tangent changes with the surface temperature."""
        nodes = [
            np.unique(edge.exchange_matrix.nonzero()[0])
            for edge in self.edges.values()
            if any(not c.linear for c in edge.conditions)
        ]
        return np.unique(np.concatenate(nodes)) if nodes else np.empty(0, dtype=np.int64)

    def conduction_tangent(self, temperature: np.ndarray) -> sp.csr_matrix:
        """d(conduction)/dT at the nodal ``temperature`` (W/K): K itself for constant k; at a
        uniform temperature, K with k taken there."""
        if self._constant_conductivity:
            return self.stiffness
        total = self._constant_parts[0]
        for products in self.products.values():
            if products.varying_conductivity:
                tangent = products.conduction_tangent(temperature)
                total = tangent if total.nnz == 0 else total + tangent
        for operator, material in self._tensor_conducting:
            t = operator.interpolate(temperature)
            total = total + operator.conduction_tangent(
                material.conduction_coefficients(t), material.conduction_slopes(t), temperature
            )
        return total.tocsr()

    def _conduction(self, temperature: np.ndarray) -> np.ndarray:
        if self._constant_conductivity:
            return self.stiffness @ temperature
        return remembered(self, "_conduction_memo", temperature, self._conduction_of)

    def _conduction_of(self, temperature: np.ndarray) -> np.ndarray:
        total = _product(self._constant_parts[0], temperature)
        for products in self.products.values():
            if products.varying_conductivity:
                total += products.conduction(temperature)
        for operator, material in self._tensor_conducting:
            t = operator.interpolate(temperature)
            total += operator.conduction(material.conduction_coefficients(t), temperature)
        return total

    # -- what the histories report ----------------------------------------------------------
    def edge_heat_flows(self, temperature: np.ndarray, time: float) -> dict[str, float]:
        """Heat flow into the part through each edge group with a flowing condition (W)."""
        return {
            name: sum(c.heat_flow(edge, temperature, time) for c in edge.conditions)
            for name, edge in self.edges.items()
        }

    def edge_heat_flows_many(
        self, times: np.ndarray, temperatures: np.ndarray
    ) -> dict[str, np.ndarray]:
        """Heat flow into the part through each edge group of a linear model (W) for many
        states at once, ``temperatures`` one per row: one product per group for the batch."""
        return {
            name: sum(c.heat_flows_many(edge, times, temperatures) for c in edge.conditions)
            for name, edge in self.edges.items()
        }

    def interface_states(self, temperature: np.ndarray) -> dict[str, tuple[float, float]]:
        """(largest jump T₁ − T₂ in K, heat flow from the first region to the second in W) of
        each contact interface."""
        return {
            name: (term.jump(temperature), term.heat_flow(temperature))
            for name, term in self.interfaces.items()
        }

    def impose_fixed(self, temperature: np.ndarray, time: float) -> None:
        """Set the fixed-temperature degrees of freedom of ``temperature`` to their values at
        ``time`` (in place)."""
        for dofs, condition in self._held:
            temperature[dofs] = condition.held_temperature(time)

    @cached_property
    def _held(self) -> tuple[tuple[np.ndarray, object], ...]:
        """(degrees of freedom, condition) of every held group, found once per system rather
        than every step."""
        return tuple((self.fixed_dofs[name], c) for name, c in self.model.fixed.items())

    def generated(self, time: float) -> float:
        """Heat generated in the part (W)."""
        return float(
            sum(q(time) * self.source_weights[r].sum() for r, q in self.model.heat_sources.items())
        )

    @property
    def constant_capacity(self) -> bool:
        """ρc is one number in every region."""
        return all(m.constant_capacity for m in self.model.materials.values())

    _constant_capacity = constant_capacity

    @property
    def _constant_conductivity(self) -> bool:
        return all(isinstance(m.conductivity, float) for m in self.model.materials.values())


def _product(matrix: sp.csr_matrix, vector: np.ndarray) -> np.ndarray:
    """matrix·vector, skipping the product when the matrix is empty (no region with constant
    k or ρc): a sparse product still visits every row."""
    return matrix @ vector if matrix.nnz else np.zeros(matrix.shape[0])
