"""Figures of a fit: measured against fitted curves with their band, the residuals against
time with the stated uncertainty, and a fitted coefficient table with its band."""

from __future__ import annotations

from pathlib import Path

import numpy as np
from matplotlib.figure import Figure

from .plot_style import (
    BAND,
    INK,
    LUMPED,
    PROBE_COLOURS,
    TARGET,
    new_figure,
    save_figure,
    tidy,
    time_axis,
)

FIT_PLOTS = {
    "fit-curves": (
        "Measured and fitted temperatures",
        "Dots: the readings; lines: the field with the fitted coefficients, in a pale band of "
        "95 % confidence from the parameters' uncertainty; dashed: the lumped exponential "
        "fitted to each curve.",
    ),
    "fit-residuals": (
        "Residuals against time",
        "Fitted minus measured at every reading; the grey lines mark ± the stated thermocouple "
        "uncertainty (or the residual scatter when none was stated). A pattern in time, rather "
        "than scatter, means the model misses something the data hold.",
    ),
    "fit-coefficient": (
        "The fitted coefficient",
        "The coefficient the fit found (nodes marked) with its 95 % confidence band from the "
        "covariance of the nodes; the band does not include the bias the smoothing may add "
        "where the data say little.",
    ),
}


def curves_figure(outcome) -> Figure:
    """Readings as dots, the fitted field curves with their band, the lumped exponentials."""
    measured, result = outcome.measured, outcome.result
    scale, unit = time_axis(float(measured.times[-1]))
    t = measured.times / scale
    figure = new_figure(8.0, 4.8)
    axes = figure.subplots()
    readings = measured.stacked()
    lumped = {r.probe: r for r in outcome.lumped}
    ambient = _ambient(outcome)
    for i, (colour, name) in enumerate(zip(PROBE_COLOURS * 4, measured.probes, strict=False)):
        fitted, half = result.predicted[:, i], result.predicted_band[:, i]
        axes.fill_between(t, fitted - half, fitted + half, color=BAND, lw=0)
        axes.plot(
            t, readings[:, i], "o", ms=2.6, color=colour, alpha=0.7, label=f"{name}: measured"
        )
        axes.plot(t, fitted, color=colour, lw=1.6, label=f"{name}: field fit")
        if name in lumped:
            reading = lumped[name]
            curve = ambient + reading.amplitude * np.exp(-measured.times / reading.time_constant)
            axes.plot(t, curve, color=LUMPED, lw=1.0, ls=(0, (5, 3)))
    axes.plot([], [], color=LUMPED, lw=1.0, ls=(0, (5, 3)), label="lumped exponential fits")
    axes.set_xlabel(f"time [{unit}]")
    axes.set_ylabel("temperature [°C]")
    axes.set_title(_title(outcome), loc="left", fontsize=10)
    axes.legend(fontsize=8, frameon=False, ncols=2)
    tidy(axes, t)
    return figure


def residuals_figure(outcome) -> Figure:
    """Fitted − measured against time for each thermocouple, with ± the uncertainty."""
    measured, result = outcome.measured, outcome.result
    scale, unit = time_axis(float(measured.times[-1]))
    t = measured.times / scale
    figure = new_figure(8.0, 3.6)
    axes = figure.subplots()
    noise = result.uncertainty or result.scatter
    for level in (-noise, noise):
        axes.axhline(level, color=TARGET, lw=0.8, ls=(0, (4, 3)))
    axes.axhline(0.0, color=INK, lw=0.8)
    for i, (colour, name) in enumerate(zip(PROBE_COLOURS * 4, measured.probes, strict=False)):
        axes.plot(t, result.residuals[:, i], "o-", ms=2.4, lw=0.6, color=colour, label=name)
    stated = "stated uncertainty" if result.uncertainty else "residual scatter"
    axes.set_title(
        f"RMS residual {result.rms_residual:.3g} K; {stated} ± {noise:.3g} K",
        loc="left",
        fontsize=10,
    )
    axes.set_xlabel(f"time [{unit}]")
    axes.set_ylabel("fitted − measured [K]")
    axes.legend(fontsize=8, frameon=False)
    tidy(axes, t)
    return figure


def coefficient_figure(outcome) -> Figure | None:
    """The fitted h(t) or h(T) with its band (None when no table was fitted)."""
    blocks = [b for b in outcome.parameters.blocks if b.knots.size]
    if not blocks:
        return None
    result = outcome.result
    figure = new_figure(8.0, 3.8 * len(blocks))
    axes_list = np.atleast_1d(figure.subplots(len(blocks), 1))
    offset, drawn = 0, 0
    for block in outcome.parameters.blocks:
        part = slice(offset, offset + block.size)
        offset += block.size
        if block.knots.size:
            values, covariance = result.values[part], result.covariance[part, part]
            _coefficient_axes(axes_list[drawn], block, values, covariance, result)
            drawn += 1
    return figure


def _coefficient_axes(axes, block, values, covariance, result) -> None:
    from scipy.stats import t as student

    x = np.linspace(block.knots[0], block.knots[-1], 200)
    weights = np.array([np.interp(x, block.knots, row) for row in np.eye(block.size)]).T
    spread = np.sqrt(np.einsum("ij,jk,ik->i", weights, covariance, weights))
    quantile = float(student.ppf(0.975, result.degrees_of_freedom))
    curve = weights @ values
    timed = block.request.quantity == "h(t)"
    scale, unit = time_axis(float(block.knots[-1])) if timed else (1.0, "°C")
    low, high = curve - quantile * spread, curve + quantile * spread
    axes.fill_between(x / scale, low, high, color=BAND, lw=0, label="95 % band")
    axes.plot(x / scale, curve, color=INK, lw=1.8, label="fitted")
    axes.plot(block.knots / scale, values, "o", color=INK, ms=4)
    axes.set_xlabel(f"time [{unit}]" if timed else "surface temperature [°C]")
    axes.set_ylabel("h [W/(m²·K)]")
    axes.set_title(f"{block.request.quantity} on {block.request.group}", loc="left", fontsize=10)
    axes.legend(fontsize=8, frameon=False)
    axes.grid(axis="y", color="#e6e6e6", lw=0.6)
    axes.spines[["top", "right"]].set_visible(False)


def _title(outcome) -> str:
    """The fitted value with its standard error, or what was fitted when there are several."""
    from ..fitting.fragment import decimals

    result = outcome.result
    if len(result.names) == 1:
        error = result.standard_errors[0]
        value = f"{result.values[0]:.{decimals(error)}f}"
        return f"fitted {result.names[0]} = {value} {result.units[0]} (standard error {error:.2g})"
    requests = [b.request for b in outcome.parameters.blocks]
    words = ", ".join(
        f"{r.quantity} on {r.group}" + (f" ({r.nodes} nodes)" if r.nodes > 1 else "")
        for r in requests
    )
    return f"fitted {words}: values in the table"


def _ambient(outcome) -> float:
    first = outcome.parameters.blocks[0].ambient
    return float(first(0.0)) if callable(first) else float(first)


def write_fit_plots(outcome, folder: Path) -> list[Path]:
    """Write every fit figure as PNG into ``folder``; return the paths."""
    figures = {
        "fit-curves": curves_figure(outcome),
        "fit-residuals": residuals_figure(outcome),
        "fit-coefficient": coefficient_figure(outcome),
    }
    written = []
    for stem, figure in figures.items():
        if figure is not None:
            written += save_figure(figure, Path(folder) / stem, formats=("png",))
    return written
