"""Fields as pixels without a figure per frame: which triangle and which barycentric weights
serve each pixel of a picture, computed once per series; a frame is then one gather.

The picture may show the whole part: each pixel centre is folded across the mirror lines
(:mod:`advisor.whole_part`) onto the modelled piece before it is located, so mirrored copies
cost nothing per frame. Inside a triangle the value is the linear interpolant of its corner
values, as matplotlib's ``LinearTriInterpolator`` gives (the tests compare the two).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..whole_part import Mirror, fold, unfold


@dataclass(frozen=True)
class PixelMap:
    """Pixels of a picture that show the section, with their triangle corners and weights.

    Attributes
    ----------
    shape : tuple of int
        (rows, columns) of the picture; row 0 is the top.
    extent : tuple of float
        (x_min, x_max, y_min, y_max) the picture spans, m.
    pixels : ndarray of int64, shape (n,)
        Flat indices (row-major) of the pixels whose centre lies in the section.
    corners : ndarray of int64, shape (n, 3)
        Vertex indices of the triangle holding each such pixel centre.
    weights : ndarray of float, shape (n, 3)
        Barycentric weights of the pixel centre in that triangle (they sum to 1).
    """

    shape: tuple[int, int]
    extent: tuple[float, float, float, float]
    pixels: np.ndarray
    corners: np.ndarray
    weights: np.ndarray

    def values(self, field: np.ndarray) -> np.ndarray:
        """The vertex ``field`` at the mapped pixels, shape (n,)."""
        gathered = np.asarray(field, dtype=float)[self.corners]
        return np.einsum("ij,ij->i", gathered, self.weights)

    def inside(self) -> np.ndarray:
        """Boolean picture (rows, columns): True where a pixel shows the section."""
        mask = np.zeros(self.shape[0] * self.shape[1], dtype=bool)
        mask[self.pixels] = True
        return mask.reshape(self.shape)


def pixel_centres(shape: tuple[int, int], extent: tuple[float, float, float, float]) -> np.ndarray:
    """Centres (2, rows·columns) in m of the pixels of a picture, row-major, row 0 on top."""
    rows, columns = shape
    x_min, x_max, y_min, y_max = extent
    x = x_min + (np.arange(columns) + 0.5) * (x_max - x_min) / columns
    y = y_max - (np.arange(rows) + 0.5) * (y_max - y_min) / rows
    xx, yy = np.meshgrid(x, y)
    return np.vstack([xx.ravel(), yy.ravel()])


def barycentric(
    vertices: np.ndarray, triangles: np.ndarray, cells: np.ndarray, points: np.ndarray
) -> np.ndarray:
    """Barycentric weights (n, 3) of the (2, n) ``points`` in triangles ``cells`` of the
    (3, m) ``triangles`` over the (2, k) ``vertices``."""
    corners = triangles[:, cells]
    a, b, c = (vertices[:, corners[i]] for i in range(3))
    ab, ac, ap = b - a, c - a, points - a
    determinant = ab[0] * ac[1] - ab[1] * ac[0]
    w1 = (ap[0] * ac[1] - ap[1] * ac[0]) / determinant
    w2 = (ab[0] * ap[1] - ab[1] * ap[0]) / determinant
    return np.column_stack([1.0 - w1 - w2, w1, w2])


def pixel_map(
    vertices: np.ndarray,
    triangles: np.ndarray,
    shape: tuple[int, int],
    extent: tuple[float, float, float, float],
    mirrors: Sequence[Mirror] = (),
) -> PixelMap:
    """Locate every pixel centre of a ``shape`` picture spanning ``extent`` (m) in the
    triangles, after folding it across ``mirrors`` onto the modelled piece.

    Parameters
    ----------
    vertices : ndarray, shape (2, k)
        Triangle corners, m.
    triangles : ndarray, shape (3, m)
        Corner indices of each triangle.
    shape : tuple of int
        (rows, columns) of the picture.
    extent : tuple of float
        (x_min, x_max, y_min, y_max), m.
    mirrors : sequence of Mirror
        Lines the picture unfolds, outermost first (see :func:`advisor.whole_part.fold`).
    """
    from matplotlib.tri import Triangulation

    vertices = np.asarray(vertices, dtype=float)
    triangles = np.asarray(triangles, dtype=np.int64)
    points = fold(pixel_centres(shape, extent), mirrors)
    # matplotlib's trapezoid map locates many points in C++; shifted and scaled to order 1 so
    # its tolerances fit sections of any size
    origin = vertices.mean(axis=1, keepdims=True)
    scale = max(float(np.ptp(vertices[0])), float(np.ptp(vertices[1])), 1e-300)
    local = (vertices - origin) / scale
    # A mesh cut along a contact interface has two nodes at each point of it; the trapezoid
    # map needs one, while the weights below keep each triangle's own nodes (and the jump).
    merged, corner = np.unique(np.round(local.T, 12), axis=0, return_inverse=True)
    corner = corner.reshape(-1)
    finder = Triangulation(merged[:, 0], merged[:, 1], corner[triangles].T).get_trifinder()
    query = (points - origin) / scale
    cells = np.asarray(finder(query[0], query[1]), dtype=np.int64)
    found = np.flatnonzero(cells >= 0)
    weights = barycentric(vertices, triangles, cells[found], points[:, found])
    return PixelMap(
        (int(shape[0]), int(shape[1])),
        tuple(float(v) for v in extent),
        found,
        np.ascontiguousarray(triangles[:, cells[found]].T),
        weights,
    )


def whole_extent(points: np.ndarray, mirrors: Sequence[Mirror]) -> tuple[float, ...]:
    """(x_min, x_max, y_min, y_max) in m of the (2, n) ``points`` and all their mirror
    copies."""
    every = np.hstack(unfold(points, mirrors))
    return (
        float(every[0].min()),
        float(every[0].max()),
        float(every[1].min()),
        float(every[1].max()),
    )


BAYER = np.array([[0, 8, 2, 10], [12, 4, 14, 6], [3, 11, 1, 9], [15, 7, 13, 5]])


def dither_thresholds(pixel_map: PixelMap) -> np.ndarray:
    """An ordered (4 × 4 Bayer) threshold in (0, 1) for each mapped pixel: the same in every
    frame, so dithered levels do not flicker."""
    rows, columns = np.divmod(pixel_map.pixels, pixel_map.shape[1])
    return (BAYER[rows % 4, columns % 4] + 0.5) / 16.0


def levels(
    values: np.ndarray, low: float, high: float, count: int, dither: np.ndarray | None = None
) -> np.ndarray:
    """``values`` as colour levels 0 … count − 1 on the scale ``low`` to ``high``, uint8;
    the nearest level, or with ``dither`` thresholds (0–1 per value) a level below or above
    so that the levels average to the value (no bands where a field varies slowly)."""
    span = high - low
    if not span > 0:
        return np.full(np.shape(values), count // 2, dtype=np.uint8)
    scaled = (np.asarray(values, dtype=float) - low) * ((count - 1) / span)
    scaled += 0.5 if dither is None else dither
    return np.clip(scaled, 0, count - 1).astype(np.uint8)
