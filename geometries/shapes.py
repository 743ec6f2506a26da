"""Shapes of a section: outlines made of named edge primitives, basic shapes built on them,
booleans, placements and symmetry cuts.

Shapes are plain data: nothing here calls gmsh. :mod:`geometries.meshing` turns a shape tree
into gmsh geometry. Every shape lists its edge primitives in *priority order*: when a boundary
curve lies on primitives of several groups, the later primitive names it (a union's later
operand, a difference's cutting tool, a symmetry cut's line).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from .errors import GeometryError
from .primitives import EdgeArc, EdgeEllipse, EdgePrimitive, EdgeSegment, Placement

SAMPLES_PER_PIECE = 24


def check_name(value: object, what: str) -> str:
    if not isinstance(value, str) or not value.strip():
        raise GeometryError(f"{what} must be a non-empty string, got {value!r}")
    return value


def check_length(value: object, what: str) -> float:
    if not isinstance(value, int | float | np.floating | np.integer) or not (
        math.isfinite(value) and value > 0
    ):
        raise GeometryError(f"{what} must be a finite length > 0 m, got {value!r}")
    return float(value)


def check_point(value: object, what: str) -> tuple[float, float]:
    try:
        x, y = (float(v) for v in value)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise GeometryError(f"{what} must be a point (x, y) in m, got {value!r}") from None
    if not (math.isfinite(x) and math.isfinite(y)):
        raise GeometryError(f"{what} must be a finite point, got {value!r}")
    return (x, y)


class Shape:
    """Base of all shapes. Subclasses provide :meth:`expanded` or are expanded forms."""

    region: str

    def expanded(self) -> Shape:
        """An equivalent shape made only of :class:`Outline` and boolean nodes."""
        raise NotImplementedError

    def edges(self) -> tuple[EdgePrimitive, ...]:
        """The named edge primitives, in priority order (later ones win)."""
        return self.expanded().edges()

    def placed(self, placement: Placement) -> Shape:
        return self.expanded().placed(placement)

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        """How many copies of this shape make the whole part (2 per symmetry cut; a cut along
        the axis of an axisymmetric section does not count: the revolution covers it)."""
        return self.expanded().symmetry_multiplier(axisymmetric)

    # Placement -----------------------------------------------------------------------------
    def moved(self, dx: float, dy: float) -> Shape:
        """The shape translated by (dx, dy) m."""
        return self.placed(Placement.translation(dx, dy))

    def rotated(self, degrees: float, about: tuple[float, float] = (0.0, 0.0)) -> Shape:
        """The shape rotated counter-clockwise by ``degrees`` about the point ``about`` (m)."""
        return self.placed(Placement.rotation(degrees, about))

    def mirrored(
        self, point: tuple[float, float] = (0.0, 0.0), direction: tuple[float, float] = (0.0, 1.0)
    ) -> Shape:
        """The shape reflected in the line through ``point`` along ``direction``."""
        if math.hypot(*direction) == 0:
            raise GeometryError(f"mirror direction must be non-zero, got {direction!r}")
        return self.placed(Placement.reflection(point, direction))

    # Booleans ------------------------------------------------------------------------------
    def __or__(self, other: Shape) -> Union:
        return Union((self, other))

    def __sub__(self, other: Shape) -> Difference:
        return Difference(self, (other,))

    def __and__(self, other: Shape) -> Intersection:
        return Intersection((self, other))

    def symmetry_cut(
        self,
        point: tuple[float, float] = (0.0, 0.0),
        keep: tuple[float, float] = (1.0, 0.0),
        name: str = "symmetry",
    ) -> SymmetryCut:
        """Keep the half on the side ``keep`` points to of the line through ``point``
        perpendicular to ``keep``; the cut becomes edge group ``name`` (no heat flow).

        The shape must be symmetric about the line; meshing checks it.
        """
        return SymmetryCut(
            self,
            check_point(point, "symmetry cut point"),
            check_point(keep, "symmetry cut direction"),
            name,
        )

    def renamed(self, names: Mapping[str, str]) -> Shape:
        """The shape with edge groups renamed by ``names`` (old → new; merging is allowed)."""
        return Renamed(self, dict(names))

    def bounds(self) -> tuple[float, float, float, float]:
        """(x_min, y_min, x_max, y_max) of the outline in m."""
        points = np.vstack([e.sample(SAMPLES_PER_PIECE) for e in self.edges()])
        return (*points.min(axis=0), *points.max(axis=0))  # type: ignore[return-value]

    @property
    def size(self) -> float:
        """The larger extent in m, the scale for geometric tolerances."""
        x0, y0, x1, y1 = self.bounds()
        return max(x1 - x0, y1 - y0)

    def mesh(self, size: float, **options):
        """Mesh with gmsh; see :meth:`geometries.Section.mesh`."""
        from .section import Section

        return Section(self).mesh(size, **options)


# --------------------------------------------------------------------------------------------
# The leaf: one closed outline
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Outline(Shape):
    """One closed outline of segments and arcs (or a single whole circle or ellipse).

    Parameters
    ----------
    pieces : sequence of edge primitives
        Consecutive pieces, each ending where the next starts, the last ending at the first's
        start. The outline must not cross itself and must enclose a non-zero area.
    region : str
        Name of the region (material zone) it fills.
    """

    pieces: tuple[EdgePrimitive, ...]
    region: str = "solid"

    def __post_init__(self) -> None:
        object.__setattr__(self, "pieces", tuple(self.pieces))
        check_name(self.region, "region")
        if not self.pieces:
            raise GeometryError("an outline needs at least one piece")
        for piece in self.pieces:
            check_name(piece.group, "edge group name")
        closed = [p for p in self.pieces if getattr(p, "full", False)]
        if closed and len(self.pieces) > 1:
            raise GeometryError("a whole circle or ellipse must be an outline on its own")
        points = self.polyline()
        scale = float(np.ptp(points, axis=0).max())
        if not closed:
            for a, b in zip(self.pieces, self.pieces[1:] + self.pieces[:1], strict=True):
                if math.dist(a.end, b.start) > 1e-9 * max(scale, 1e-300):
                    raise GeometryError(
                        f"outline is not closed: a piece ends at {_fmt(a.end)} m but the next "
                        f"starts at {_fmt(b.start)} m"
                    )
        crossing = _self_intersection(points)
        if crossing is not None:
            raise GeometryError(f"outline crosses itself near {_fmt(crossing)} m")
        area = _signed_area(points)
        if not math.isfinite(area) or abs(area) <= 1e-12 * scale**2:
            raise GeometryError(f"outline encloses no area (area {area:.3g} m^2)")

    def polyline(self) -> np.ndarray:
        """The outline as a closed polyline of sample points, (n, 2) in m."""
        return np.vstack([p.sample(SAMPLES_PER_PIECE)[:-1] for p in self.pieces])

    def expanded(self) -> Outline:
        return self

    def edges(self) -> tuple[EdgePrimitive, ...]:
        return self.pieces

    def placed(self, placement: Placement) -> Outline:
        pieces = tuple(p.placed(placement) for p in self.pieces)
        return Outline(pieces, self.region)

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return 1


def _fmt(point) -> str:
    return f"({point[0]:.6g}, {point[1]:.6g})"


def _signed_area(points: np.ndarray) -> float:
    x, y = points[:, 0], points[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def _self_intersection(points: np.ndarray) -> tuple[float, float] | None:
    """A point where two non-adjacent edges of the closed polyline cross, if any."""
    a = points
    b = np.roll(points, -1, axis=0)
    n = len(a)
    d = b - a
    for i in range(n):
        j = np.arange(i + 2, n if i > 0 else n - 1)
        if len(j) == 0:
            continue
        denom = d[i, 0] * d[j, 1] - d[i, 1] * d[j, 0]
        ok = np.abs(denom) > 1e-300
        r = a[j] - a[i]
        with np.errstate(divide="ignore", invalid="ignore"):
            s = (r[:, 0] * d[j, 1] - r[:, 1] * d[j, 0]) / denom
            t = (r[:, 0] * d[i, 1] - r[:, 1] * d[i, 0]) / denom
        hit = ok & (s > 1e-9) & (s < 1 - 1e-9) & (t > 1e-9) & (t < 1 - 1e-9)
        if np.any(hit):
            k = int(np.flatnonzero(hit)[0])
            return tuple(a[i] + s[k] * d[i])  # type: ignore[return-value]
    return None


# --------------------------------------------------------------------------------------------
# Basic shapes
# --------------------------------------------------------------------------------------------


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
            raise GeometryError(f"corner {i} at {_fmt(p[i])} m is straight and cannot be rounded")
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
                f"corner radii at {_fmt(p[i])} and {_fmt(p[j])} m do not fit on the "
                f"{length:.6g} m side between them"
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


# --------------------------------------------------------------------------------------------
# Booleans, cuts, renaming
# --------------------------------------------------------------------------------------------


def _shapes(shapes, what: str) -> tuple[Shape, ...]:
    shapes = tuple(shapes)
    for s in shapes:
        if not isinstance(s, Shape):
            raise GeometryError(f"{what} takes shapes, got {s!r}")
    return shapes


@dataclass(frozen=True)
class Union(Shape):
    """All of the shapes as one region (the first shape's unless ``region`` is given)."""

    shapes: tuple[Shape, ...]
    region: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "shapes", _shapes(self.shapes, "Union"))
        if len(self.shapes) < 2:
            raise GeometryError("a union needs at least two shapes")
        if self.region is None:
            object.__setattr__(self, "region", self.shapes[0].region)

    def expanded(self) -> Union:
        return self

    def edges(self):
        return tuple(e for s in self.shapes for e in s.edges())

    def placed(self, placement):
        return Union(tuple(s.placed(placement) for s in self.shapes), self.region)

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return 1


