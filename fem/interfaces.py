"""Contact (interface) resistance between two regions: the temperature jumps across the
interface, and the heat crossing it is the contact conductance times the jump.

On an interface Γ between regions 1 and 2 with conductance h_c (W/(m²·K)), the heat flux from
region 1 to region 2 is q = h_c·(T₁ − T₂), so the weak form gains the exchange term

    ∫_Γ h_c (T₁ − T₂)(v₁ − v₂) dS,

with T₁, v₁ the traces of region 1 and T₂, v₂ those of region 2 (dS = 2πr ds for axisymmetric
sections). The mesh is cut along Γ (:mod:`fem.interface_mesh`), so each side has its own
nodes; the term is assembled from the traces of both sides at the same quadrature points, the
rule of a convection edge: with V₁, V₂ the values of the shape functions of each side at those
points and W the quadrature weights, the unit matrix is (V₁ − V₂)ᵀ W (V₁ − V₂). It is
symmetric positive semi-definite and its columns sum to zero, so heat only moves across Γ:
the energy balance of the part is unchanged.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from geometries import SectionMesh

from .errors import ModelError
from .interface_mesh import (
    InterfaceSides,
    SplitSectionMesh,
    interface_side,
    region_contacts,
    split_section,
)

__all__ = ["Interface", "InterfaceTerms", "interface_terms", "prepared", "probe_sides"]


@dataclass(frozen=True)
class Interface:
    """A thermal contact between two regions, given as a conductance or a resistance.

    Parameters
    ----------
    regions : (str, str)
        The two regions in contact; the jump is reported as T(first) − T(second).
    conductance : float, optional
        Thermal contact conductance h_c in W/(m²·K), > 0 and finite.
    resistance : float, optional
        Thermal contact resistance R = 1/h_c in m²·K/W, > 0 and finite (give one of the two).

    Examples
    --------
    >>> Interface(("die", "substrate"), resistance=2e-4).conductance
    5000.0
    """

    regions: tuple[str, str]
    conductance: float | None = None
    resistance: float | None = None

    def __post_init__(self) -> None:
        regions = self.regions
        if (
            isinstance(regions, str)
            or len(tuple(regions)) != 2
            or not all(isinstance(r, str) for r in regions)
        ):
            raise ModelError(
                f"an interface joins two regions, given as two names; got {regions!r}",
                argument="regions",
            )
        object.__setattr__(self, "regions", tuple(regions))
        if (self.conductance is None) == (self.resistance is None):
            raise ModelError(
                "an interface needs a conductance in W/(m^2*K) or a resistance in m^2*K/W "
                f"(one of them); got conductance={self.conductance!r}, "
                f"resistance={self.resistance!r}",
                argument="conductance",
            )
        given = "conductance" if self.resistance is None else "resistance"
        value = getattr(self, given)
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise ModelError(f"{given} must be a number, got {value!r}", argument=given)
        if not (math.isfinite(value) and value > 0):
            raise ModelError(f"{given} must be > 0 and finite, got {value!r}", argument=given)
        object.__setattr__(self, given, float(value))
        other = "resistance" if given == "conductance" else "conductance"
        object.__setattr__(self, other, 1.0 / float(value))

    def describe(self) -> str:
        """One line for reports: the regions and the conductance with its resistance."""
        return (
            f"contact between {self.regions[0]!r} and {self.regions[1]!r}: conductance "
            f"{self.conductance:.4g} W/(m²·K) (resistance {self.resistance:.4g} m²·K/W)"
        )


def prepared(
    section: SectionMesh, interfaces: Mapping[str, Interface]
) -> tuple[SectionMesh, dict[str, Interface]]:
    """The section cut along the ``interfaces`` (unchanged when there are none) and the
    checked interfaces.

    Raises
    ------
    ModelError
        If an entry is not an :class:`Interface`, a region is unknown, the two regions do not
        touch, or two interfaces name the same pair; ``argument`` is ``interfaces.<name>``
        followed by the offending key.
    """
    checked: dict[str, Interface] = {}
    seen: dict[frozenset, str] = {}
    for name, interface in dict(interfaces).items():
        if not isinstance(interface, Interface):
            raise ModelError(
                f"interface {name!r} must be a fem.Interface, got {interface!r}",
                argument=f"interfaces.{name}",
            )
        pair = frozenset(interface.regions)
        if pair in seen:
            raise ModelError(
                f"interfaces {seen[pair]!r} and {name!r} both join regions "
                f"{sorted(pair)}; give one interface per pair of regions",
                argument=f"interfaces.{name}.regions",
            )
        seen[pair] = name
        checked[name] = interface
    if not checked:
        if isinstance(section, SplitSectionMesh):
            section = section.parent
        return section, checked
    regions, touching = set(section.regions), region_contacts(section)
    for name, interface in checked.items():
        unknown = [r for r in interface.regions if r not in regions]
        if unknown or interface.regions[0] == interface.regions[1]:
            raise ModelError(
                f"interface {name!r} must join two different regions of the section "
                f"{sorted(regions)}; got {list(interface.regions)}",
                argument=f"interfaces.{name}.regions",
            )
        if frozenset(interface.regions) not in touching:
            raise ModelError(
                f"interface {name!r}: regions {interface.regions[0]!r} and "
                f"{interface.regions[1]!r} do not touch (they share no edge); pairs that "
                f"touch: {sorted(sorted(p) for p in touching) or 'none'}",
                argument=f"interfaces.{name}.regions",
            )
    return split_section(section, [i.regions for i in checked.values()]), checked


def _sides_of(section: SectionMesh, interface: Interface) -> InterfaceSides:
    sides = section.sides
    regions = interface.regions
    found = sides.get(regions)
    if found is None:  # the pair was cut in the other order: swap the faces
        other = sides[regions[::-1]]
        found = InterfaceSides(
            regions, other.second_facets, other.first_facets, other.node_pairs[:, ::-1]
        )
    return found


@dataclass
class InterfaceTerms:
    """One interface's pieces in the assembled system.

    Attributes
    ----------
    name : str
    interface : Interface
    difference : scipy.sparse.csr_matrix
        T₁ − T₂ at the interface's quadrature points (rows) from the nodal field.
    weights : ndarray
        The quadrature weights of those points times dS/ds (2πr when axisymmetric), m²
        (planar: m² per m of depth).
    node_difference : scipy.sparse.csr_matrix
        T₁ − T₂ at the interface's vertices from the nodal field.
    node_locations : ndarray, shape (2, n)
        Where those vertices are, m.
    """

    name: str
    interface: Interface
    difference: object
    weights: np.ndarray
    node_difference: object
    node_locations: np.ndarray

    @cached_property
    def exchange_matrix(self):
        """(V₁ − V₂)ᵀ W (V₁ − V₂): the interface term of a unit conductance, m²."""
        d = self.difference
        return (d.T.multiply(self.weights) @ d).tocsr()

    @property
    def area(self) -> float:
        """The interface's area, m² (planar: m² per m of depth)."""
        return float(self.weights.sum())

    def heat_flow(self, temperature: np.ndarray) -> float:
        """Heat crossing from the first region to the second, W (planar: W/m)."""
        return self.interface.conductance * float(self.weights @ (self.difference @ temperature))

    def jump(self, temperature: np.ndarray) -> float:
        """T₁ − T₂ at the interface vertex where it is largest in size, K."""
        jumps = self.node_difference @ temperature
        return float(jumps[int(np.argmax(np.abs(jumps)))])

    def with_interface(self, interface: Interface) -> InterfaceTerms:
        """The same terms for another conductance (what is built is kept)."""
        terms = InterfaceTerms(
            self.name,
            interface,
            self.difference,
            self.weights,
            self.node_difference,
            self.node_locations,
        )
        if "exchange_matrix" in self.__dict__:
            terms.__dict__["exchange_matrix"] = self.exchange_matrix
        return terms


