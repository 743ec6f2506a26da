"""Named edge primitives: the exact pieces a section's outline is made of.

Each primitive knows its edge group, its geometry, how far points are from it, and how it
moves under a placement. The meshing step builds gmsh curves from them and, after gmsh's
booleans, recognises every boundary curve by testing sample points against them, so group
names survive whatever gmsh does to its entity numbers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np


@dataclass(frozen=True)
class Placement:
    """A rigid placement x' = R·x + t (rotation or reflection, then translation), lengths in m."""

    matrix: tuple[tuple[float, float], tuple[float, float]] = ((1.0, 0.0), (0.0, 1.0))
    offset: tuple[float, float] = (0.0, 0.0)

    @classmethod
    def translation(cls, dx: float, dy: float) -> Placement:
        return cls(offset=(float(dx), float(dy)))

    @classmethod
    def rotation(cls, degrees: float, about: tuple[float, float] = (0.0, 0.0)) -> Placement:
        c, s = math.cos(math.radians(degrees)), math.sin(math.radians(degrees))
        matrix = np.array([[c, -s], [s, c]])
        centre = np.asarray(about, dtype=float)
        return cls(_tuple2(matrix), tuple(centre - matrix @ centre))

    @classmethod
    def reflection(cls, point: tuple[float, float], direction: tuple[float, float]) -> Placement:
        d = np.asarray(direction, dtype=float)
        d = d / np.linalg.norm(d)
        matrix = 2.0 * np.outer(d, d) - np.eye(2)
        p = np.asarray(point, dtype=float)
        return cls(_tuple2(matrix), tuple(p - matrix @ p))

    @property
    def reflects(self) -> bool:
        return bool(np.linalg.det(np.asarray(self.matrix)) < 0)

    def apply(self, points: np.ndarray) -> np.ndarray:
        """Place (n, 2) points (or one (2,) point)."""
        points = np.asarray(points, dtype=float)
        return points @ np.asarray(self.matrix).T + np.asarray(self.offset)

    def point(self, xy: tuple[float, float]) -> tuple[float, float]:
        x, y = self.apply(np.asarray(xy, dtype=float))
        return (float(x), float(y))

    def angle(self, radians: float) -> float:
        """Where a direction at ``radians`` points after the placement, in radians."""
        dx, dy = np.asarray(self.matrix) @ np.array([math.cos(radians), math.sin(radians)])
        return math.atan2(dy, dx)


def _tuple2(matrix: np.ndarray) -> tuple[tuple[float, float], tuple[float, float]]:
    return ((float(matrix[0, 0]), float(matrix[0, 1])), (float(matrix[1, 0]), float(matrix[1, 1])))


@dataclass(frozen=True)
class EdgeSegment:
    """A straight piece of outline from ``start`` to ``end`` (m), in edge group ``group``."""

    group: str
    start: tuple[float, float]
    end: tuple[float, float]

    @property
    def length(self) -> float:
        return math.dist(self.start, self.end)

    def distance(self, points: np.ndarray) -> np.ndarray:
        """Distance in m from each of the (n, 2) ``points`` to this segment."""
        a, b = np.asarray(self.start), np.asarray(self.end)
        ab = b - a
        s = np.clip((points - a) @ ab / (ab @ ab), 0.0, 1.0)
        return np.linalg.norm(points - (a + s[:, None] * ab), axis=1)

    def sample(self, n: int) -> np.ndarray:
        s = np.linspace(0.0, 1.0, n)[:, None]
        return (1 - s) * np.asarray(self.start) + s * np.asarray(self.end)

    def placed(self, placement: Placement) -> EdgeSegment:
        return replace(self, start=placement.point(self.start), end=placement.point(self.end))

    def renamed(self, group: str) -> EdgeSegment:
        return replace(self, group=group)


