"""The leaf of every shape tree: one closed outline of named edge primitives."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .checks import check_name, format_point
from .errors import GeometryError
from .primitives import EdgePrimitive, Placement
from .shape_tree import SAMPLES_PER_PIECE, Shape


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
                        f"outline is not closed: a piece ends at {format_point(a.end)} m but "
                        f"the next starts at {format_point(b.start)} m"
                    )
        crossing = _self_intersection(points)
        if crossing is not None:
            raise GeometryError(f"outline crosses itself near {format_point(crossing)} m")
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


def _signed_area(points: np.ndarray) -> float:
    x, y = points[:, 0], points[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def _self_intersection(points: np.ndarray) -> tuple[float, float] | None:
    """A point where two non-adjacent edges of the closed polyline cross, if any (the first
    in edge order). All pairs of a block of edges are tested at once."""
    a = points
    d = np.roll(points, -1, axis=0) - a
    n = len(a)
    block = max(1, 200_000 // max(n, 1))  # pairs tested per array operation, bounded
    for start in range(0, n, block):
        i = np.arange(start, min(start + block, n))[:, np.newaxis]
        j = np.arange(n)[np.newaxis, :]
        # non-adjacent pairs j > i + 1, and not the closing pair (first edge, last edge)
        pair = (j > i + 1) & ~((i == 0) & (j == n - 1))
        denom = d[i, 0] * d[j, 1] - d[i, 1] * d[j, 0]
        r = a[j] - a[i]
        with np.errstate(divide="ignore", invalid="ignore"):
            s = (r[..., 0] * d[j, 1] - r[..., 1] * d[j, 0]) / denom
            t = (r[..., 0] * d[i, 1] - r[..., 1] * d[i, 0]) / denom
        hit = (
            pair
            & (np.abs(denom) > 1e-300)
            & (s > 1e-9)
            & (s < 1 - 1e-9)
            & (t > 1e-9)
            & (t < 1 - 1e-9)
        )
        if np.any(hit):
            row, col = np.argwhere(hit)[0]
            edge = int(i[row, 0])
            return tuple(a[edge] + s[row, col] * d[edge])  # type: ignore[return-value]
    return None