def interface_terms(model, element, basis) -> dict[str, InterfaceTerms]:
    """The terms of every interface of ``model`` on its (split) section, for scikit-fem
    ``element`` and the section's ``basis``."""
    if not model.interfaces:
        return {}
    return {
        name: _terms(model, element, basis, name, interface)
        for name, interface in model.interfaces.items()
    }


def interface_stiffness(terms: Mapping[str, InterfaceTerms], size: int):
    """Σ h_c·(unit interface matrix), W/K; zero for a model without interfaces."""
    import scipy.sparse as sp

    total = sp.csr_matrix((size, size))
    for term in terms.values():
        total = total + term.interface.conductance * term.exchange_matrix
    return total.tocsr()


def _terms(model, element, basis, name: str, interface: Interface) -> InterfaceTerms:
    import scipy.sparse as sp
    from skfem import FacetBasis

    from .quadrature import QuadratureOperator

    section = model.section
    mesh, axisymmetric = section.mesh, section.axisymmetric
    sides = _sides_of(section, interface)
    operators, points = [], []
    for facets in (sides.first_facets, sides.second_facets):
        facet_basis = FacetBasis(mesh, element, facets=facets)
        operators.append(QuadratureOperator(facet_basis, axisymmetric))
        points.append(np.asarray(facet_basis.global_coordinates()))
    order = _matching_rows(points[0], points[1], float(np.ptp(section.vertices, axis=1).max()))
    difference = (operators[0].values - operators[1].values[order]).tocsr()
    pairs = sides.node_pairs
    dofs = basis.nodal_dofs[0]
    rows = np.repeat(np.arange(len(pairs)), 2)
    cols = np.column_stack([dofs[pairs[:, 0]], dofs[pairs[:, 1]]]).ravel()
    values = np.tile([1.0, -1.0], len(pairs))
    node_difference = sp.csr_matrix((values, (rows, cols)), shape=(len(pairs), basis.N))
    return InterfaceTerms(
        name,
        interface,
        difference,
        operators[0].weights,
        node_difference,
        mesh.p[:, pairs[:, 0]],
    )


