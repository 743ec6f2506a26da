"""A section mesh cut open along the interfaces between named pairs of regions.

A contact (interface) resistance makes the temperature jump across the interface, so the field
needs two values there: one for each side. The mesh nodes on the interface are duplicated — the
triangles of one side keep the node, those of the other get a copy — and the two sides are then
coupled only by the interface term of :mod:`fem.interfaces`. Everything else (the solver, the
recorder, the heat-flux recovery, the field writers) sees an ordinary mesh with more nodes.

Which copies a node needs is decided around the node: its triangles are grouped into fans that
meet across edges that are not cut, and each fan gets one copy. So an interface's end on the
outer boundary splits, a closed interface splits everywhere, and a node where the interface
meets a third region bonded to both sides stays one node (the fans join through the third
region): there the field stays continuous and the jump falls to zero at that node.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

import numpy as np

from geometries import SectionMesh

from .errors import ModelError

Pair = tuple[str, str]

# Local corner pairs of a triangle's facets, in scikit-fem's order (``Mesh.t2f`` rows).
_TRIANGLE_FACETS = ((0, 1), (1, 2), (0, 2))


@dataclass(frozen=True)
class InterfaceSides:
    """The two faces of one cut interface in the split mesh.

    Attributes
    ----------
    regions : tuple of str
        The first and second region.
    first_facets, second_facets : ndarray
        Facet indices (of the split mesh) of the interface as seen from each region, pairwise:
        ``first_facets[i]`` and ``second_facets[i]`` are the same piece of the interface.
    node_pairs : ndarray, shape (n, 2)
        Mesh vertices on the interface: the first region's node, then the second's (equal where
        the field stays continuous, at a node shared with a third region).
    """

    regions: Pair
    first_facets: np.ndarray
    second_facets: np.ndarray
    node_pairs: np.ndarray


@dataclass(frozen=True)
class SplitSectionMesh(SectionMesh):
    """A :class:`~geometries.SectionMesh` with nodes duplicated along interfaces.

    The facts, edge groups and regions are those of the ``parent`` section; ``mesh`` has the
    extra nodes, and the interface facets are boundary facets of it that belong to no edge
    group.

    Attributes
    ----------
    parent : SectionMesh
        The section before the cut.
    sides : dict of (str, str) to InterfaceSides
        The cut interfaces, keyed by their pair of regions.
    """

    parent: SectionMesh = None  # type: ignore[assignment]
    sides: dict = None  # type: ignore[assignment]

    def locate(self, points: np.ndarray) -> np.ndarray:
        """As :meth:`SectionMesh.locate`, except that a point on a cut interface is read on
        one side, always the same: that of the first region of the pair in :attr:`sides`
        (see :func:`interface_side`)."""
        cells = np.array(super().locate(points), copy=True)
        for index in range(np.shape(points)[1]):
            found = interface_side(self, np.asarray(points)[:, index])
            if found is not None:
                cells[index] = found[1]
        return cells


def interface_side(section: SplitSectionMesh, point: np.ndarray) -> tuple[Pair, int] | None:
    """The interface a ``point`` (m) lies on, within a millionth of the section's size, and the
    first region's triangle along it; None when it lies on none."""
    mesh = section.mesh
    size = float(np.ptp(section.vertices, axis=1).max())
    for pair, sides in section.sides.items():
        ends = mesh.p[:, mesh.facets[:, sides.first_facets]]  # (2, 2, facets)
        start, along = ends[:, 0], ends[:, 1] - ends[:, 0]
        length2 = np.einsum("df,df->f", along, along)
        offset = np.reshape(point, (2, 1)) - start
        s = np.clip(np.einsum("df,df->f", offset, along) / length2, 0.0, 1.0)
        gap = np.linalg.norm(s * along - offset, axis=0)
        nearest = int(np.argmin(gap))
        if gap[nearest] <= 1e-6 * size:
            return pair, int(mesh.f2t[0, sides.first_facets[nearest]])
    return None


