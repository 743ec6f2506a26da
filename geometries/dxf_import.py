"""Sections from DXF drawings, read with ezdxf (the ``dxf`` extra).

Closed polylines (with bulges, which become true arcs), lines and arcs joined end to end,
circles and whole ellipses on the chosen layers make the loops of a section; loops inside
loops are holes, loops inside holes are parts again. Each piece keeps the name of its layer
(or of its colour) as its edge group, so the shape meshes, is cut and named like any shape
built in Python.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from pathlib import Path

import numpy as np

from .dxf_loops import Loop, Piece, check_loops, join_pieces, shape_of
from .errors import GeometryError
from .primitives import EdgeArc, EdgeEllipse
from .shape_tree import Shape

# Lengths of the file's units in m (the same names as mesh files take).
UNITS = {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "in": 0.0254, "ft": 0.3048}
# The drawing header's $INSUNITS codes for those units (0 means "unitless").
HEADER_UNITS = {1: "in", 2: "ft", 4: "mm", 5: "cm", 6: "m", 13: "um"}
# Entities that carry no outline: text, dimensions, fills, points, viewports.
IGNORED = {
    "TEXT",
    "MTEXT",
    "DIMENSION",
    "LEADER",
    "MLEADER",
    "MULTILEADER",
    "HATCH",
    "POINT",
    "VIEWPORT",
    "ATTDEF",
    "SOLID",
    "WIPEOUT",
}
# What to do with entities that carry an outline this reader does not take.
ADVICE = {
    "SPLINE": "convert the spline to a polyline or to arcs (or explode it) in the drawing program",
    "INSERT": "explode the block reference in the drawing program",
    "ELLIPSE": "only whole ellipses are read: convert the elliptical arc to a polyline",
}
RELATIVE_TOLERANCE = 1e-6  # default joining tolerance, of the drawing's extent


def read_dxf(
    path: str | Path,
    *,
    units: str | None = None,
    layers: Iterable[str] | None = None,
    group_by: str = "layer",
    region: str = "solid",
    tolerance: float | None = None,
) -> Shape:
    """Read the outlines of a DXF drawing as a shape with named edge groups.

    Parameters
    ----------
    path : str or Path
        The ``.dxf`` file. Its model space is read.
    units : str, optional
        Length unit of the drawing: one of ``m, cm, mm, um, in, ft``. Without it the header's
        ``$INSUNITS`` is used, and a drawing without units is refused. Given, it overrides
        the header.
    layers : iterable of str, optional
        The layers whose entities make the outline (all layers when ``None``).
    group_by : {"layer", "colour"}
        What names an edge group: the entity's layer, or its colour as ``colour_<index>``
        (the drawing's colour index, the layer's colour for "by layer").
    region : str
        The region the section fills.
    tolerance : float, optional
        Ends of lines, arcs and open polylines closer than this (m) are joined; default
        1e-6 of the drawing's extent.

    Returns
    -------
    Shape
        An :class:`Outline`, a :class:`Difference` (an outline with holes) or a
        :class:`Union` of several.

    Raises
    ------
    GeometryError
        For a missing or unreadable file, unknown units, no entities on the chosen layers,
        entities the reader does not take (splines, blocks), open, branching or crossing
        outlines; ``argument`` names the offending argument.

    Examples
    --------
    >>> import ezdxf, tempfile, pathlib
    >>> drawing = ezdxf.new()
    >>> _ = drawing.modelspace().add_lwpolyline(
    ...     [(0, 0), (40, 0), (40, 20), (0, 20)], close=True, dxfattribs={"layer": "skin"})
    >>> file = pathlib.Path(tempfile.mkdtemp()) / "plate.dxf"
    >>> drawing.saveas(file)
    >>> shape = read_dxf(file, units="mm")
    >>> [round(float(v), 4) for v in shape.bounds()], {e.group for e in shape.edges()}
    ([0.0, 0.0, 0.04, 0.02], {'skin'})
    """
    ezdxf = _ezdxf()
    path = Path(path)
    if not path.is_file():
        raise GeometryError(f"DXF file {str(path)!r} does not exist", argument="path")
    if group_by not in ("layer", "colour"):
        raise GeometryError(
            f"group_by must be 'layer' or 'colour', got {group_by!r}", argument="group_by"
        )
    try:
        document = ezdxf.readfile(path)
    except Exception as error:  # ezdxf raises several kinds for files that are not DXF
        raise GeometryError(
            f"ezdxf cannot read {str(path)!r} as a DXF drawing: {error}", argument="path"
        ) from None
    unit = _units(document, units)
    entities = _chosen(document, layers)
    loops, pieces = _loops_and_pieces(document, entities, group_by)
    extent = _extent(loops, pieces)
    if tolerance is None:
        joining = RELATIVE_TOLERANCE * extent
    elif isinstance(tolerance, int | float) and math.isfinite(tolerance) and tolerance > 0:
        joining = tolerance / UNITS[unit]
    else:
        raise GeometryError(
            f"tolerance must be a length > 0 m, got {tolerance!r}", argument="tolerance"
        )
    loops = loops + join_pieces(pieces, joining, unit)
    depths = check_loops(loops, unit)
    return shape_of(loops, depths, UNITS[unit], region)


def _ezdxf():
    try:
        import ezdxf
    except ImportError:
        raise GeometryError(
            "reading DXF drawings needs ezdxf: pip install 'soakwise[dxf]'", argument="path"
        ) from None
    return ezdxf


def _units(document, units: str | None) -> str:
    """The drawing's length unit: the one given, else the header's."""
    if units is not None:
        if units not in UNITS:
            raise GeometryError(
                f"units must be one of {sorted(UNITS)}, got {units!r}", argument="units"
            )
        return units
    code = int(document.header.get("$INSUNITS", 0))
    if code in HEADER_UNITS:
        return HEADER_UNITS[code]
    said = "has no units ($INSUNITS 0)" if code == 0 else f"has $INSUNITS {code}"
    raise GeometryError(
        f"the drawing {said}: give its length unit, one of {sorted(UNITS)}", argument="units"
    )


def _chosen(document, layers: Iterable[str] | None) -> list:
    """The model space's entities on ``layers`` (all when None), ignoring annotations; every
    layer asked for must hold some."""
    drawn = [e for e in document.modelspace() if e.dxftype() not in IGNORED]
    present = sorted({e.dxf.layer for e in drawn})
    if layers is None:
        if not drawn:
            raise GeometryError(
                "the drawing has no lines, arcs, polylines or circles", argument="layers"
            )
        return drawn
    wanted = [layers] if isinstance(layers, str) else [str(name) for name in layers]
    empty = [name for name in wanted if name not in present]
    if empty:
        close = [difflib.get_close_matches(name, present, n=1) for name in empty]
        hint = "; did you mean " + ", ".join(repr(c[0]) for c in close if c) + "?"
        raise GeometryError(
            f"no lines, arcs, polylines or circles on the layers {empty}; the drawing's "
            f"layers with entities: {present or 'none'}" + (hint if any(close) else ""),
            argument="layers",
        )
    return [e for e in drawn if e.dxf.layer in set(wanted)]


def _loops_and_pieces(document, entities: list, group_by: str) -> tuple[list, list]:
    """Whole loops (closed polylines, circles, ellipses) and loose pieces to join."""
    loops: list[Loop] = []
    pieces: list[Piece] = []
    for entity in entities:
        kind = entity.dxftype()
        group = _group(document, entity, group_by)
        origin = f"{kind} (handle {entity.dxf.handle}) on layer {entity.dxf.layer!r}"
        _check_plane(entity, origin)
        if kind == "LINE":
            start, end = (
                (entity.dxf.start.x, entity.dxf.start.y),
                (entity.dxf.end.x, entity.dxf.end.y),
            )
            if start != end:
                pieces.append(Piece(start, end, 0.0, group, origin))
        elif kind == "ARC":
            _arc(entity, group, origin, loops, pieces)
        elif kind == "CIRCLE":
            loops.append(_circle(entity, group, origin))
        elif kind in ("LWPOLYLINE", "POLYLINE"):
            _polyline(entity, group, origin, loops, pieces)
        elif kind == "ELLIPSE" and _whole_ellipse(entity):
            loops.append(_ellipse(entity, group, origin))
        else:
            advice = ADVICE.get(kind, "draw the outline with lines, arcs, polylines or circles")
            raise GeometryError(
                f"{origin}: {kind} entities are not read; {advice}", argument="layers"
            )
    return loops, pieces


def _group(document, entity, group_by: str) -> str:
    if group_by == "layer":
        return str(entity.dxf.layer)
    colour = entity.dxf.color
    if colour == 256:  # by layer
        colour = document.layers.get(entity.dxf.layer).color
    return f"colour_{abs(int(colour))}"


def _check_plane(entity, origin: str) -> None:
    """Entities must lie in the drawing's x-y plane (extrusion along ±z)."""
    extrusion = entity.dxf.get("extrusion", (0.0, 0.0, 1.0))
    if abs(abs(extrusion[2]) - 1.0) > 1e-9:
        raise GeometryError(
            f"{origin} does not lie in the x-y plane (extrusion {tuple(extrusion)!r})",
            argument="layers",
        )