@dataclass(frozen=True)
class Difference(Shape):
    """``base`` with every ``tools`` shape removed (holes, bores, notches)."""

    base: Shape
    tools: tuple[Shape, ...]
    region: str | None = None

    def __post_init__(self) -> None:
        _shapes((self.base,), "Difference")
        object.__setattr__(self, "tools", _shapes(self.tools, "Difference"))
        if not self.tools:
            raise GeometryError("a difference needs at least one shape to remove")
        if self.region is None:
            object.__setattr__(self, "region", self.base.region)

    def expanded(self) -> Difference:
        return self

    def edges(self):
        return self.base.edges() + tuple(e for t in self.tools for e in t.edges())

    def placed(self, placement):
        return Difference(
            self.base.placed(placement),
            tuple(t.placed(placement) for t in self.tools),
            self.region,
        )

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return self.base.symmetry_multiplier(axisymmetric)


@dataclass(frozen=True)
class Intersection(Shape):
    """The part common to all the shapes."""

    shapes: tuple[Shape, ...]
    region: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "shapes", _shapes(self.shapes, "Intersection"))
        if len(self.shapes) < 2:
            raise GeometryError("an intersection needs at least two shapes")
        if self.region is None:
            object.__setattr__(self, "region", self.shapes[0].region)

    def expanded(self) -> Intersection:
        return self

    def edges(self):
        return tuple(e for s in self.shapes for e in s.edges())

    def placed(self, placement):
        return Intersection(tuple(s.placed(placement) for s in self.shapes), self.region)

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return 1


