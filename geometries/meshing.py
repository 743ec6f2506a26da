"""Every gmsh call of the project: build a section's geometry, mesh it, read the mesh back.

gmsh keeps one global state per process. All access goes through :func:`_gmsh_session`, which
holds a lock, starts gmsh quietly and always finalises it, so repeated meshing in one process is
safe and parallel meshing runs in separate processes. Edge groups are assigned *after* gmsh's
booleans, by matching every boundary curve to the shapes' named edge primitives, and every curve
must be matched: an unnamed edge is an error, never a silent insulated boundary.
"""

from __future__ import annotations

import math
import threading
from collections.abc import Iterator
from contextlib import contextmanager

import gmsh
import numpy as np
import pygmsh

from .errors import GeometryError
from .primitives import EdgeArc, EdgeEllipse, EdgePrimitive, EdgeSegment
from .section import AXIS_GROUP, DEFAULT_MAX_ELEMENTS, Section
from .section_mesh import SectionMesh, section_mesh_from_arrays
from .shapes import (
    Composite,
    Difference,
    Intersection,
    Outline,
    Renamed,
    Shape,
    SymmetryCut,
    Union,
)

_GMSH_LOCK = threading.Lock()
_CURVE_SAMPLES = 9
_MATCH_TOLERANCE = 1e-6  # relative to the section size
_TRIANGLE_AREA = math.sqrt(3) / 4  # an equilateral triangle of unit side
_MAX_ARC = 2 * math.pi / 3  # arcs are built in pieces no longer than this

# gmsh's 2-D algorithm: 6, Frontal-Delaunay (gmsh's default, set here so that it stays the
# choice). Measured on a 50 mm square, gmsh 4.15, one core: at 1M triangles Frontal-Delaunay
# took 39 s and gave 1.001 times the estimated count, radius ratio (gmsh's "gamma") min 0.78,
# mean 0.9996; Delaunay (5) took 31 s, gave 1.145 times the estimate (so a coarser size would
# be needed for the same count), min 0.51, mean 0.945; MeshAdapt (1) is about 4 times slower
# than Frontal-Delaunay at 100k triangles with quality like Delaunay's. gmsh's threads
# (General.NumThreads, Mesh.MaxNumThreads2D) mesh different surfaces in parallel and did not
# speed up one surface.
_ALGORITHM = 6
# Frontal-Delaunay's cost per triangle grows with the count (23 us at 100k, 39 us at 1M), while
# splitting every triangle into four similar ones (gmsh's refine, new boundary nodes put on the
# true curves) is cheap and keeps the element shapes. A request estimated above this count is
# therefore meshed at 2^k times the size and split k times, the fewest splits that bring the
# coarse mesh to this count or below. Measured on the same square at 1M triangles: 1 split,
# 9 s in gmsh instead of 39 s, 1.001 times the estimate, radius ratio min 0.71, mean 0.9993
# (2 splits: 4 s, min 0.76, mean 0.998). Curvature sizes stay as requested on the coarse
# mesh, so split curved edges have twice the requested elements per turn rather than
# coarser chords.
_SPLIT_ABOVE = 250_000


@contextmanager
def _gmsh_session() -> Iterator[None]:
    with _GMSH_LOCK, pygmsh.occ.Geometry():
        gmsh.option.setNumber("General.Terminal", 0)
        try:
            yield
        except GeometryError:
            raise
        except Exception as error:  # gmsh reports every failure as a bare Exception
            raise GeometryError(f"gmsh could not build or mesh the section: {error}") from None