def _wcs(entity, point) -> tuple[float, float]:
    """An entity's point in its object coordinate system as (x, y) in the drawing: with an
    extrusion along −z the object's x axis points along −x."""
    mirrored = entity.dxf.get("extrusion", (0.0, 0.0, 1.0))[2] < 0
    return (-point[0] if mirrored else point[0], point[1])


def _arc(entity, group: str, origin: str, loops: list, pieces: list) -> None:
    start, end = entity.start_point, entity.end_point  # in the drawing's coordinates
    sweep = math.radians((entity.dxf.end_angle - entity.dxf.start_angle) % 360.0)
    if entity.dxf.get("extrusion", (0.0, 0.0, 1.0))[2] < 0:
        sweep = -sweep  # counter-clockwise about −z is clockwise in the drawing
    if sweep == 0.0:  # equal angles: the whole circle
        loops.append(_circle(entity, group, origin))
        return
    pieces.append(Piece((start.x, start.y), (end.x, end.y), sweep, group, origin))


def _polyline(entity, group: str, origin: str, loops: list, pieces: list) -> None:
    """A polyline's pieces (bulge b: an arc of included angle 4·atan(b)); a closed one is a
    loop on its own, an open one joins the loose pieces."""
    if entity.dxftype() == "LWPOLYLINE":
        points = [(x, y, b) for x, y, b in entity.get_points("xyb")]
        closed = bool(entity.closed)
    else:
        if not (entity.is_2d_polyline or entity.is_3d_polyline):
            raise GeometryError(
                f"{origin}: a polygon mesh or polyface is not an outline; draw the outline "
                "with a 2-D polyline",
                argument="layers",
            )
        points = [(v.dxf.location[0], v.dxf.location[1], v.dxf.bulge) for v in entity.vertices]
        closed = bool(entity.is_closed)
    sign = -1.0 if entity.dxf.get("extrusion", (0.0, 0.0, 1.0))[2] < 0 else 1.0
    points = [(sign * x, y, sign * b) for x, y, b in points]
    count = len(points) if closed else len(points) - 1
    chain = []
    for i in range(count):
        (x0, y0, bulge), (x1, y1, _) = points[i], points[(i + 1) % len(points)]
        if (x0, y0) != (x1, y1):
            chain.append(Piece((x0, y0), (x1, y1), 4.0 * math.atan(bulge), group, origin))
    if closed and len(chain) >= 2:
        loops.append(Loop(tuple(chain), origin=origin))
    elif closed:
        raise GeometryError(f"{origin} is closed but encloses no area", argument="path")
    else:
        pieces.extend(chain)