@dataclass(frozen=True)
class Composite(Shape):
    """Several regions in one section, meshed conformingly along their interfaces.

    Each part keeps its own region; where parts overlap, the later part owns the overlap
    (a coating listed after its substrate covers it).
    """

    parts: tuple[Shape, ...]

    def __post_init__(self) -> None:
        object.__setattr__(self, "parts", _shapes(self.parts, "Composite"))
        if len(self.parts) < 2:
            raise GeometryError("a composite needs at least two parts")

    @property
    def region(self) -> str:  # type: ignore[override]
        return self.parts[0].region

    def expanded(self) -> Composite:
        return self

    def edges(self):
        return tuple(e for s in self.parts for e in s.edges())

    def placed(self, placement):
        return Composite(tuple(s.placed(placement) for s in self.parts))

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return 1


@dataclass(frozen=True)
class SymmetryCut(Shape):
    """The half of ``shape`` on the side ``keep`` points to of the line through ``point``."""

    shape: Shape
    point: tuple[float, float]
    keep: tuple[float, float]
    name: str = "symmetry"

    def __post_init__(self) -> None:
        check_name(self.name, "symmetry edge name")
        if math.hypot(*self.keep) == 0:
            raise GeometryError("symmetry cut direction must be non-zero")

    @property
    def region(self) -> str:  # type: ignore[override]
        return self.shape.region

    @property
    def normal(self) -> np.ndarray:
        return np.asarray(self.keep) / math.hypot(*self.keep)

    def cut_line(self) -> EdgeSegment:
        """The cut as a segment spanning the shape's bounds (generously)."""
        x0, y0, x1, y1 = self.shape.bounds()
        reach = 2.0 * math.hypot(x1 - x0, y1 - y0) + math.dist(self.point, (x0, y0))
        along = np.array([-self.normal[1], self.normal[0]])
        p = np.asarray(self.point)
        return EdgeSegment(self.name, tuple(p - reach * along), tuple(p + reach * along))

    def expanded(self) -> SymmetryCut:
        return self

    def edges(self):
        return self.shape.edges() + (self.cut_line(),)

    def bounds(self):
        # The kept side's samples, and every sample projected onto the cut line: never
        # beyond the cut, at most a little generous along it.
        points = np.vstack([e.sample(SAMPLES_PER_PIECE) for e in self.shape.edges()])
        p, n = np.asarray(self.point), self.normal
        side = (points - p) @ n
        kept = points[side >= 0]
        projected = points - side[:, None] * n
        both = np.vstack([kept, projected])
        return (*both.min(axis=0), *both.max(axis=0))

    def placed(self, placement):
        return SymmetryCut(
            self.shape.placed(placement),
            placement.point(self.point),
            tuple(np.asarray(placement.matrix) @ self.normal),
            self.name,
        )

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        on_axis = axisymmetric and abs(self.normal[1]) < 1e-12 and abs(self.point[0]) < 1e-12
        return (1 if on_axis else 2) * self.shape.symmetry_multiplier(axisymmetric)


@dataclass(frozen=True)
class Renamed(Shape):
    """``shape`` with its edge groups renamed (old name → new name)."""

    shape: Shape
    names: Mapping[str, str]

    def __post_init__(self) -> None:
        known = {e.group for e in self.shape.edges()}
        unknown = sorted(set(self.names) - known)
        if unknown:
            raise GeometryError(
                f"cannot rename edge group(s) {unknown}: the shape's groups are {sorted(known)}"
            )
        for new in self.names.values():
            check_name(new, "new edge group name")

    @property
    def region(self) -> str:  # type: ignore[override]
        return self.shape.region

    def expanded(self) -> Shape:
        return self

    def edges(self):
        return tuple(e.renamed(self.names.get(e.group, e.group)) for e in self.shape.edges())

    def placed(self, placement):
        return Renamed(self.shape.placed(placement), self.names)

    def bounds(self):
        return self.shape.bounds()

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return self.shape.symmetry_multiplier(axisymmetric)