def mesh_section(
    section: Section | Shape,
    size: float,
    *,
    order: int = 1,
    refine: dict[str, tuple[float, float]] | None = None,
    max_elements: int = DEFAULT_MAX_ELEMENTS,
    curvature_elements: int = 12,
) -> SectionMesh:
    """Mesh a section into triangles with gmsh.

    Parameters
    ----------
    section : Section or Shape
        What to mesh (a bare shape is a planar section).
    size : float
        Largest element size in m; > 0 and not above the section's extent.
    order : int
        1 for straight-sided triangles, 2 for quadratic ones that follow curved edges.
    refine : dict of str to (float, float), optional
        Per edge group, ``(size, growth)``: element size in m at the group's edges and how fast
        it grows with distance from them (1.2 means each element about 20 % larger than the
        one before), up to ``size``.
    max_elements : int
        Refuse, before meshing, a request whose estimated triangle count exceeds this.
    curvature_elements : int
        Elements at least per full turn of a curved edge (0 to switch off).

    Returns
    -------
    SectionMesh

    Notes
    -----
    gmsh's Frontal-Delaunay algorithm makes the triangles. A request estimated above 250,000
    triangles is meshed at 2^k times ``size`` (and the ``refine`` sizes) and every triangle
    is then split into four, k times, the fewest splits that bring the first mesh to 250,000
    triangles or below; the new edge nodes lie on the true edges. Element sizes, counts and
    shapes stay those of a direct mesh, in a fraction of the time; curved edges limited by
    ``curvature_elements`` end up with twice that many elements per turn.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> plate = Rectangle(0.04, 0.02)
    >>> mesh = plate.mesh(size=0.005)
    >>> sorted(mesh.edge_groups)
    ['bottom', 'left', 'right', 'top']
    >>> round(mesh.facts.area * 1e6, 6)  # mm²
    800.0
    """
    if not isinstance(section, Section):
        section = Section(section)
    shape = section.shape
    _check_options(shape, size, order, refine, max_elements, curvature_elements)
    primitives = shape.edges()
    tolerance = _MATCH_TOLERANCE * shape.size

    with _gmsh_session():
        regions = _build_regions(shape)
        gmsh.model.occ.synchronize()
        curve_groups = _name_curves(section, primitives, regions, tolerance)
        unknown = sorted(set(refine or {}) - set(curve_groups))
        if unknown:
            raise GeometryError(
                f"refine names edge group(s) {unknown} that the section does not have; its "
                f"groups are {sorted(curve_groups)}"
            )
        estimate = _check_element_count(regions, curve_groups, size, refine or {}, max_elements)
        splits = _splits(estimate)
        _set_sizes(size, curve_groups, refine or {}, curvature_elements, 2**splits)
        gmsh.model.mesh.generate(2)
        for _ in range(splits):
            gmsh.model.mesh.refine()
        if order == 2:
            gmsh.model.mesh.setOrder(2)
        return _read_mesh(
            curve_groups,
            regions,
            order,
            section.axisymmetric,
            shape.symmetry_multiplier(axisymmetric=section.axisymmetric),
        )


def boundary_groups(section: Section | Shape) -> set[str]:
    """The edge groups the section's boundary will have, found by building its geometry
    (booleans included) without meshing it: edges that end up inside the part are absent."""
    if not isinstance(section, Section):
        section = Section(section)
    shape = section.shape
    tolerance = _MATCH_TOLERANCE * shape.size
    with _gmsh_session():
        regions = _build_regions(shape)
        gmsh.model.occ.synchronize()
        return set(_name_curves(section, shape.edges(), regions, tolerance))


def _check_options(shape, size, order, refine, max_elements, curvature_elements) -> None:
    if not isinstance(size, int | float | np.floating) or not (math.isfinite(size) and size > 0):
        raise GeometryError(f"mesh size must be a finite length > 0 m, got {size!r}")
    if size > shape.size:
        raise GeometryError(
            f"mesh size {size} m is larger than the section ({shape.size:.6g} m); "
            "choose a size below the section's smallest feature"
        )
    if order not in (1, 2):
        raise GeometryError(f"element order must be 1 or 2, got {order!r}")
    if not isinstance(max_elements, int) or max_elements < 1:
        raise GeometryError(f"max_elements must be a whole number >= 1, got {max_elements!r}")
    if not isinstance(curvature_elements, int) or curvature_elements < 0:
        raise GeometryError(
            f"curvature_elements must be a whole number >= 0, got {curvature_elements!r}"
        )
    for group, value in (refine or {}).items():
        try:
            local, growth = (float(v) for v in value)
        except (TypeError, ValueError):
            raise GeometryError(
                f"refine[{group!r}] must be (size in m, growth factor), got {value!r}"
            ) from None
        if not (0 < local <= size):
            raise GeometryError(
                f"refine[{group!r}] size must be in (0, {size}] m (the global size), got {local}"
            )
        if not (growth > 1):
            raise GeometryError(f"refine[{group!r}] growth must be > 1, got {growth}")


