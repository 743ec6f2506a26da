"""Figures of the process readings an assessment carries on request: the cooling (or heating)
rate against temperature at the slowest point and the probes.

Each builder returns None when its reading is absent, so :func:`process_plots` lists only the
figures a run has.
"""

from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from ..analysis.assessment import Assessment
from .plot_style import BAND, GRID, INK, PROBE_COLOURS, TARGET, WARM, clock, new_figure
from .report_words import quantity_words


def rate_words(assessment: Assessment) -> str:
    """``"cooling rate"`` or ``"heating rate"``, as the quench readings were taken."""
    quench = assessment.quench
    return "heating rate" if quench is not None and not quench.cooling else "cooling rate"


def cooling_rate_figure(assessment: Assessment) -> Figure | None:
    """Rate against temperature for the slowest point and every probe, the largest rate of
    each marked and the cooling range shaded; None without quench readings."""
    quench = assessment.quench
    if quench is None:
        return None
    words = rate_words(assessment)
    figure = new_figure(8.0, 4.8)
    axes = figure.subplots()
    if quench.cooling_range is not None:
        start, end = quench.cooling_range
        through = quench.curves["slowest"].range_time
        axes.axvspan(
            min(start, end),
            max(start, end),
            color=BAND,
            lw=0,
            label=f"{start:g} → {end:g} °C at the slowest point: "
            + (clock(through) if through is not None else "not passed within the run"),
        )
    colours = iter((INK, *PROBE_COLOURS * 4))
    marked: list[tuple[float, float]] = []
    for name, curve in quench.curves.items():
        colour = next(colours)
        slowest = name == "slowest"
        axes.plot(
            curve.temperatures,
            curve.rates,
            color=colour,
            lw=2.0 if slowest else 1.2,
            ls="-" if slowest else (0, (4, 1.5)),
            label=quantity_words(name),
        )
        peak = (curve.largest_rate_temperature, curve.largest_rate)
        if any(np.allclose(peak, other, rtol=1e-3) for other in marked):
            continue  # a probe at the slowest point: one mark and one label
        marked.append(peak)
        axes.plot(*peak, "o", color=WARM, mec=colour, ms=6)
        axes.annotate(
            f"largest {curve.largest_rate:.3g} K/s at {curve.largest_rate_temperature:.4g} °C",
            peak,
            xytext=(8, 6),
            textcoords="offset points",
            fontsize=8,
            color=colour,
        )
    _rate_axes(axes, assessment, words)
    return figure


def _rate_axes(axes, assessment: Assessment, words: str) -> None:
    """Labels, limits and the direction of time on the rate axes."""
    quench = assessment.quench
    rates = np.concatenate([c.rates for c in quench.curves.values()])
    axes.set_ylim(min(0.0, float(np.nanmin(rates))), 1.15 * float(np.nanmax(rates)))
    axes.axhline(0.0, color=TARGET, lw=0.6)
    axes.set_xlabel("temperature (°C)")
    axes.set_ylabel(f"{words} (K/s)")
    if quench.cooling:
        axes.invert_xaxis()  # time runs left to right as the part cools
    axes.grid(axis="y", color=GRID, lw=0.6)
    axes.spines[["top", "right"]].set_visible(False)
    axes.legend(fontsize=8, frameon=False, loc="upper right")
    axes.set_title(
        f"{words.capitalize()} against temperature (time runs left to right)",
        fontsize=10,
        loc="left",
    )


# The figures :func:`process_plots` may add: file stem -> (title, caption, builder).
PROCESS_PLOTS = {
    "cooling_rates": (
        "Rate of temperature change against temperature",
        "The rate at the slowest point and each probe from local quadratic fits to its "
        "history, the largest rate of each marked and the requested range shaded.",
        cooling_rate_figure,
    ),
}


def process_plots(assessment: Assessment) -> dict[str, Figure]:
    """The process figures this ``assessment`` has, by file stem."""
    figures = {}
    for stem, (_, _, build) in PROCESS_PLOTS.items():
        figure = build(assessment)
        if figure is not None:
            figures[stem] = figure
    return figures
