"""The whole part a symmetric model stands for: its mirror lines, how many copies of the
modelled piece make it, and folding points of the whole back onto the piece.

A mirror line is a point on it and the unit normal pointing to the side that was modelled.
The lines are kept in the order the part was cut: the first line halves the whole part, the
next halves that half, and so on, so a point of the whole is folded onto the modelled piece
by reflecting it across each line in turn whenever it lies on the far side.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Mirror:
    """A symmetry line of the whole part.

    Parameters
    ----------
    point : tuple of float
        A point on the line (x, y), m.
    normal : tuple of float
        Direction across the line towards the modelled side; scaled to unit length.
    """

    point: tuple[float, float]
    normal: tuple[float, float]

    def __post_init__(self) -> None:
        nx, ny = (float(v) for v in self.normal)
        length = float(np.hypot(nx, ny))
        if not length > 0:
            raise ValueError(f"a mirror line needs a non-zero normal, got {self.normal!r}")
        object.__setattr__(self, "normal", (nx / length, ny / length))
        object.__setattr__(self, "point", tuple(float(v) for v in self.point))

    def distance(self, points: np.ndarray) -> np.ndarray:
        """Signed distance of the (2, n) ``points`` from the line, m (positive: modelled side)."""
        points = np.asarray(points, dtype=float)
        return (points[0] - self.point[0]) * self.normal[0] + (
            points[1] - self.point[1]
        ) * self.normal[1]

    def reflect(self, points: np.ndarray) -> np.ndarray:
        """The (2, n) ``points`` reflected across the line."""
        points = np.asarray(points, dtype=float)
        d = self.distance(points)
        return points - 2.0 * d * np.asarray(self.normal, dtype=float)[:, None]

    @property
    def on_axis(self) -> bool:
        """True for the line x = 0 (the axis of an axisymmetric section)."""
        return abs(self.normal[1]) < 1e-12 and abs(self.point[0]) < 1e-15


AXIS = Mirror((0.0, 0.0), (1.0, 0.0))
"""The axis r = 0 of an axisymmetric section, about which its r–z picture is mirrored."""


def copies(mirrors: Sequence[Mirror], axisymmetric: bool) -> int:
    """How many copies of the modelled piece make the whole part: 2 per mirror line, except
    the axis of an axisymmetric section (the revolution already makes it whole)."""
    return 2 ** sum(1 for m in mirrors if not (axisymmetric and m.on_axis))


def fold(points: np.ndarray, mirrors: Sequence[Mirror]) -> np.ndarray:
    """The (2, n) ``points`` of the whole part folded onto the modelled piece."""
    points = np.array(points, dtype=float)
    for mirror in mirrors:
        far = mirror.distance(points) < 0
        if np.any(far):
            points[:, far] = mirror.reflect(points[:, far])
    return points


def unfold(points: np.ndarray, mirrors: Sequence[Mirror]) -> list[np.ndarray]:
    """Every copy of the (2, n) ``points`` in the whole part, the modelled piece first."""
    copies_ = [np.asarray(points, dtype=float)]
    for mirror in reversed(mirrors):
        copies_ += [mirror.reflect(c) for c in copies_]
    return copies_


def drawn_mirrors(mirrors: Sequence[Mirror], axisymmetric: bool) -> tuple[Mirror, ...]:
    """The lines a picture of the whole part unfolds: the axis first for an axisymmetric
    section (the full r–z section), then the part's own mirror lines."""
    own = tuple(m for m in mirrors if not (axisymmetric and m.on_axis))
    return ((AXIS,) if axisymmetric else ()) + own


def oriented(
    mirrors: Sequence[Mirror], vertices: np.ndarray, tolerance: float
) -> tuple[Mirror, ...]:
    """The mirror lines with each normal turned towards the section's (2, n) ``vertices``.

    Raises
    ------
    ValueError
        If the section lies on both sides of a line (beyond ``tolerance`` m): a mirror line
        must bound the modelled piece.
    """
    turned = []
    for mirror in mirrors:
        distance = mirror.distance(vertices)
        if np.mean(distance) < 0:
            mirror = Mirror(mirror.point, (-mirror.normal[0], -mirror.normal[1]))
            distance = -distance
        crossing = distance < -tolerance
        if np.any(crossing):
            x, y = np.asarray(vertices)[:, int(np.argmax(crossing))]
            raise ValueError(
                f"the section lies on both sides of the mirror line through "
                f"({mirror.point[0]:.6g}, {mirror.point[1]:.6g}) m: the vertex at "
                f"({x:.6g}, {y:.6g}) m is across it; a mirror line must bound the modelled "
                "piece"
            )
        turned.append(mirror)
    return tuple(turned)
