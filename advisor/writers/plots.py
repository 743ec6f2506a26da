"""Plots of a run, drawn with matplotlib's object interface (no global pyplot state), each
saved as PNG and SVG.

The style is the project's own: a warm/cool pair for the extremes around an ink-blue mean, the
lumped family in rust (classical dashed) and olive (corrected), a pale band for the range or
the tolerance, light horizontal grid only, and the perceptually uniform *cividis* map for
fields. Every axis names its quantity and unit.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.collections import LineCollection
from matplotlib.figure import Figure
from matplotlib.tri import Triangulation

from fem import Solution

from ..analysis.assessment import Assessment
from .atomic import write_with
from .section_fields import outline_segments

INK = "#1d3557"
WARM = "#c8553d"
COOL = "#3a86a8"
LUMPED = "#b5651d"
CORRECTED = "#6b8f23"
BAND = "#dfe7ef"
TARGET = "#5c5c5c"
GRID = "#e6e6e6"
PROBE_COLOURS = ("#2a9d8f", "#8e6c8a", "#6b8f23", "#d19c1d", "#4f6d7a")
FIELD_MAP = "cividis"
FORMATS = ("png", "svg")
DPI = 120

# The plots :func:`write_plots` writes: file stem -> (title, what it shows). The report uses
# them as headings and captions.
PLOTS = {
    "histories": (
        "Temperature histories",
        "The field's mean, hottest and coldest points and probes beside the classical and "
        "corrected lumped estimates; below, the internal temperature difference.",
    ),
    "internal_difference": (
        "Internal temperature difference",
        "Hottest minus coldest point over time, its peak marked.",
    ),
    "lumped_error": (
        "Lumped error",
        "Field minus lumped estimate as a share of the initial driving difference (above "
        "zero the lumped estimate runs ahead of the field), against the tolerance band.",
    ),
    "field_snapshots": (
        "Field snapshots",
        "The temperature field at a few output times, each on its own colour scale, with the "
        "hottest and coldest points marked.",
    ),
    "energy": (
        "Energy ledger",
        "Heat stored in the part against heat taken in through its edges (and generated), "
        "with the classical lumped estimate; below, their difference.",
    ),
}


def time_axis(end_time: float) -> tuple[float, str]:
    """A divisor and unit label that keep time ticks readable."""
    if end_time >= 3 * 3600:
        return 3600.0, "h"
    if end_time >= 3 * 60:
        return 60.0, "min"
    return 1.0, "s"


def clock(seconds: float) -> str:
    """A time a person reads at a glance: ``"45 s"``, ``"3 min 40 s"``, ``"2 h 05 min"``."""
    if seconds < 120:
        return f"{seconds:.3g} s"
    if seconds < 2 * 3600:
        minutes, rest = divmod(round(seconds), 60)
        return f"{minutes} min {rest:02d} s"
    hours, rest = divmod(round(seconds / 60), 60)
    return f"{hours} h {rest:02d} min"


def energy_axis(largest: float, per_depth: bool) -> tuple[float, str]:
    """A divisor and unit label for energies whose largest magnitude is ``largest`` J."""
    suffix = "/m" if per_depth else ""
    for scale, unit in ((1e9, "GJ"), (1e6, "MJ"), (1e3, "kJ")):
        if largest >= scale:
            return scale, unit + suffix
    return 1.0, "J" + suffix


def new_figure(width: float, height: float) -> Figure:
    """A figure with its own Agg canvas, laid out by matplotlib's constrained layout."""
    figure = Figure(figsize=(width, height), dpi=DPI, layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def _tidy(axes, t) -> None:
    axes.grid(axis="y", color=GRID, lw=0.6)
    axes.spines[["top", "right"]].set_visible(False)
    axes.set_xlim(t[0], t[-1])


def save_figure(figure: Figure, stem: Path, formats: Sequence[str] = FORMATS) -> list[Path]:
    """Save ``figure`` as ``stem.png``, ``stem.svg`` (or ``formats``) atomically."""
    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    paths = []
    for kind in formats:
        path = stem.with_name(f"{stem.name}.{kind}")
        # tight: a left-aligned title wider than its axes (tall sections) stays in the picture
        write_with(
            path,
            lambda p, k=kind: figure.savefig(p, format=k, bbox_inches="tight", pad_inches=0.08),
        )
        paths.append(path)
    return paths


# -- temperature histories ----------------------------------------------------------------------


def history_figure(assessment: Assessment) -> Figure:
    """Temperature histories (mean, extremes, probes, lumped) above the internal ΔT."""
    solution = assessment.solution
    scale, unit = time_axis(float(solution.times[-1]))
    t = solution.times / scale

    figure = new_figure(8.0, 6.4)
    top, bottom = figure.subplots(2, 1, sharex=True, height_ratios=(2.2, 1.0))
    top.fill_between(
        t, solution.minimum, solution.maximum, color=BAND, lw=0, label="range in the section"
    )
    top.plot(t, solution.maximum, color=WARM, lw=1.2, label="hottest point")
    top.plot(t, solution.minimum, color=COOL, lw=1.2, label="coldest point")
    top.plot(t, solution.mean, color=INK, lw=2.0, label="field mean")
    for colour, (name, history) in zip(PROBE_COLOURS * 4, solution.probes.items(), strict=False):
        top.plot(t, history, color=colour, lw=1.0, ls=(0, (1, 1.5)), label=f"probe {name}")
    top.plot(
        t,
        assessment.lumped_temperature,
        color=LUMPED,
        lw=1.8,
        ls=(0, (6, 3)),
        label=f"classical lumped, τ = {assessment.lumped.time_constant:.4g} s",
    )
    top.plot(
        t,
        assessment.model_temperatures["corrected"],
        color=CORRECTED,
        lw=1.2,
        ls=(0, (1.5, 1.5)),
        label=f"corrected lumped, τ = {assessment.corrected.time_constant:.4g} s",
    )
    if assessment.target is not None:
        top.axhline(assessment.target, color=TARGET, lw=0.8, ls="-.")
        top.annotate(
            f"target {assessment.target:g} °C",
            (t[-1], assessment.target),
            ha="right",
            va="bottom",
            fontsize=8,
            color=TARGET,
        )
    top.set_ylabel("temperature (°C)")
    top.legend(fontsize=8, frameon=False, ncols=2)
    verdict = assessment.verdict
    top.set_title(
        f"Bi (V/A_s) = {assessment.biot[0].value:.3g} — classical lumped estimate "
        f"{verdict.rating} for {verdict.subject}",
        fontsize=10,
        loc="left",
    )
    _difference_axes(bottom, assessment, t, scale, unit)
    _tidy(top, t)
    return figure


def _difference_axes(axes, assessment: Assessment, t, scale: float, unit: str) -> None:
    spread = assessment.solution.internal_difference
    axes.plot(t, spread, color=INK, lw=1.6)
    peak_t = assessment.peak_internal_difference_time / scale
    axes.plot([peak_t], [assessment.peak_internal_difference], "o", color=WARM, ms=5)
    axes.annotate(
        f"peak {assessment.peak_internal_difference:.3g} K at "
        f"{clock(assessment.peak_internal_difference_time)}",
        (peak_t, assessment.peak_internal_difference),
        xytext=(8, -4),
        textcoords="offset points",
        fontsize=8,
        va="top",
    )
    axes.set_ylabel("internal ΔT (K)")
    axes.set_xlabel(f"time ({unit})")
    axes.set_ylim(0, 1.15 * max(float(np.max(spread)), 1e-12))
    _tidy(axes, t)


def internal_difference_figure(assessment: Assessment) -> Figure:
    """Hottest minus coldest point over time, the peak marked; with a target, the slowest
    point's time to target as a vertical line."""
    solution = assessment.solution
    scale, unit = time_axis(float(solution.times[-1]))
    t = solution.times / scale
    figure = new_figure(8.0, 3.6)
    axes = figure.subplots()
    spread = solution.internal_difference
    axes.fill_between(t, 0, spread, color=BAND, lw=0)
    _difference_axes(axes, assessment, t, scale, unit)
    through = assessment.time_to_target.get("slowest")
    if through is not None:
        axes.axvline(through / scale, color=TARGET, lw=0.8, ls="-.")
        axes.annotate(
            f"slowest point at {assessment.target:g} °C",
            (through / scale, 0),
            xytext=(4, 4),
            textcoords="offset points",
            fontsize=8,
            color=TARGET,
            rotation=90,
            va="bottom",
        )
    axes.set_title("Internal temperature difference in the section", fontsize=10, loc="left")
    return figure


# -- lumped error ---------------------------------------------------------------------------


def lumped_errors(assessment: Assessment) -> dict[tuple[str, str], np.ndarray]:
    """(field − lumped) / (T0 − T∞) at ``solution.times`` for the classical and corrected
    models against the field mean and the slowest point; positive where the lumped estimate
    is nearer its equilibrium than the field (it runs ahead). T∞ is the lumped equilibrium:
    the ambient, raised by any sources and fluxes."""
    lumped = assessment.lumped
    drive = lumped.initial_temperature - lumped.equilibrium
    quantities = {"field mean": assessment.solution.mean, "slowest point": assessment.slowest}
    return {
        (model, quantity): (history - assessment.model_temperatures[model]) / drive
        for model in ("classical", "corrected")
        for quantity, history in quantities.items()
    }


def lumped_error_figure(assessment: Assessment) -> Figure:
    """The lumped errors of :func:`lumped_errors` in percent against the tolerance band."""
    solution = assessment.solution
    scale, unit = time_axis(float(solution.times[-1]))
    t = solution.times / scale
    tolerance = 100 * assessment.verdict.tolerance
    figure = new_figure(8.0, 4.2)
    axes = figure.subplots()
    axes.axhspan(-tolerance, tolerance, color=BAND, lw=0, label=f"tolerance ±{tolerance:.3g} %")
    axes.axhline(0.0, color=TARGET, lw=0.6)
    colours = {"classical": LUMPED, "corrected": CORRECTED}
    styles = {"field mean": "-", "slowest point": (0, (5, 2.5))}
    largest = tolerance
    for (model, quantity), error in lumped_errors(assessment).items():
        percent = 100 * error
        largest = max(largest, float(np.max(np.abs(percent))))
        axes.plot(
            t,
            percent,
            color=colours[model],
            ls=styles[quantity],
            lw=1.6 if model == "classical" else 1.2,
            label=f"{model} lumped vs {quantity}",
        )
    axes.set_ylim(-1.15 * largest, 1.15 * largest)
    axes.set_ylabel("field − lumped (% of T0 − T∞)")
    axes.set_xlabel(f"time ({unit})")
    axes.annotate(
        "above 0: the lumped estimate runs ahead of the field",
        (0.01, 0.98),
        xycoords="axes fraction",
        va="top",
        fontsize=8,
        color=TARGET,
    )
    axes.legend(fontsize=8, frameon=False, loc="lower right", ncols=2)
    axes.set_title(
        "Lumped error against the field, as a share of the initial driving difference",
        fontsize=10,
        loc="left",
    )
    _tidy(axes, t)
    return figure


# -- fields -------------------------------------------------------------------------------


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
    xs, ys = triangulation.x, triangulation.y
    x_name, y_name = axis_names(solution)
    for axes, index in zip(grid, indices, strict=False):
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
        axes.set_xlabel(x_name)
        axes.set_ylabel(y_name)
        axes.set_title(
            f"t = {clock(float(solution.output_times[index]))}\n"
            f"{low:.4g} to {high:.4g} °C, ΔT {high - low:.3g} K",
            fontsize=9,
            loc="left",
        )
        figure.colorbar(image, ax=axes, label="temperature (°C)", shrink=0.9)
    for axes in grid[len(indices) :]:
        axes.set_visible(False)
    handles, labels = grid[0].get_legend_handles_labels()
    figure.legend(handles, labels, loc="outside lower center", ncols=2, fontsize=8, frameon=False)
    return figure


# -- energy ------------------------------------------------------------------------------


def energy_figure(assessment: Assessment) -> Figure:
    """Stored energy against absorbed heat (the run's ledger) and the classical lumped
    model's stored energy, with the ledger's imbalance below."""
    solution = assessment.solution
    model = solution.model
    scale, unit = time_axis(float(solution.times[-1]))
    t = solution.times / scale
    lumped_energy = assessment.lumped_energy
    per_depth = not model.section.axisymmetric
    largest = float(
        max(np.max(np.abs(solution.stored_energy)), np.max(np.abs(solution.absorbed_heat)), 1.0)
    )
    energy_scale, energy_unit = energy_axis(largest, per_depth)

    figure = new_figure(8.0, 5.2)
    top, bottom = figure.subplots(2, 1, sharex=True, height_ratios=(2.2, 1.0))
    top.plot(
        t, solution.stored_energy / energy_scale, color=INK, lw=2.0, label="stored in the part"
    )
    top.plot(
        t,
        solution.absorbed_heat / energy_scale,
        color=WARM,
        lw=1.2,
        ls=(0, (4, 2)),
        label="taken in through the edges and generated",
    )
    top.plot(
        t,
        lumped_energy / energy_scale,
        color=LUMPED,
        lw=1.2,
        ls=(0, (1.5, 1.5)),
        label="stored, classical lumped estimate",
    )
    top.axhline(0.0, color=TARGET, lw=0.6)
    top.set_ylabel(f"energy since the start ({energy_unit})")
    top.legend(fontsize=8, frameon=False)
    sign = "positive: heat taken up" if assessment.heating else "negative: heat given off"
    top.set_title(f"Energy ledger ({sign})", fontsize=10, loc="left")
    imbalance = (solution.stored_energy - solution.absorbed_heat) / largest
    bottom.plot(t, imbalance, color=INK, lw=1.2)
    bottom.set_ylabel("imbalance\n(share of largest)")
    bottom.set_xlabel(f"time ({unit})")
    bottom.annotate(
        f"the run's own balance check: {solution.checks.energy_balance_error:.2g}",
        (0.99, 0.06),
        xycoords="axes fraction",
        ha="right",
        fontsize=8,
        color=TARGET,
    )
    for axes in (top, bottom):
        _tidy(axes, t)
    return figure


# -- writers --------------------------------------------------------------------------------

BUILDERS = {
    "histories": history_figure,
    "internal_difference": internal_difference_figure,
    "lumped_error": lumped_error_figure,
    "field_snapshots": snapshot_figure,
    "energy": energy_figure,
}


def write_plots(
    assessment: Assessment, folder: Path, formats: Sequence[str] = FORMATS
) -> list[Path]:
    """Write every plot of :data:`PLOTS` into ``folder`` in each of ``formats``; return the
    paths in the order of :data:`PLOTS`, formats within each."""
    paths = []
    for stem, build in BUILDERS.items():
        paths += save_figure(build(assessment), Path(folder) / stem, formats)
    return paths
