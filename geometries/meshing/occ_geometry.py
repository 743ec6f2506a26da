"""Shape trees built in gmsh's OCC kernel: outlines as curve loops and plane surfaces, the
booleans as OCC booleans, each surface kept with the region it belongs to."""

from __future__ import annotations

import math

import gmsh
import numpy as np

from ..errors import GeometryError
from ..outline import Outline
from ..primitives import EdgeArc, EdgeEllipse, EdgeSegment
from ..shape_tree import Composite, Difference, Intersection, Renamed, Shape, SymmetryCut, Union

_MAX_ARC = 2 * math.pi / 3  # arcs are built in pieces no longer than this

Regions = dict[str, list[tuple[int, int]]]


def build_regions(shape: Shape) -> dict[str, list[int]]:
    """Build ``shape`` in gmsh's OCC kernel; return the surface tags of each region."""
    regions = _build(shape)
    tags = {
        region: sorted({t for d, t in dimtags if d == 2}) for region, dimtags in regions.items()
    }
    return {region: t for region, t in tags.items() if t}


def _build(shape: Shape) -> Regions:
    """Build one node of the shape tree; return its surfaces by region.

    Unions and intersections make one region; differences, cuts and renaming keep the
    regions of what they act on; composites fragment their parts so the regions share nodes
    along their interfaces, later parts owning overlaps.
    """
    node = shape.expanded()
    if isinstance(node, Renamed):
        return _build(node.shape)
    if isinstance(node, Outline):
        return {node.region: [(2, gmsh.model.occ.addPlaneSurface([_curve_loop(node)]))]}
    for kind, build in _BUILDERS.items():
        if isinstance(node, kind):
            return build(node)
    raise GeometryError(f"cannot build a shape of type {type(node).__name__}")


def _build_union(node: Union) -> Regions:
    parts = [_flat(_build(s)) for s in node.shapes]
    result, _ = gmsh.model.occ.fuse(parts[0], [d for p in parts[1:] for d in p])
    return {node.region: _surfaces(result)}


def _build_intersection(node: Intersection) -> Regions:
    parts = [_flat(_build(s)) for s in node.shapes]
    result = parts[0]
    for other in parts[1:]:
        result, _ = gmsh.model.occ.intersect(result, other)
        result = _surfaces(result)
    if not result or _area(result) == 0:
        raise GeometryError("the shapes of an intersection have no area in common")
    return {node.region: result}


def _build_difference(node: Difference) -> Regions:
    regions = _build(node.base)
    for tool in node.tools:
        before = _area(_flat(regions))
        objects, owners = _objects(regions)
        _, mapping = gmsh.model.occ.cut(objects, _flat(_build(tool)))
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


def _build_composite(node: Composite) -> Regions:
    objects, owners = [], []
    for part in node.parts:  # later parts come later: their claim on an overlap wins
        o, w = _objects(_build(part))
        objects += o
        owners += w
    _, mapping = gmsh.model.occ.fragment(objects[:1], objects[1:])
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


def _build_symmetry_cut(node: SymmetryCut) -> Regions:
    regions = _build(node.shape)
    _check_symmetric(_flat(regions), node)
    objects, owners = _objects(regions)
    _, mapping = gmsh.model.occ.intersect(objects, [_half_plane(node, node.normal)])
    return _remap(owners, mapping)


_BUILDERS = {
    Union: _build_union,
    Intersection: _build_intersection,
    Difference: _build_difference,
    Composite: _build_composite,
    SymmetryCut: _build_symmetry_cut,
}


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
