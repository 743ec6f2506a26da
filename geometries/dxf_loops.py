"""Loops from loose drawing pieces: straight and circular pieces joined end to end, checked
for gaps, branches and crossings, sorted into outlines and holes by containment, and built
into a shape of named edge primitives.

Nothing here reads a file: :mod:`geometries.dxf_import` turns a drawing's entities into
:class:`Piece` objects (in the drawing's own units, so messages quote the numbers the user
sees in the drawing program) and hands them here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from .errors import GeometryError
from .outline import Outline, _self_intersection
from .primitives import EdgeArc, EdgeEllipse, EdgePrimitive, EdgeSegment
from .shape_tree import Difference, Shape, Union

SAMPLES = 24  # samples of a piece for crossing and containment tests


@dataclass(frozen=True)
class Piece:
    """A straight (``sweep`` = 0) or circular piece from ``start`` to ``end`` (drawing units);
    ``sweep`` is the arc's signed included angle in radians (> 0 counter-clockwise).

    ``group`` is the edge group the piece will name, ``origin`` says where it came from in
    the drawing (for messages)."""

    start: tuple[float, float]
    end: tuple[float, float]
    sweep: float
    group: str
    origin: str

    def reversed(self) -> Piece:
        return replace(self, start=self.end, end=self.start, sweep=-self.sweep)

    def sample(self, n: int = SAMPLES) -> np.ndarray:
        """Points along the piece, (n, 2), both ends included."""
        if self.sweep == 0.0:
            s = np.linspace(0.0, 1.0, n)[:, None]
            return (1 - s) * np.asarray(self.start) + s * np.asarray(self.end)
        centre, radius, angle = arc_through(self.start, self.end, self.sweep)
        angles = angle + self.sweep * np.linspace(0.0, 1.0, n)
        return centre + radius * np.column_stack([np.cos(angles), np.sin(angles)])


@dataclass(frozen=True)
class Loop:
    """A closed chain of pieces, or one ``whole`` circle or ellipse (drawing units)."""

    pieces: tuple[Piece, ...] = ()
    whole: EdgeArc | EdgeEllipse | None = None
    origin: str = ""

    def polyline(self) -> np.ndarray:
        """The loop as a closed polyline (n, 2), the first point not repeated."""
        if self.whole is not None:
            return self.whole.sample(4 * SAMPLES + 1)[:-1]
        return np.vstack([p.sample()[:-1] for p in self.pieces])


def arc_through(
    start: tuple[float, float], end: tuple[float, float], sweep: float
) -> tuple[np.ndarray, float, float]:
    """Centre, radius and start angle (rad) of the arc from ``start`` to ``end`` that turns
    through ``sweep`` (rad, signed): the centre lies on the chord's bisector at
    (c/2)/tan(sweep/2) to the left of the chord, c the chord's length."""
    a, b = np.asarray(start, dtype=float), np.asarray(end, dtype=float)
    chord = b - a
    length = float(np.hypot(*chord))
    left = np.array([-chord[1], chord[0]]) / length
    centre = 0.5 * (a + b) + left * (0.5 * length / math.tan(0.5 * sweep))
    radius = 0.5 * length / abs(math.sin(0.5 * sweep))
    offset = a - centre
    return centre, radius, math.atan2(offset[1], offset[0])


