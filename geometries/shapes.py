"""The basic shapes of a section: polygons (rounded or sharp), rectangles, circles, ellipses
and rings, each expanded into an :class:`~geometries.outline.Outline` or a difference of them.

Shapes are plain data: nothing here calls gmsh.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from .checks import check_length, check_name, check_point, format_point
from .errors import GeometryError
from .outline import Outline
from .primitives import EdgeArc, EdgeEllipse, EdgePrimitive, EdgeSegment
from .shape_tree import Difference, Shape


def rounded_polygon(
    points: Sequence[tuple[float, float]],
    side_names: Sequence[str],
    corner_radii: Sequence[float],
    corner_names: Sequence[str],
) -> tuple[EdgePrimitive, ...]:
    """Pieces of a polygon whose corners are rounded with the given radii (0 for sharp)."""
    p = np.asarray(points, dtype=float)
    n = len(p)
    trims = np.zeros(n)  # tangent distance at each corner
    arcs: list[EdgeArc | None] = [None] * n
    for i in range(n):
        r = corner_radii[i]
        if r == 0:
            continue
        to_prev = p[i - 1] - p[i]
        to_next = p[(i + 1) % n] - p[i]
        u1, u2 = to_prev / np.linalg.norm(to_prev), to_next / np.linalg.norm(to_next)
        half = 0.5 * math.acos(float(np.clip(u1 @ u2, -1.0, 1.0)))
        if half < 1e-9 or abs(half - math.pi / 2) < 1e-12:
            raise GeometryError(
                f"corner {i} at {format_point(p[i])} m is straight and cannot be rounded"
            )
        trims[i] = r / math.tan(half)
        bisector = (u1 + u2) / np.linalg.norm(u1 + u2)
        centre = p[i] + bisector * r / math.sin(half)
        t1, t2 = p[i] + u1 * trims[i], p[i] + u2 * trims[i]
        a1 = math.atan2(t1[1] - centre[1], t1[0] - centre[0])
        a2 = math.atan2(t2[1] - centre[1], t2[0] - centre[0])
        sweep = (a2 - a1 + math.pi) % (2 * math.pi) - math.pi  # the short way round
        arcs[i] = EdgeArc(corner_names[i], tuple(centre), float(r), a1, sweep)
    pieces: list[EdgePrimitive] = []
    for i in range(n):
        j = (i + 1) % n
        side = p[j] - p[i]
        length = float(np.linalg.norm(side))
        if trims[i] + trims[j] > length * (1 + 1e-12):
            raise GeometryError(
                f"corner radii at {format_point(p[i])} and {format_point(p[j])} m do not fit on "
                f"the {length:.6g} m side between them"
            )
        if arcs[i] is not None:
            pieces.append(arcs[i])
        start = p[i] + side / length * trims[i]
        end = p[j] - side / length * trims[j]
        if np.linalg.norm(end - start) > 1e-12 * length:
            pieces.append(EdgeSegment(side_names[i], tuple(start), tuple(end)))
    return tuple(pieces)


@dataclass(frozen=True)
class Polygon(Shape):
    """A polygon from its corner points, optionally with rounded corners.

    Parameters
    ----------
    points : sequence of (x, y)
        Corners in m, in order (either direction); at least three.
    edge_names : str or sequence of str
        One group for all sides, or one per side (side i runs from point i to point i + 1).
    corner_radius : float or sequence of float
        Fillet radius in m at every corner, or one per corner; 0 for a sharp corner.
    corner_name : str
        Group of the fillet arcs.
    region : str
        Region name.
    """

    points: tuple[tuple[float, float], ...]
    edge_names: str | tuple[str, ...] = "outline"
    corner_radius: float | tuple[float, ...] = 0.0
    corner_name: str = "corners"
    region: str = "solid"

    def __post_init__(self) -> None:
        points = tuple(check_point(p, f"polygon point {i}") for i, p in enumerate(self.points))
        if len(points) < 3:
            raise GeometryError(f"a polygon needs at least 3 points, got {len(points)}")
        object.__setattr__(self, "points", points)
        self._per_corner(self.edge_names, "edge_names")
        radii = self._per_corner(self.corner_radius, "corner_radius")
        for r in radii:
            if not (isinstance(r, int | float) and math.isfinite(r) and r >= 0):
                raise GeometryError(f"corner radius must be a length >= 0 m, got {r!r}")
        self.expanded()  # refuse crossing or zero-area outlines now, not at meshing time

    def _per_corner(self, value, what: str) -> tuple:
        if isinstance(value, str | int | float):
            return (value,) * len(self.points)
        value = tuple(value)
        if len(value) != len(self.points):
            raise GeometryError(
                f"{what} needs one value per side/corner ({len(self.points)}), got {len(value)}"
            )
        return value

    def expanded(self) -> Outline:
        pieces = rounded_polygon(
            self.points,
            self._per_corner(self.edge_names, "edge_names"),
            self._per_corner(self.corner_radius, "corner_radius"),
            (self.corner_name,) * len(self.points),
        )
        return Outline(pieces, self.region)


_RECTANGLE_SIDES = ("bottom", "right", "top", "left")


@dataclass(frozen=True)
class Rectangle(Shape):
    """An axis-aligned rectangle, optionally with rounded corners.

    Parameters
    ----------
    width, height : float
        Side lengths in m along x and y; both > 0.
    corner : tuple of float
        Lower-left corner (x, y) in m.
    edge_names : dict, optional
        Edge group for each side, keyed by ``"bottom"``, ``"right"``, ``"top"``, ``"left"``.
        Sides not named keep their side name. Several sides may share one group.
    corner_radius : float
        Radius of the four rounded corners in m (0 for sharp corners); the arcs form the
        group ``corner_name``.
    region : str
        Name of the region (material zone) the rectangle fills.

    Examples
    --------
    A quarter of a 40 mm x 20 mm bar, cut on its two symmetry lines:

    >>> quarter = Rectangle(0.020, 0.010,
    ...     edge_names={"left": "symmetry", "bottom": "symmetry",
    ...                 "right": "cooled", "top": "cooled"})
    >>> sorted({e.group for e in quarter.edges()})
    ['cooled', 'symmetry']
    """

    width: float
    height: float
    corner: tuple[float, float] = (0.0, 0.0)
    edge_names: Mapping[str, str] = field(default_factory=dict)
    corner_radius: float = 0.0
    corner_name: str = "corners"
    region: str = "solid"

    def __post_init__(self) -> None:
        check_length(self.width, "Rectangle width")
        check_length(self.height, "Rectangle height")
        check_point(self.corner, "Rectangle corner")
        unknown = set(self.edge_names) - set(_RECTANGLE_SIDES)
        if unknown:
            raise GeometryError(
                f"Rectangle edge_names has unknown side(s) {sorted(unknown)}; "
                f"valid sides are {list(_RECTANGLE_SIDES)}"
            )
        for side, group in self.edge_names.items():
            check_name(group, f"edge name for side {side!r}")
        check_name(self.region, "region")
        r = self.corner_radius
        if not (isinstance(r, int | float) and math.isfinite(r) and 0 <= r):
            raise GeometryError(f"Rectangle corner_radius must be a length >= 0 m, got {r!r}")
        if 2 * r > min(self.width, self.height) * (1 + 1e-12):
            raise GeometryError(
                f"Rectangle corner_radius {r} m is more than half the shorter side "
                f"({min(self.width, self.height)} m)"
            )
        self.expanded()

    def expanded(self) -> Outline:
        x0, y0 = self.corner
        x1, y1 = x0 + self.width, y0 + self.height
        names = [self.edge_names.get(side, side) for side in _RECTANGLE_SIDES]
        pieces = rounded_polygon(
            [(x0, y0), (x1, y0), (x1, y1), (x0, y1)],
            names,
            [self.corner_radius] * 4,
            [self.corner_name] * 4,
        )
        return Outline(pieces, self.region)


@dataclass(frozen=True)
class Circle(Shape):
    """A disk of ``radius`` (m) about ``centre``; its edge is group ``name``."""

    radius: float
    centre: tuple[float, float] = (0.0, 0.0)
    name: str = "outline"
    region: str = "solid"

    def __post_init__(self) -> None:
        check_length(self.radius, "Circle radius")
        check_point(self.centre, "Circle centre")
        check_name(self.name, "Circle edge name")

    def expanded(self) -> Outline:
        centre = check_point(self.centre, "Circle centre")
        return Outline(
            (EdgeArc(self.name, centre, float(self.radius), 0.0, 2 * math.pi),), self.region
        )


@dataclass(frozen=True)
class Ellipse(Shape):
    """An elliptical section with semi-axes ``semi_x``, ``semi_y`` (m), turned by ``degrees``."""

    semi_x: float
    semi_y: float
    centre: tuple[float, float] = (0.0, 0.0)
    degrees: float = 0.0
    name: str = "outline"
    region: str = "solid"

    def __post_init__(self) -> None:
        check_length(self.semi_x, "Ellipse semi_x")
        check_length(self.semi_y, "Ellipse semi_y")
        check_point(self.centre, "Ellipse centre")

    def expanded(self) -> Outline:
        centre = check_point(self.centre, "Ellipse centre")
        edge = EdgeEllipse(
            self.name, centre, float(self.semi_x), float(self.semi_y), math.radians(self.degrees)
        )
        return Outline((edge,), self.region)


@dataclass(frozen=True)
class Annulus(Shape):
    """A ring between ``outer_radius`` and ``inner_radius`` (m); edges ``outer`` and ``bore``."""

    outer_radius: float
    inner_radius: float
    centre: tuple[float, float] = (0.0, 0.0)
    outer_name: str = "outer"
    inner_name: str = "bore"
    region: str = "solid"

    def __post_init__(self) -> None:
        check_length(self.outer_radius, "Annulus outer_radius")
        check_length(self.inner_radius, "Annulus inner_radius")
        if self.inner_radius >= self.outer_radius:
            raise GeometryError(
                f"Annulus inner_radius {self.inner_radius} m must be below the outer_radius "
                f"{self.outer_radius} m"
            )

    def expanded(self) -> Difference:
        return Difference(
            Circle(self.outer_radius, self.centre, self.outer_name, self.region),
            (Circle(self.inner_radius, self.centre, self.inner_name, self.region),),
        )
