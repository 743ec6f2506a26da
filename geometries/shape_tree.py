"""The shape tree: the base of every shape and the nodes that combine shapes (booleans,
composites, symmetry cuts, renaming).

Shapes are plain data: nothing here calls gmsh. :mod:`geometries.meshing` turns a shape tree
into gmsh geometry. Every shape lists its edge primitives in *priority order*: when a boundary
curve lies on primitives of several groups, the later primitive names it (a union's later
operand, a difference's cutting tool, a symmetry cut's line).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from .checks import check_name, check_point
from .errors import GeometryError
from .primitives import EdgeArc, EdgeEllipse, EdgePrimitive, EdgeSegment, Placement

SAMPLES_PER_PIECE = 24  # samples of each edge primitive for bounds and outline checks


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

    def outline_points(self) -> np.ndarray:
        """Sample points (n, 2) in m that span the shape's outline: every edge primitive's
        samples, with symmetry cuts' lines clipped to the part they bound (a nested cut's
        line reaches far beyond the part, so its samples never count)."""
        return np.vstack([edge_points(e) for e in self.edges()])

    def bounds(self) -> tuple[float, float, float, float]:
        """(x_min, y_min, x_max, y_max) of the outline in m."""
        points = self.outline_points()
        return (*points.min(axis=0), *points.max(axis=0))  # type: ignore[return-value]

    @property
    def size(self) -> float:
        """The larger extent in m, the scale for geometric tolerances."""
        x0, y0, x1, y1 = self.bounds()
        return max(x1 - x0, y1 - y0)

    def mesh(self, size: float, **options):
        """Mesh with gmsh as a planar section; see :func:`geometries.mesh_section`."""
        from .meshing import mesh_section  # gmsh is loaded only when something is meshed

        return mesh_section(self, size, **options)


def edge_points(edge: EdgePrimitive) -> np.ndarray:
    """Samples of ``edge`` (n, 2) in m, with the points where a curved edge reaches its
    extreme x and y, so that bounds built from them are exact."""
    points = edge.sample(SAMPLES_PER_PIECE)
    if isinstance(edge, EdgeArc):
        low, high = sorted((edge.start_angle, edge.start_angle + edge.sweep))
        quarters = np.arange(math.ceil(low / (math.pi / 2)), math.floor(high / (math.pi / 2)) + 1)
        angles = quarters * (math.pi / 2)
        extremes = np.asarray(edge.centre) + edge.radius * np.column_stack(
            [np.cos(angles), np.sin(angles)]
        )
        return np.vstack([points, extremes])
    if isinstance(edge, EdgeEllipse):
        # x(t) = cx + cos·a·cos t − sin·b·sin t is extreme where tan t = −sin·b / (cos·a);
        # y(t) = cy + sin·a·cos t + cos·b·sin t where tan t = cos·b / (sin·a).
        c, s = math.cos(edge.angle), math.sin(edge.angle)
        a, b = edge.semi_x, edge.semi_y
        t = np.array([math.atan2(-s * b, c * a), math.atan2(c * b, s * a)])
        t = np.concatenate([t, t + math.pi])
        x, y = a * np.cos(t), b * np.sin(t)
        extremes = np.asarray(edge.centre) + np.column_stack([c * x - s * y, s * x + c * y])
        return np.vstack([points, extremes])
    return points


def _shapes(shapes, what: str) -> tuple[Shape, ...]:
    shapes = tuple(shapes)
    for s in shapes:
        if not isinstance(s, Shape):
            raise GeometryError(f"{what} takes shapes, got {s!r}")
    return shapes


@dataclass(frozen=True)
class _Combination(Shape):
    """Shapes combined into one region (the first shape's unless ``region`` is given); the
    kinds differ only in how gmsh combines them."""

    shapes: tuple[Shape, ...]
    region: str | None = None
    what: ClassVar[str] = "a combination"  # in messages

    def __post_init__(self) -> None:
        object.__setattr__(self, "shapes", _shapes(self.shapes, type(self).__name__))
        if len(self.shapes) < 2:
            raise GeometryError(f"{self.what} needs at least two shapes")
        if self.region is None:
            object.__setattr__(self, "region", self.shapes[0].region)

    def expanded(self) -> _Combination:
        return self

    def edges(self):
        return tuple(e for s in self.shapes for e in s.edges())

    def outline_points(self) -> np.ndarray:
        return np.vstack([s.outline_points() for s in self.shapes])

    def placed(self, placement):
        return type(self)(tuple(s.placed(placement) for s in self.shapes), self.region)

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return 1


class Union(_Combination):
    """All of the shapes as one region (the first shape's unless ``region`` is given)."""

    what = "a union"


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

    def outline_points(self) -> np.ndarray:
        return np.vstack([self.base.outline_points(), *(t.outline_points() for t in self.tools)])

    def placed(self, placement):
        return Difference(
            self.base.placed(placement),
            tuple(t.placed(placement) for t in self.tools),
            self.region,
        )

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return self.base.symmetry_multiplier(axisymmetric)


class Intersection(_Combination):
    """The part common to all the shapes."""

    what = "an intersection"


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

    def outline_points(self) -> np.ndarray:
        return np.vstack([s.outline_points() for s in self.parts])

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

    def outline_points(self) -> np.ndarray:
        # The kept side's samples, and every sample projected onto the cut line: never
        # beyond the cut and, the shape being its own mirror image, never beyond the kept
        # half along it. The inner shape's points are already clipped by its own cuts.
        points = self.shape.outline_points()
        p, n = np.asarray(self.point), self.normal
        side = (points - p) @ n
        kept = points[side >= 0]
        projected = points - side[:, None] * n
        return np.vstack([kept, projected])

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

    def outline_points(self) -> np.ndarray:
        return self.shape.outline_points()

    def symmetry_multiplier(self, axisymmetric: bool = False) -> int:
        return self.shape.symmetry_multiplier(axisymmetric)