# ---------------------------------------------------------------------------------------------
# Geometry
# ---------------------------------------------------------------------------------------------


def _build_regions(shape: Shape) -> dict[str, list[int]]:
    """Build ``shape`` in gmsh's OCC kernel; return the surface tags of each region."""
    regions = _build(shape)
    tags = {
        region: sorted({t for d, t in dimtags if d == 2}) for region, dimtags in regions.items()
    }
    return {region: t for region, t in tags.items() if t}


Regions = dict[str, list[tuple[int, int]]]


def _build(shape: Shape) -> Regions:
    """Build one node of the shape tree; return its surfaces by region.

    Unions and intersections make one region; differences, cuts and renaming keep the
    regions of what they act on; composites fragment their parts so the regions share nodes
    along their interfaces, later parts owning overlaps.
    """
    occ = gmsh.model.occ
    node = shape.expanded()
    if isinstance(node, Renamed):
        return _build(node.shape)
    if isinstance(node, Outline):
        return {node.region: [(2, occ.addPlaneSurface([_curve_loop(node)]))]}
    if isinstance(node, Union):
        parts = [_flat(_build(s)) for s in node.shapes]
        result, _ = occ.fuse(parts[0], [d for p in parts[1:] for d in p])
        return {node.region: _surfaces(result)}
    if isinstance(node, Intersection):
        parts = [_flat(_build(s)) for s in node.shapes]
        result = parts[0]
        for other in parts[1:]:
            result, _ = occ.intersect(result, other)
            result = _surfaces(result)
        if not result or _area(result) == 0:
            raise GeometryError("the shapes of an intersection have no area in common")
        return {node.region: result}
    if isinstance(node, Difference):
        regions = _build(node.base)
        for tool in node.tools:
            before = _area(_flat(regions))
            objects, owners = _objects(regions)
            _, mapping = occ.cut(objects, _flat(_build(tool)))
            regions = _remap(owners, mapping)
            if before - _area(_flat(regions)) <= 1e-9 * before:
                groups = sorted({e.group for e in tool.edges()})
                raise GeometryError(
                    f"a shape removed from the part (edges {groups}) lies outside it and "
                    "removes nothing"
                )
        if not _flat(regions):
            raise GeometryError("a difference removes the whole part: nothing is left")
        return regions
    if isinstance(node, Composite):
        built = [_build(part) for part in node.parts]
        objects, owners = [], []
        for regions in built:  # later parts come later: their claim on an overlap wins
            o, w = _objects(regions)
            objects += o
            owners += w
        _, mapping = occ.fragment(objects[:1], objects[1:])
        owner_of: dict[int, str] = {}
        for region, results in zip(owners, mapping, strict=False):
            for dim, tag in results:
                if dim == 2:
                    owner_of[tag] = region
        regions: Regions = {}
        for tag, region in sorted(owner_of.items()):
            regions.setdefault(region, []).append((2, tag))
        hidden = sorted(set(owners) - set(regions))
        if hidden:
            raise GeometryError(
                f"region(s) {hidden} of a composite are wholly covered by later parts and "
                "would vanish; list them after the parts that overlap them"
            )
        return regions
    if isinstance(node, SymmetryCut):
        regions = _build(node.shape)
        _check_symmetric(_flat(regions), node)
        objects, owners = _objects(regions)
        _, mapping = occ.intersect(objects, [_half_plane(node, node.normal)])
        return _remap(owners, mapping)
    raise GeometryError(f"cannot build a shape of type {type(node).__name__}")