@dataclass(frozen=True)
class EdgeArc:
    """A circular arc (m, radians) from ``start_angle`` sweeping ``sweep`` (> 0 counter-clockwise,
    < 0 clockwise, ±2π a full circle) about ``centre``, in edge group ``group``."""

    group: str
    centre: tuple[float, float]
    radius: float
    start_angle: float
    sweep: float

    @property
    def full(self) -> bool:
        return abs(abs(self.sweep) - 2 * math.pi) < 1e-12

    @property
    def length(self) -> float:
        return self.radius * abs(self.sweep)

    @property
    def start(self) -> tuple[float, float]:
        return self._at(self.start_angle)

    @property
    def end(self) -> tuple[float, float]:
        return self._at(self.start_angle + self.sweep)

    def _at(self, angle: float) -> tuple[float, float]:
        return (
            self.centre[0] + self.radius * math.cos(angle),
            self.centre[1] + self.radius * math.sin(angle),
        )

    def distance(self, points: np.ndarray) -> np.ndarray:
        offset = points - np.asarray(self.centre)
        to_circle = np.abs(np.linalg.norm(offset, axis=1) - self.radius)
        if self.full:
            return to_circle
        # Angle along the sweep direction from the start, in [0, 2π).
        angle = np.arctan2(offset[:, 1], offset[:, 0]) - self.start_angle
        along = np.mod(angle * math.copysign(1.0, self.sweep), 2 * math.pi)
        on_arc = along <= abs(self.sweep) + 1e-12
        ends = np.minimum(
            np.linalg.norm(points - np.asarray(self.start), axis=1),
            np.linalg.norm(points - np.asarray(self.end), axis=1),
        )
        return np.where(on_arc, to_circle, ends)

    def sample(self, n: int) -> np.ndarray:
        angles = self.start_angle + self.sweep * np.linspace(0.0, 1.0, n)
        return np.asarray(self.centre) + self.radius * np.column_stack(
            [np.cos(angles), np.sin(angles)]
        )

    def placed(self, placement: Placement) -> EdgeArc:
        sweep = -self.sweep if placement.reflects else self.sweep
        return replace(
            self,
            centre=placement.point(self.centre),
            start_angle=placement.angle(self.start_angle),
            sweep=sweep,
        )

    def renamed(self, group: str) -> EdgeArc:
        return replace(self, group=group)


@dataclass(frozen=True)
class EdgeEllipse:
    """A whole ellipse (m) about ``centre`` with semi-axes ``semi_x`` and ``semi_y`` along the
    directions at ``angle`` and ``angle + π/2`` (radians), in edge group ``group``."""

    group: str
    centre: tuple[float, float]
    semi_x: float
    semi_y: float
    angle: float = 0.0

    full = True

    @property
    def length(self) -> float:
        # Ramanujan's second approximation; relative error below 1e-9 for b/a > 0.2.
        a, b = self.semi_x, self.semi_y
        h = ((a - b) / (a + b)) ** 2
        return math.pi * (a + b) * (1 + 3 * h / (10 + math.sqrt(4 - 3 * h)))

    def _local(self, points: np.ndarray) -> np.ndarray:
        c, s = math.cos(self.angle), math.sin(self.angle)
        offset = points - np.asarray(self.centre)
        return np.column_stack([offset @ (c, s), offset @ (-s, c)])

    def distance(self, points: np.ndarray) -> np.ndarray:
        # First-order distance |F| / |∇F| for F = (x/a)² + (y/b)² − 1: exact on the curve and
        # a good approximation near it, which is all the recognition of curves needs.
        local = self._local(points)
        a, b = self.semi_x, self.semi_y
        f = (local[:, 0] / a) ** 2 + (local[:, 1] / b) ** 2 - 1.0
        gradient = np.hypot(2 * local[:, 0] / a**2, 2 * local[:, 1] / b**2)
        return np.abs(f) / np.maximum(gradient, 1e-300)

    def sample(self, n: int) -> np.ndarray:
        t = np.linspace(0.0, 2 * math.pi, n)
        c, s = math.cos(self.angle), math.sin(self.angle)
        x, y = self.semi_x * np.cos(t), self.semi_y * np.sin(t)
        return np.asarray(self.centre) + np.column_stack([c * x - s * y, s * x + c * y])

    def placed(self, placement: Placement) -> EdgeEllipse:
        # A reflected ellipse is the same curve with its axis direction reflected.
        return replace(
            self, centre=placement.point(self.centre), angle=placement.angle(self.angle)
        )

    def renamed(self, group: str) -> EdgeEllipse:
        return replace(self, group=group)


EdgePrimitive = EdgeSegment | EdgeArc | EdgeEllipse
