"""Figures of the temperature field over the section: a few snapshots, each on its own colour
scale, and the drawing pieces the animation shares (triangulation, axis names, outline)."""

from __future__ import annotations

import numpy as np
from matplotlib.collections import LineCollection
from matplotlib.figure import Figure
from matplotlib.tri import Triangulation

from fem import Solution

from ..analysis.assessment import Assessment
from .plot_style import COOL, FIELD_MAP, INK, WARM, clock, new_figure
from .section_fields import outline_segments


def snapshot_indices(output_times: np.ndarray, peak_time: float, count: int = 4) -> list[int]:
    """Which output fields to draw: ``count`` spread over the run after t = 0, one of them
    the output nearest the peak internal difference."""
    n = len(output_times)
    if n <= count:
        return list(range(n))
    picks = np.rint(np.linspace(1, n - 1, count)).astype(int)
    peak = int(np.argmin(np.abs(np.asarray(output_times) - peak_time)))
    picks[int(np.argmin(np.abs(picks - peak)))] = peak
    return sorted({int(i) for i in picks})


def section_triangulation(solution: Solution) -> Triangulation:
    """The section's triangles in mm for matplotlib."""
    section = solution.model.section
    x, y = 1000 * section.vertices
    return Triangulation(x, y, section.mesh.t.T)


def axis_names(solution: Solution) -> tuple[str, str]:
    """The axes' labels: r and z for axisymmetric sections, x and y for planar ones, in mm."""
    return ("r (mm)", "z (mm)") if solution.model.section.axisymmetric else ("x (mm)", "y (mm)")


def draw_outline(axes, solution: Solution) -> LineCollection:
    """Draw the section's boundary edges in ink; return them."""
    segments = 1000 * outline_segments(solution.model.section)
    return axes.add_collection(LineCollection(segments, colors=INK, linewidths=0.9))


def snapshot_figure(assessment: Assessment, count: int = 4) -> Figure:
    """Fields at :func:`snapshot_indices`, each on its own colour scale, with the outline and
    the hottest (▲) and coldest (▼) vertices marked."""
    solution = assessment.solution
    indices = snapshot_indices(
        solution.output_times, assessment.peak_internal_difference_time, count
    )
    columns = 1 if len(indices) == 1 else 2
    rows = -(-len(indices) // columns)
    triangulation = section_triangulation(solution)
    # a panel as wide as the section's shape needs (plus its colour bar), so tall sections do
    # not leave a gap between the columns
    aspect = np.ptp(triangulation.x) / max(np.ptp(triangulation.y), 1e-300)
    panel = float(np.clip(2.6 * aspect + 2.0, 3.0, 4.2))
    figure = new_figure(panel * columns, 3.4 * rows + 0.4)
    grid = np.atleast_1d(figure.subplots(rows, columns, squeeze=False).ravel())
    for axes, index in zip(grid, indices, strict=False):
        _snapshot_panel(figure, axes, solution, triangulation, index)
    for axes in grid[len(indices) :]:
        axes.set_visible(False)
    handles, labels = grid[0].get_legend_handles_labels()
    figure.legend(handles, labels, loc="outside lower center", ncols=2, fontsize=8, frameon=False)
    return figure


def _snapshot_panel(
    figure: Figure, axes, solution: Solution, triangulation: Triangulation, index: int
) -> None:
    """The output field ``index`` on its own colour scale with its extremes marked."""
    xs, ys = triangulation.x, triangulation.y
    field = np.asarray(solution.fields[index], dtype=float)
    low, high = float(field.min()), float(field.max())
    span = max(high - low, 1e-9 * max(abs(high), 1.0))
    image = axes.tripcolor(
        triangulation,
        field,
        shading="gouraud",
        cmap=FIELD_MAP,
        vmin=low,
        vmax=low + span,
        rasterized=True,  # the field as an image inside the SVG; lines and text stay vector
    )
    draw_outline(axes, solution)
    hot, cold = int(np.argmax(field)), int(np.argmin(field))
    axes.plot(xs[hot], ys[hot], "^", color=WARM, mec="white", mew=0.8, ms=8, label="hottest")
    axes.plot(xs[cold], ys[cold], "v", color=COOL, mec="white", mew=0.8, ms=8, label="coldest")
    axes.set_aspect("equal")
    x_name, y_name = axis_names(solution)
    axes.set_xlabel(x_name)
    axes.set_ylabel(y_name)
    axes.set_title(
        f"t = {clock(float(solution.output_times[index]))}\n"
        f"{low:.4g} to {high:.4g} °C, ΔT {high - low:.3g} K",
        fontsize=9,
        loc="left",
    )
    figure.colorbar(image, ax=axes, label="temperature (°C)", shrink=0.9)