def _flat(regions: Regions) -> list[tuple[int, int]]:
    return [d for dimtags in regions.values() for d in dimtags]


def _objects(regions: Regions) -> tuple[list[tuple[int, int]], list[str]]:
    """The surfaces of ``regions`` as one list, with the region of each."""
    objects, owners = [], []
    for region, dimtags in regions.items():
        objects += dimtags
        owners += [region] * len(dimtags)
    return objects, owners


def _remap(owners: list[str], mapping) -> Regions:
    """Regions after a boolean, from its map of each input surface to its results."""
    regions: Regions = {}
    for region, results in zip(owners, mapping, strict=False):
        regions.setdefault(region, []).extend((d, t) for d, t in results if d == 2)
    return {r: sorted(set(d)) for r, d in regions.items() if d}


def _surfaces(dimtags) -> list[tuple[int, int]]:
    return [(d, t) for d, t in dimtags if d == 2]


def _area(dimtags) -> float:
    return float(sum(gmsh.model.occ.getMass(d, t) for d, t in dimtags))


def _check_symmetric(whole: list[tuple[int, int]], cut: SymmetryCut) -> None:
    """Refuse a symmetry cut through a shape that is not its own mirror image in the line."""
    occ = gmsh.model.occ
    original = occ.copy(whole)
    mirrored = occ.copy(whole)
    n = cut.normal
    occ.mirror(mirrored, float(n[0]), float(n[1]), 0.0, -float(n @ np.asarray(cut.point)))
    total = _area(original)
    common, _ = occ.intersect(original, mirrored)
    overlap = _area(common)
    occ.remove(common, recursive=True)
    if total == 0 or total - overlap > 1e-6 * total:
        raise GeometryError(
            f"the section is not symmetric about the cut through {tuple(cut.point)} m "
            f"perpendicular to {tuple(np.round(n, 6))}: {100 * (total - overlap) / total:.3g} % "
            "of its area has no mirror image; model the whole section or cut on a true "
            "symmetry line"
        )


def _half_plane(cut: SymmetryCut, normal: np.ndarray) -> tuple[int, int]:
    line = cut.cut_line()
    a, b = np.asarray(line.start), np.asarray(line.end)
    reach = float(np.linalg.norm(b - a))
    corners = [a, b, b + reach * normal, a + reach * normal]
    occ = gmsh.model.occ
    points = [occ.addPoint(x, y, 0.0) for x, y in corners]
    lines = [occ.addLine(points[i], points[(i + 1) % 4]) for i in range(4)]
    return (2, occ.addPlaneSurface([occ.addCurveLoop(lines)]))


def _curve_loop(outline: Outline) -> int:
    occ = gmsh.model.occ
    pieces = outline.pieces
    if len(pieces) == 1 and isinstance(pieces[0], EdgeEllipse):
        return occ.addCurveLoop(_ellipse_curves(pieces[0]))
    if len(pieces) == 1 and isinstance(pieces[0], EdgeArc):  # a whole circle
        arc = pieces[0]
        start = occ.addPoint(*arc.start, 0.0)
        return occ.addCurveLoop(_arc_curves(arc, start, start))
    vertices = [occ.addPoint(*piece.start, 0.0) for piece in pieces]
    curves = []
    for i, piece in enumerate(pieces):
        start, end = vertices[i], vertices[(i + 1) % len(pieces)]
        if isinstance(piece, EdgeSegment):
            curves.append(occ.addLine(start, end))
        else:
            curves.extend(_arc_curves(piece, start, end))
    return occ.addCurveLoop(curves)