def join_pieces(pieces: list[Piece], tolerance: float, units: str) -> list[Loop]:
    """Chains of ``pieces`` joined end to end where ends lie within ``tolerance`` (drawing
    units), each closed; a gap or a branch raises :class:`GeometryError`."""
    if not pieces:
        return []
    from scipy.spatial import cKDTree  # loaded only when a drawing has loose pieces

    ends = np.array([[p.start, p.end] for p in pieces], dtype=float).reshape(-1, 2)
    tree = cKDTree(ends)
    used = np.zeros(len(pieces), dtype=bool)
    loops = []
    for first in range(len(pieces)):
        if used[first]:
            continue
        used[first] = True
        chain = [pieces[first]]
        while True:
            here = np.asarray(chain[-1].end)
            near = [k for k in tree.query_ball_point(here, tolerance) if not used[k // 2]]
            closing = math.dist(here, chain[0].start) <= tolerance and len(chain) > 1
            if closing and not near:
                break
            if len(near) + closing > 1 or len(near) > 1:
                raise GeometryError(
                    f"{len(near) + closing + 1} pieces meet at {_at(here, units)}: an outline "
                    "must not branch (remove overlapping or duplicate entities there)",
                    argument="path",
                )
            if not near:
                raise _gap(chain, ends, used, units)
            k = near[0]
            used[k // 2] = True
            piece = pieces[k // 2]
            chain.append(piece if k % 2 == 0 else piece.reversed())
        loops.append(Loop(tuple(_snapped(chain)), origin=chain[0].origin))
    return loops


def _gap(chain: list[Piece], ends: np.ndarray, used: np.ndarray, units: str):
    """The error for a chain whose last end meets nothing: where, and the nearest free end."""
    here = np.asarray(chain[-1].end)
    free = [k for k in range(len(ends)) if not used[k // 2]]
    candidates = [ends[k] for k in free] + ([np.asarray(chain[0].start)] if len(chain) > 1 else [])
    message = (
        f"the outline is open: {chain[-1].origin} ends at {_at(here, units)} and no other "
        "piece starts there"
    )
    if candidates:
        distances = [math.dist(here, c) for c in candidates]
        nearest = candidates[int(np.argmin(distances))]
        message += (
            f"; the nearest free end is at {_at(nearest, units)}, a gap of "
            f"{min(distances):.6g} {units} (close it in the drawing, or give a joining "
            "tolerance above the gap)"
        )
    return GeometryError(message, argument="path")


def _snapped(chain: list[Piece]) -> list[Piece]:
    """The chain with each piece starting exactly where the one before ends (and the last
    ending at the first's start), so the outline closes to rounding."""
    snapped = []
    for i, piece in enumerate(chain):
        start = chain[i - 1].end if i else chain[-1].end
        snapped.append(replace(piece, start=start))
    return snapped


def check_loops(loops: list[Loop], units: str) -> list[int]:
    """Each loop's depth of nesting (0 outermost), after checking that no loop crosses itself
    or another; a crossing raises :class:`GeometryError` with its position."""
    lines = [loop.polyline() for loop in loops]
    for loop, line in zip(loops, lines, strict=True):
        crossing = _self_intersection(line)
        if crossing is not None:
            raise GeometryError(
                f"the outline of {loop.origin} crosses itself near {_at(crossing, units)}",
                argument="path",
            )
    boxes = np.array([[*line.min(axis=0), *line.max(axis=0)] for line in lines])
    for i in range(len(lines)):
        for j in range(i + 1, len(lines)):
            if _boxes_overlap(boxes[i], boxes[j]):
                crossing = _crossing(lines[i], lines[j])
                if crossing is not None:
                    raise GeometryError(
                        f"the outlines of {loops[i].origin} and {loops[j].origin} cross near "
                        f"{_at(crossing, units)}",
                        argument="path",
                    )
    return [
        sum(_inside(lines[i][0], lines[j]) for j in range(len(lines)) if j != i)
        for i in range(len(lines))
    ]


def _boxes_overlap(a: np.ndarray, b: np.ndarray) -> bool:
    return bool(a[0] <= b[2] and b[0] <= a[2] and a[1] <= b[3] and b[1] <= a[3])


def _crossing(a: np.ndarray, b: np.ndarray) -> tuple[float, float] | None:
    """A point where an edge of closed polyline ``a`` meets an edge of ``b``, if any."""
    da = np.roll(a, -1, axis=0) - a
    db = np.roll(b, -1, axis=0) - b
    denom = da[:, None, 0] * db[None, :, 1] - da[:, None, 1] * db[None, :, 0]
    r = b[None, :, :] - a[:, None, :]
    with np.errstate(divide="ignore", invalid="ignore"):
        s = (r[..., 0] * db[None, :, 1] - r[..., 1] * db[None, :, 0]) / denom
        t = (r[..., 0] * da[:, None, 1] - r[..., 1] * da[:, None, 0]) / denom
    hit = (np.abs(denom) > 1e-300) & (s >= 0) & (s <= 1) & (t >= 0) & (t <= 1)
    if not np.any(hit):
        return None
    i, j = np.argwhere(hit)[0]
    return tuple(a[i] + s[i, j] * da[i])  # type: ignore[return-value]


def _inside(point: np.ndarray, polygon: np.ndarray) -> bool:
    """Whether ``point`` lies inside the closed ``polygon`` (even-odd ray crossing)."""
    x, y = point
    xa, ya = polygon[:, 0], polygon[:, 1]
    xb, yb = np.roll(xa, -1), np.roll(ya, -1)
    straddles = (ya > y) != (yb > y)
    with np.errstate(divide="ignore", invalid="ignore"):
        crossing_x = xa + (y - ya) * (xb - xa) / (yb - ya)
    return bool(np.count_nonzero(straddles & (crossing_x > x)) % 2)


def shape_of(loops: list[Loop], depths: list[int], scale: float, region: str) -> Shape:
    """The shape the loops make: each loop at an even depth an outline, minus the loops one
    level inside it; several outlines make a union. Lengths become metres by ``scale``."""
    lines = [loop.polyline() for loop in loops]
    parts = []
    for i, depth in enumerate(depths):
        if depth % 2:
            continue
        holes = [
            _outline(loops[j], scale, region)
            for j in range(len(loops))
            if depths[j] == depth + 1 and _inside(lines[j][0], lines[i])
        ]
        outline = _outline(loops[i], scale, region)
        parts.append(Difference(outline, tuple(holes)) if holes else outline)
    return parts[0] if len(parts) == 1 else Union(tuple(parts))


def _outline(loop: Loop, scale: float, region: str) -> Outline:
    whole = loop.whole
    if isinstance(whole, EdgeArc):
        centre = (whole.centre[0] * scale, whole.centre[1] * scale)
        return Outline((replace(whole, centre=centre, radius=whole.radius * scale),), region)
    if isinstance(whole, EdgeEllipse):
        centre = (whole.centre[0] * scale, whole.centre[1] * scale)
        ellipse = replace(
            whole, centre=centre, semi_x=whole.semi_x * scale, semi_y=whole.semi_y * scale
        )
        return Outline((ellipse,), region)
    return Outline(tuple(_primitive(p, scale) for p in loop.pieces), region)


def _primitive(piece: Piece, scale: float) -> EdgePrimitive:
    start = (piece.start[0] * scale, piece.start[1] * scale)
    end = (piece.end[0] * scale, piece.end[1] * scale)
    if piece.sweep == 0.0:
        return EdgeSegment(piece.group, start, end)
    centre, radius, angle = arc_through(start, end, piece.sweep)
    return EdgeArc(piece.group, (float(centre[0]), float(centre[1])), radius, angle, piece.sweep)


def _at(point, units: str) -> str:
    return f"({point[0]:.6g}, {point[1]:.6g}) {units}"