def _matching_rows(first: np.ndarray, second: np.ndarray, size: float) -> np.ndarray:
    """The rows of the second face's quadrature points (2, facets, points) in the order of
    the first's: the same points, read forwards or backwards along each facet."""
    facets, count = first.shape[1], first.shape[2]
    rows = np.arange(facets * count).reshape(facets, count)
    forwards = np.abs(first - second).max(axis=(0, 2))
    backwards = np.abs(first - second[:, :, ::-1]).max(axis=(0, 2))
    reverse = backwards < forwards
    rows[reverse] = rows[reverse][:, ::-1]
    mismatch = float(np.minimum(forwards, backwards).max())
    if mismatch > 1e-9 * size:
        raise ModelError(
            f"the two faces of an interface do not coincide (quadrature points {mismatch:.3g} m "
            "apart): the mesh does not conform along it",
            argument="interfaces",
        )
    return rows.ravel()


def probe_sides(model) -> dict[str, tuple[str, str]]:
    """The probes that lie on a cut interface: probe → (interface name, the region whose side
    it reads)."""
    section = model.section
    if not isinstance(section, SplitSectionMesh):
        return {}
    names = {i.regions: n for n, i in model.interfaces.items()}
    names.update({i.regions[::-1]: n for n, i in model.interfaces.items()})
    found = {}
    for probe, point in model.probes.items():
        side = interface_side(section, np.asarray(point, dtype=float))
        if side is not None:
            found[probe] = (names[side[0]], side[0][0])
    return found


@dataclass(frozen=True)
class LargestJump:
    """The largest temperature jump across one interface over a run.

    Attributes
    ----------
    interface : Interface
    jump : float
        T(first region) − T(second region) where and when it was largest in size, K.
    time : float
        When, s.
    heat_flow : float
        The heat crossing from the first region to the second at that time, W (planar: W/m).
    largest_heat_flow : float
        The largest heat flow across the interface over the run in size, W (planar: W/m).
    """

    interface: Interface
    jump: float
    time: float
    heat_flow: float
    largest_heat_flow: float


def largest_jumps(solution) -> dict[str, LargestJump]:
    """The largest jump across each interface of a :class:`fem.Solution`, and when."""
    found = {}
    for name, jumps in solution.interface_jump.items():
        flows = solution.interface_heat_flow[name]
        at = int(np.argmax(np.abs(jumps)))
        found[name] = LargestJump(
            solution.model.interfaces[name],
            float(jumps[at]),
            float(solution.times[at]),
            float(flows[at]),
            float(flows[int(np.argmax(np.abs(flows)))]),
        )
    return found