def _arc_curves(arc: EdgeArc, start: int, end: int) -> list[int]:
    occ = gmsh.model.occ
    n = max(1, math.ceil(abs(arc.sweep) / _MAX_ARC - 1e-9))
    centre = occ.addPoint(*arc.centre, 0.0)
    points = [start]
    for k in range(1, n):
        angle = arc.start_angle + arc.sweep * k / n
        points.append(
            occ.addPoint(
                arc.centre[0] + arc.radius * math.cos(angle),
                arc.centre[1] + arc.radius * math.sin(angle),
                0.0,
            )
        )
    points.append(end)
    return [occ.addCircleArc(points[k], centre, points[k + 1]) for k in range(n)]


def _ellipse_curves(ellipse: EdgeEllipse) -> list[int]:
    occ = gmsh.model.occ
    samples = ellipse.sample(5)[:-1]  # the four ends of the semi-axes
    centre = occ.addPoint(*ellipse.centre, 0.0)
    major = 0 if ellipse.semi_x >= ellipse.semi_y else 1
    major_point = occ.addPoint(*samples[major], 0.0)
    points = [occ.addPoint(x, y, 0.0) for x, y in samples]
    return [
        occ.addEllipseArc(points[k], centre, major_point, points[(k + 1) % 4]) for k in range(4)
    ]


# ---------------------------------------------------------------------------------------------
# Edge groups
# ---------------------------------------------------------------------------------------------


