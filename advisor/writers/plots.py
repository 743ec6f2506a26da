"""PNG plots of a run, drawn with matplotlib's object interface (no global pyplot state).

The style is the project's own: a warm/cool pair for the extremes around an ink-blue mean, the
lumped estimate in a dashed rust line, light horizontal grid only.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from ..assessment import Assessment
from .atomic import write_with

INK = "#1d3557"
WARM = "#c8553d"
COOL = "#3a86a8"
LUMPED = "#b5651d"
BAND = "#dfe7ef"
TARGET = "#5c5c5c"
PROBE_COLOURS = ("#2a9d8f", "#8e6c8a", "#6b8f23", "#d19c1d", "#4f6d7a")


def time_axis(end_time: float) -> tuple[float, str]:
    """A divisor and unit label that keep time ticks readable."""
    if end_time >= 3 * 3600:
        return 3600.0, "h"
    if end_time >= 3 * 60:
        return 60.0, "min"
    return 1.0, "s"


def write_history_plot(assessment: Assessment, path: Path) -> None:
    """Temperature histories (mean, extremes, probes, lumped) above the internal ΔT."""
    solution = assessment.solution
    scale, unit = time_axis(float(solution.times[-1]))
    t = solution.times / scale

    figure = Figure(figsize=(8.0, 6.4), dpi=120, layout="constrained")
    FigureCanvasAgg(figure)
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
        color=LUMPED,
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

    spread = solution.internal_difference
    bottom.plot(t, spread, color=INK, lw=1.6)
    peak_t = assessment.peak_internal_difference_time / scale
    bottom.plot([peak_t], [assessment.peak_internal_difference], "o", color=WARM, ms=5)
    bottom.annotate(
        f"peak {assessment.peak_internal_difference:.3g} K at {peak_t:.3g} {unit}",
        (peak_t, assessment.peak_internal_difference),
        xytext=(8, -4),
        textcoords="offset points",
        fontsize=8,
        va="top",
    )
    bottom.set_ylabel("internal ΔT (K)")
    bottom.set_xlabel(f"time ({unit})")
    bottom.set_ylim(0, 1.15 * max(float(np.max(spread)), 1e-12))

    for axes in (top, bottom):
        axes.grid(axis="y", color="#e6e6e6", lw=0.6)
        axes.spines[["top", "right"]].set_visible(False)
        axes.set_xlim(t[0], t[-1])
    write_with(Path(path), lambda p: figure.savefig(p, format="png"))