def region_contacts(section: SectionMesh) -> set[frozenset]:
    """The pairs of regions of ``section`` that share at least one mesh edge."""
    mesh = section.mesh
    if isinstance(section, SplitSectionMesh):
        return region_contacts(section.parent)
    region_of = np.full(mesh.t.shape[1], -1, dtype=np.int64)
    names = list(section.regions)
    for index, name in enumerate(names):
        region_of[section.regions[name]] = index
    interior = mesh.f2t[:, mesh.f2t[1] >= 0]
    a, b = region_of[interior[0]], region_of[interior[1]]
    found = np.unique(np.stack([np.minimum(a, b), np.maximum(a, b)])[:, a != b], axis=1)
    return {frozenset((names[i], names[j])) for i, j in found.T}


def split_section(section: SectionMesh, pairs: Iterable[Pair]) -> SplitSectionMesh:
    """``section`` with its nodes duplicated along the interfaces between each pair of regions.

    The result is remembered on the section, so the same pairs give the same object (a system
    assembled for one model serves another with other conductances). A section already split
    for exactly these pairs is returned as it is.

    Raises
    ------
    ModelError
        If a region is not in the section, a pair names one region twice or the two regions
        share no edge.
    """
    pairs = tuple(tuple(p) for p in pairs)
    key = tuple(sorted(tuple(sorted(p)) for p in pairs))
    if isinstance(section, SplitSectionMesh):
        if tuple(sorted(tuple(sorted(p)) for p in section.sides)) == key:
            return section
        section = section.parent
    remembered = section.__dict__.setdefault("_interface_splits", {})
    if key not in remembered:
        remembered[key] = _split(section, pairs)
    return remembered[key]


def _split(section: SectionMesh, pairs: tuple[Pair, ...]) -> SplitSectionMesh:
    mesh = section.mesh
    region_of = np.full(mesh.t.shape[1], -1, dtype=np.int64)
    names = list(section.regions)
    for index, name in enumerate(names):
        region_of[section.regions[name]] = index
    interior = np.flatnonzero(mesh.f2t[1] >= 0)
    first, second = region_of[mesh.f2t[0, interior]], region_of[mesh.f2t[1, interior]]
    cut = np.zeros(mesh.facets.shape[1], dtype=bool)
    facets_of: dict[Pair, np.ndarray] = {}
    for pair in pairs:
        a, b = (_region_index(names, r, pair) for r in pair)
        if a == b:
            raise ModelError(
                f"an interface needs two different regions, got {list(pair)}", argument="regions"
            )
        found = interior[((first == a) & (second == b)) | ((first == b) & (second == a))]
        if len(found) == 0:
            raise ModelError(
                f"regions {pair[0]!r} and {pair[1]!r} do not touch: they share no edge, so "
                "there is no interface between them",
                argument="regions",
            )
        facets_of[pair] = found
        cut[found] = True
    corner_vertex = _corner_vertices(mesh, cut)
    return _assembled_split(section, corner_vertex, facets_of, region_of, names)


def _region_index(names: list[str], region: str, pair: Pair) -> int:
    if region not in names:
        raise ModelError(
            f"interface {list(pair)} names region {region!r}, which the section does not have; "
            f"its regions are {sorted(names)}",
            argument="regions",
        )
    return names.index(region)