def _name_curves(
    section: Section,
    primitives: tuple[EdgePrimitive, ...],
    regions: dict[str, list[int]],
    tolerance: float,
) -> dict[str, list[int]]:
    """Assign every boundary curve to an edge group: the shapes' names, then the rules, then
    the axis."""
    surfaces = [(2, tag) for tags in regions.values() for tag in tags]
    boundary = gmsh.model.getBoundary(surfaces, combined=True, oriented=False)
    groups: dict[str, list[int]] = {}
    claimed = [False] * len(section.rules)
    for _, tag in sorted({(d, abs(t)) for d, t in boundary}):
        points = _curve_points(tag)
        group = None
        for primitive in primitives:
            if primitive.distance(points).max() <= tolerance:
                group = primitive.group  # later primitives have priority
        for k, rule in enumerate(section.rules):
            if rule.claims(points, tolerance):
                group = rule.group
                claimed[k] = True
        if section.axisymmetric and np.abs(points[:, 0]).max() <= tolerance:
            group = AXIS_GROUP
        if group is None:
            midpoint = tuple(float(v) for v in np.round(points[_CURVE_SAMPLES // 2], 9))
            raise GeometryError(
                f"the boundary curve through {midpoint} m belongs to no edge group; known "
                f"groups are {sorted({p.group for p in primitives})}"
            )
        groups.setdefault(group, []).append(tag)
    idle = [rule.group for rule, used in zip(section.rules, claimed, strict=True) if not used]
    if idle:
        raise GeometryError(
            f"edge rule(s) for group(s) {idle} name no boundary curve: a box or predicate must "
            "hold a whole curve (every sample along it), not part of one"
        )
    return groups


def _curve_points(tag: int) -> np.ndarray:
    low, high = gmsh.model.getParametrizationBounds(1, tag)
    t = np.linspace(low[0], high[0], _CURVE_SAMPLES)
    return np.reshape(gmsh.model.getValue(1, tag, t), (-1, 3))[:, :2]


# ---------------------------------------------------------------------------------------------
# Sizes and meshing
# ---------------------------------------------------------------------------------------------


def _check_element_count(
    regions: dict[str, list[int]],
    curve_groups: dict[str, list[int]],
    size: float,
    refine: dict[str, tuple[float, float]],
    max_elements: int,
) -> float:
    """The estimated triangle count; raise if it exceeds ``max_elements``."""
    area = sum(gmsh.model.occ.getMass(2, t) for tags in regions.values() for t in tags)
    estimate = area / (_TRIANGLE_AREA * size**2)
    for group, (local, growth) in refine.items():
        length = sum(gmsh.model.occ.getMass(1, c) for c in curve_groups[group])
        # Triangles in the band where the size grows linearly from ``local`` to ``size``.
        estimate += length / (_TRIANGLE_AREA * (growth - 1)) * (1 / local - 1 / size)
    if estimate > max_elements:
        raise GeometryError(
            f"this mesh would have about {estimate:,.0f} triangles, more than max_elements = "
            f"{max_elements:,}; choose a larger size or raise max_elements"
        )
    return estimate


def _splits(estimate: float) -> int:
    """How many times to split every triangle into four after meshing at ``2**splits`` times
    the size: the fewest that bring the coarse mesh to at most ``_SPLIT_ABOVE`` triangles."""
    splits = 0
    while estimate > _SPLIT_ABOVE * 4**splits:
        splits += 1
    return splits


def _set_sizes(
    size: float,
    curve_groups: dict[str, list[int]],
    refine: dict[str, tuple[float, float]],
    curvature_elements: int,
    scale: int = 1,
) -> None:
    """Set gmsh's algorithm and sizes: ``scale`` times the requested ``size`` and refinement
    ramps (``scale`` > 1 for a mesh that is split afterwards), curvature sizes as requested."""
    option = gmsh.option.setNumber
    option("Mesh.Algorithm", _ALGORITHM)
    option("Mesh.MeshSizeMax", scale * size)
    option("Mesh.MeshSizeMin", 0.0)
    option("Mesh.MeshSizeFromPoints", 0)
    option("Mesh.MeshSizeExtendFromBoundary", 0)
    option("Mesh.MeshSizeFromCurvature", curvature_elements)
    if not refine:
        return
    field = gmsh.model.mesh.field
    ramps = []
    for group, (local, growth) in refine.items():
        distance = field.add("Distance")
        field.setNumbers(distance, "CurvesList", curve_groups[group])
        field.setNumber(distance, "Sampling", 200)
        ramp = field.add("MathEval")
        expression = f"{scale} * min({size}, {local} + {growth - 1} * F{distance})"
        field.setString(ramp, "F", expression)
        ramps.append(ramp)
    smallest = field.add("Min")
    field.setNumbers(smallest, "FieldsList", ramps)
    field.setAsBackgroundMesh(smallest)


def _read_mesh(curve_groups, regions, order, axisymmetric, multiplier) -> SectionMesh:
    node_tags, coordinates, _ = gmsh.model.mesh.getNodes(returnParametricCoord=False)
    index = np.full(int(node_tags.max()) + 1, -1, dtype=np.int64)
    index[node_tags.astype(np.int64)] = np.arange(len(node_tags))
    points = np.reshape(coordinates, (-1, 3))[:, :2]
    triangle_nodes = 3 if order == 1 else 6
    line_nodes = 2 if order == 1 else 3

    def connectivity(dim: int, tag: int, nodes_per_element: int) -> np.ndarray:
        types, _, nodes = gmsh.model.mesh.getElements(dim, tag)
        blocks = [
            index[np.asarray(n, dtype=np.int64)].reshape(-1, nodes_per_element)
            for kind, n in zip(types, nodes, strict=True)
            if gmsh.model.mesh.getElementProperties(kind)[3] == nodes_per_element
        ]
        return np.vstack(blocks) if blocks else np.empty((0, nodes_per_element), np.int64)

    triangle_blocks, triangle_regions, count = [], {}, 0
    for region, surfaces in regions.items():
        blocks = [connectivity(2, s, triangle_nodes) for s in surfaces]
        n = sum(len(b) for b in blocks)
        triangle_blocks.extend(blocks)
        triangle_regions[region] = np.arange(count, count + n)
        count += n
    edge_lines = {
        name: np.vstack([connectivity(1, c, line_nodes) for c in curves])
        for name, curves in curve_groups.items()
    }
    return section_mesh_from_arrays(
        points,
        np.vstack(triangle_blocks),
        edge_lines,
        triangle_regions,
        axisymmetric=axisymmetric,
        symmetry_multiplier=multiplier,
    )
