"""Figures of the process readings an assessment carries on request: the cooling (or heating)
rate against temperature at the slowest point and the probes; and the curves of coefficient or
heat flux against surface temperature a model used, with the surface temperatures the run
passed through.

Each builder returns None when its reading is absent, so :func:`process_plots` lists only the
figures a run has.
"""

from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from fem.conditions import SurfaceCurve

from ..analysis.assessment import Assessment
from ..analysis.surface_band import SurfaceBand, curve_conditions, surface_band
from .plot_list import PROCESS_PLOT_TITLES
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
    axes.legend(
        fontsize=8, frameon=False, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncols=2
    )
    axes.set_title(
        f"{words.capitalize()} against temperature (time runs left to right)",
        fontsize=10,
        loc="left",
    )


def surface_curve_figure(assessment: Assessment) -> Figure | None:
    """For each coefficient that follows the surface temperature: the curve (h, and the heat
    flux it gives) against the surface temperature, every stage of time, with the band of
    surface temperatures the run passed through on its edge groups; None without one."""
    curves = curve_conditions(assessment.solution.model)
    if not curves:
        return None
    figure = new_figure(8.0, 3.8 * len(curves))
    panels = np.atleast_1d(figure.subplots(len(curves), 1))
    for axes, (groups, condition) in zip(panels, curves, strict=True):
        bands = [surface_band(assessment.solution, group) for group in groups]
        _curve_axes(axes, condition, groups, bands)
    return figure


def _curve_axes(axes, condition, groups: tuple[str, ...], bands: list[SurfaceBand]) -> None:
    """h (left axis) and the heat flux (right axis) against the surface temperature."""
    low, high = min(b.low for b in bands), max(b.high for b in bands)
    span = [low, high]
    for _, curve in condition.curve:
        if isinstance(curve, SurfaceCurve):
            span = [
                min(span[0], curve.surface_temperatures[0]),
                max(span[1], curve.surface_temperatures[-1]),
            ]
    temperatures = np.linspace(span[0], span[1], 400)
    flux_axes = axes.twinx()
    names = ", ".join(groups)
    axes.axvspan(low, high, color=BAND, lw=0, label=f"passed through: {low:.4g} to {high:.4g} °C")
    colours = iter((INK, *PROBE_COLOURS * 4))
    for start, curve in condition.curve:
        colour = next(colours)
        stage = f" from {clock(start)}" if len(condition.curve) > 1 else ""
        points = temperatures
        if isinstance(curve, SurfaceCurve):  # the table's own points fall on the line
            points = np.union1d(temperatures, curve.surface_temperatures)
        axes.plot(
            points, condition.coefficient(points, start), color=colour, lw=1.8, label=f"h{stage}"
        )
        flux = condition.heat_flux(points, start)[0] / 1e3
        flux_axes.plot(
            points, flux, color=colour, lw=1.1, ls=(0, (4, 2)), label=f"heat flux{stage}"
        )
        if isinstance(curve, SurfaceCurve):
            given = curve.quantity == "coefficient"
            values = np.asarray(curve.values) / (1.0 if given else 1e3)
            (axes if given else flux_axes).plot(
                curve.surface_temperatures, values, "o", color=colour, ms=4
            )
    ambient = condition.ambient(0.0)
    axes.axvline(ambient, color=TARGET, lw=0.8, ls="-.")
    axes.annotate(
        f"fluid {ambient:.4g} °C", (ambient, 0), xytext=(3, 3), textcoords="offset points",
        fontsize=8, color=TARGET, rotation=90, va="bottom",
    )  # fmt: skip
    axes.set_ylim(bottom=0)
    flux_axes.set_ylim(bottom=min(0.0, flux_axes.get_ylim()[0]))
    axes.set_xlabel("surface temperature (°C)")
    axes.set_ylabel("h (W/(m²·K))")
    flux_axes.set_ylabel("heat flux leaving (kW/m²)")
    axes.grid(axis="y", color=GRID, lw=0.6)
    for side in (axes, flux_axes):
        side.spines[["top"]].set_visible(False)
    handles, labels = axes.get_legend_handles_labels()
    more = flux_axes.get_legend_handles_labels()
    # Below the axes: inside, the band's label and the curves compete for the same corner.
    axes.legend(
        handles + more[0], labels + more[1], fontsize=8, frameon=False, loc="upper center",
        bbox_to_anchor=(0.5, -0.2), ncol=len(labels) + len(more[1]),
    )  # fmt: skip
    tabled = any(isinstance(curve, SurfaceCurve) for _, curve in condition.curve)
    what = "dots: the table as given" if tabled else ""
    if getattr(condition, "correlation", None):
        what = f"{condition.correlation.replace('-', ' ')} correlation, {condition.fluid}"
    title = f"{names}: the curve used" + (f" ({what})" if what else "")
    axes.set_title(title, fontsize=10, loc="left")


# The figures :func:`process_plots` may add: file stem -> (title, caption, builder).
PROCESS_PLOTS = {
    stem: (*PROCESS_PLOT_TITLES[stem], build)
    for stem, build in (
        ("cooling_rates", cooling_rate_figure),
        ("surface_curves", surface_curve_figure),
    )
}


def process_plots(assessment: Assessment) -> dict[str, Figure]:
    """The process figures this ``assessment`` has, by file stem."""
    figures = {}
    for stem, (_, _, build) in PROCESS_PLOTS.items():
        figure = build(assessment)
        if figure is not None:
            figures[stem] = figure
    return figures