def _corner_vertices(mesh, cut: np.ndarray) -> np.ndarray:
    """The vertex of each triangle corner (3, triangles) after the cut: the corners of one
    vertex are joined across every uncut interior edge through it; each joined fan of a vertex
    on a cut edge beyond the first gets a new vertex number."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    t, n_triangles = mesh.t[:3], mesh.t.shape[1]
    joined = np.flatnonzero((mesh.f2t[1] >= 0) & ~cut)
    left, right = mesh.f2t[0, joined], mesh.f2t[1, joined]
    rows, cols = [], []
    for end in (0, 1):
        vertex = mesh.facets[end, joined]
        rows.append(_corner(t, left, vertex) * n_triangles + left)
        cols.append(_corner(t, right, vertex) * n_triangles + right)
    rows, cols = np.concatenate(rows), np.concatenate(cols)
    size = 3 * n_triangles
    graph = coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(size, size))
    _, fan = connected_components(graph, directed=False)
    vertex = t.ravel().astype(np.int64)  # corner k of triangle e at k * n_triangles + e
    on_cut = np.zeros(mesh.nvertices, dtype=bool)
    on_cut[mesh.facets[:, cut].ravel()] = True
    new = vertex.copy()
    corners = np.flatnonzero(on_cut[vertex])
    pairs, inverse = np.unique(
        np.stack([vertex[corners], fan[corners]]), axis=1, return_inverse=True
    )
    inverse = np.ravel(inverse)
    repeat = np.ones(pairs.shape[1], dtype=bool)
    repeat[1:] = pairs[0, 1:] == pairs[0, :-1]  # sorted by vertex: not the vertex's first fan
    repeat[0] = False
    number = pairs[0].copy()
    number[repeat] = mesh.nvertices + np.arange(int(repeat.sum()))
    new[corners] = number[inverse]
    return new.reshape(3, n_triangles)


def _corner(t: np.ndarray, triangles: np.ndarray, vertex: np.ndarray) -> np.ndarray:
    """The local corner (0, 1 or 2) of ``vertex`` in each of ``triangles``."""
    return np.argmax(t[:, triangles] == vertex, axis=0)


def _assembled_split(section, corner_vertex, facets_of, region_of, names) -> SplitSectionMesh:
    """The split mesh from the new corner numbering, with its edge groups carried over and the
    two faces of each interface."""
    from geometries.mesh_arrays import scikit_mesh, triangle_topology

    mesh = section.mesh
    n_vertices = mesh.nvertices
    origin = np.arange(int(corner_vertex.max()) + 1)
    origin[corner_vertex.ravel()] = mesh.t[:3].ravel()  # each new vertex's original
    vertices = np.ascontiguousarray(mesh.p[:, origin])  # the originals are the first columns
    t = np.ascontiguousarray(corner_vertex, dtype=mesh.t.dtype)
    linear = triangle_topology(t, vertices.shape[1])  # the cut mesh's facets, t2f and f2t
    new_facet = np.full(mesh.facets.shape[1], -1, dtype=np.int64)  # the last triangle's copy
    for k in range(3):
        new_facet[mesh.t2f[k]] = linear.t2f[k]
    boundaries = {name: np.sort(new_facet[f]) for name, f in mesh.boundaries.items()}
    subdomains = dict(mesh.subdomains)
    middle = None
    if mesh.p.shape[1] > n_vertices:  # quadratic: mid-edge nodes in the new facets' order
        middle = np.empty((2, linear.facets.shape[1]))
        for k in range(3):
            middle[:, linear.t2f[k]] = mesh.p[:, n_vertices + mesh.t2f[k]]
    split = scikit_mesh(vertices, t, boundaries, subdomains, middle)
    linear.attach(split)
    sides = {
        pair: _sides(mesh, linear, corner_vertex, facets, region_of, names.index(pair[0]), pair)
        for pair, facets in facets_of.items()
    }
    return SplitSectionMesh(mesh=split, facts=section.facts, parent=section, sides=sides)


def _sides(mesh, linear, corner_vertex, facets, region_of, first_region, pair) -> InterfaceSides:
    """The interface ``facets`` (of the uncut mesh) as two faces of the split one."""
    near, far = mesh.f2t[0, facets], mesh.f2t[1, facets]
    swap = region_of[near] != first_region
    near, far = np.where(swap, far, near), np.where(swap, near, far)
    faces, nodes = [], []
    for triangles in (near, far):
        local = np.argmax(mesh.t2f[:, triangles] == facets, axis=0)  # which edge of each
        faces.append(linear.t2f[local, triangles].astype(np.int64))
        ends = np.array(_TRIANGLE_FACETS)[local].T  # (2, facets): the edge's local corners
        new, original = corner_vertex[ends, triangles], mesh.t[ends, triangles]
        # rows in the uncut facet's vertex order, so the two faces' new numbers pair up
        flip = original[0] != mesh.facets[0, facets]
        nodes.append(np.where(flip, new[::-1], new))
    pairs = np.unique(np.stack([nodes[0].ravel(), nodes[1].ravel()], axis=1), axis=0)
    return InterfaceSides(pair, faces[0], faces[1], pairs.astype(np.int64))
