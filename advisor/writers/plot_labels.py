"""Labels placed where they cross no curve: each candidate position is tried with the
renderer's own extent of the text, against the plotted lines sampled pixel by pixel."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from .plot_style import lay_out

PADDING = 2.0  # px around a label that a curve must keep clear of


def line_pixels(axes) -> np.ndarray:
    """Every line of ``axes`` in display coordinates, sampled at least once a pixel, (n, 2)."""
    samples = []
    for line in axes.get_lines():
        if not line.get_visible():
            continue
        x, y = (np.asarray(v, dtype=float) for v in line.get_data())
        if x.size == 0:
            continue
        points = line.get_transform().transform(np.column_stack([x, y]))
        points = points[np.all(np.isfinite(points), axis=1)]
        if len(points) > 1:  # resampled along the curve at one-pixel spacing
            along = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(points, axis=0).T))])
            at = np.linspace(0.0, along[-1], int(np.ceil(along[-1])) + 2)
            points = np.column_stack(
                [np.interp(at, along, points[:, 0]), np.interp(at, along, points[:, 1])]
            )
        samples.append(points)
    return np.vstack(samples) if samples else np.empty((0, 2))


def crossings(text, renderer, pixels: np.ndarray) -> int:
    """How many curve samples fall inside ``text``'s extent (padded), plus a large count when
    the text reaches outside its axes (it would be clipped or overlap the frame)."""
    box = text.get_window_extent(renderer).padded(PADDING)
    inside = (
        (pixels[:, 0] >= box.x0)
        & (pixels[:, 0] <= box.x1)
        & (pixels[:, 1] >= box.y0)
        & (pixels[:, 1] <= box.y1)
    )
    frame = text.axes.get_window_extent(renderer)
    outside = box.x0 < frame.x0 or box.x1 > frame.x1 or box.y0 < frame.y0 or box.y1 > frame.y1
    others = [t for t in text.axes.texts if t is not text and t.get_visible()]
    legend = text.axes.get_legend()
    covered = [o.get_window_extent(renderer) for o in others]
    if legend is not None:
        covered.append(legend.get_window_extent(renderer))
    overlaps = sum(box.overlaps(other) for other in covered)
    return int(inside.sum()) + (10**6 if outside else 0) + 10**4 * overlaps


def place_clear(text, candidates: Sequence[dict], pixels: np.ndarray | None = None) -> int:
    """Move ``text`` (an annotation) to the first of ``candidates`` where it crosses no curve
    and stays inside its axes, else to the one crossing fewest; return the crossings left.

    Each candidate is a dict of ``xy`` (the anchor, in the annotation's coordinates),
    ``offset`` (points) and ``ha``/``va``. The figure is laid out first so that the extents
    are those of the saved picture (one layout serves every label and the saving, see
    :func:`.plot_style.lay_out`).
    """
    renderer = lay_out(text.axes.figure)
    if pixels is None:
        pixels = line_pixels(text.axes)
    best, fewest = None, None
    for candidate in candidates:
        _apply(text, candidate)
        count = crossings(text, renderer, pixels)
        if count == 0:
            return 0
        if fewest is None or count < fewest:
            best, fewest = candidate, count
    _apply(text, best)
    return int(fewest or 0)


def _apply(text, candidate: dict) -> None:
    text.xy = candidate["xy"]
    text.xyann = candidate["offset"]
    text.set_horizontalalignment(candidate["ha"])
    text.set_verticalalignment(candidate["va"])