def _whole_ellipse(entity) -> bool:
    turn = (entity.dxf.end_param - entity.dxf.start_param) % (2 * math.pi)
    return turn < 1e-9 or abs(turn - 2 * math.pi) < 1e-9


def _circle(entity, group: str, origin: str) -> Loop:
    centre = _wcs(entity, entity.dxf.center)
    return Loop(
        whole=EdgeArc(group, centre, float(entity.dxf.radius), 0.0, 2 * math.pi), origin=origin
    )


def _ellipse(entity, group: str, origin: str) -> Loop:
    """A whole ellipse (given in the drawing's coordinates, whatever its extrusion)."""
    centre, major = entity.dxf.center, entity.dxf.major_axis
    semi = math.hypot(major[0], major[1])
    angle = math.atan2(major[1], major[0])
    ellipse = EdgeEllipse(group, (centre[0], centre[1]), semi, semi * entity.dxf.ratio, angle)
    return Loop(whole=ellipse, origin=origin)


def _extent(loops: list[Loop], pieces: list[Piece]) -> float:
    """The larger side of the box around everything read, in drawing units."""
    points = [loop.polyline() for loop in loops] + [p.sample(3) for p in pieces]
    stacked = np.vstack(points)
    return float(np.ptp(stacked, axis=0).max()) or 1.0
