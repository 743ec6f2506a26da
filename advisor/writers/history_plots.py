"""Figures of the run over time: temperature histories, the internal temperature difference,
the lumped error against the tolerance band, and the energy ledger."""

from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from ..analysis.assessment import Assessment
from ..time_words import duration_text
from .plot_labels import place_clear
from .plot_style import (
    BAND,
    COOL,
    CORRECTED,
    INK,
    LUMPED,
    PROBE_COLOURS,
    RECOMMENDED,
    TARGET,
    WARM,
    clock,
    energy_axis,
    new_figure,
    scaled_times,
    tidy,
)
from .report_words import time_constant_text

# the fitted models the advice may recommend, as the lumped-error plot names them
RECOMMENDED_NAMES = {"two-node": "fitted two-node", "fitted exponential": "fitted exponential"}

LONG_LABEL = 60  # characters: longer legend labels go in one column


def history_figure(assessment: Assessment) -> Figure:
    """Temperature histories (mean, extremes, probes, lumped) above the internal ΔT."""
    t, scale, unit = scaled_times(assessment.solution)
    figure = new_figure(8.0, 6.4)
    top, bottom = figure.subplots(2, 1, sharex=True, height_ratios=(2.2, 1.0))
    _temperature_axes(top, assessment, t)
    tidy(top, t)
    peak_label = _difference_axes(bottom, assessment, t, scale, unit)
    if assessment.target is not None:
        _target_line(top, assessment.target)
    peak_label()
    return figure


def _temperature_axes(axes, assessment: Assessment, t: np.ndarray) -> None:
    """The field's range, extremes, mean and probes with the classical and corrected lumped
    estimates, the target and the verdict in the title."""
    solution = assessment.solution
    axes.fill_between(
        t, solution.minimum, solution.maximum, color=BAND, lw=0, label="range in the section"
    )
    axes.plot(t, solution.maximum, color=WARM, lw=1.2, label="hottest point")
    axes.plot(t, solution.minimum, color=COOL, lw=1.2, label="coldest point")
    axes.plot(t, solution.mean, color=INK, lw=2.0, label="field mean")
    for colour, (name, history) in zip(PROBE_COLOURS * 4, solution.probes.items(), strict=False):
        axes.plot(t, history, color=colour, lw=1.0, ls=(0, (1, 1.5)), label=f"probe {name}")
    end = float(solution.times[-1])
    recommended = assessment.verdict.recommended
    mark = {recommended: " (recommended)"} if recommended else {}
    axes.plot(
        t,
        assessment.lumped_temperature,
        color=LUMPED,
        lw=1.8,
        ls=(0, (6, 3)),
        label=f"classical lumped, {time_constant_text(assessment.lumped, end)}"
        + mark.get("classical", ""),
    )
    axes.plot(
        t,
        assessment.model_temperatures["corrected"],
        color=CORRECTED,
        lw=1.2,
        ls=(0, (1.5, 1.5)),
        label=f"corrected lumped, {time_constant_text(assessment.corrected, end)}"
        + mark.get("corrected", ""),
    )
    _recommended_curves(axes, assessment, t)
    if assessment.target is not None:  # its line counts where the legend goes
        axes.axhline(assessment.target, color=TARGET, lw=0.8, ls="-.")
    axes.set_ylabel("temperature (°C)")
    # two columns of long labels (a time constant that changes with temperature) fit nowhere
    # beside the curves and run past the axes: one column then
    longest = max(len(label) for label in axes.get_legend_handles_labels()[1])
    axes.legend(fontsize=8, frameon=False, ncols=2 if longest <= LONG_LABEL else 1)
    verdict = assessment.verdict
    axes.set_title(
        f"Bi (V/A_s) = {assessment.biot[0].value:.3g} — classical lumped estimate "
        f"{verdict.rating} for {verdict.subject}",
        fontsize=10,
        loc="left",
    )


def _recommended_curves(axes, assessment: Assessment, t: np.ndarray) -> None:
    """The fitted model the advice recommends, when it is not one already drawn: its mean
    and, for the two-node model, its core node (the slowest point's stand-in)."""
    key = assessment.verdict.recommended
    if key == "two-node" and assessment.two_node is not None:
        core, _, mean = assessment.two_node.states(assessment.solution.times)
        axes.plot(t, mean, color=RECOMMENDED, lw=1.6, label="fitted two-node, mean (recommended)")
        axes.plot(
            t,
            core,
            color=RECOMMENDED,
            lw=1.6,
            ls=(0, (3, 1.5, 1, 1.5)),
            label="fitted two-node, core (recommended)",
        )
    elif key == "fitted exponential" and assessment.fitted is not None:
        axes.plot(
            t,
            assessment.model_temperatures["fitted exponential"],
            color=RECOMMENDED,
            lw=1.6,
            label="fitted single exponential, "
            f"τ = {duration_text(assessment.fitted.time_constant)} (recommended)",
        )


def _target_line(axes, target: float) -> None:
    """The target as a dash-dot line, its label placed along it where it crosses no curve
    and is not clipped (right, left or middle; above or below the line); the line itself is
    drawn with the curves."""
    label = axes.annotate(
        f"target {target:g} °C",
        (0.99, target),
        xycoords=axes.get_yaxis_transform(),
        xytext=(0, 3),
        textcoords="offset points",
        fontsize=8,
        color=TARGET,
    )
    label.set_in_layout(False)
    place_clear(
        label,
        [
            {"xy": (x, target), "offset": (0, dy), "ha": ha, "va": va}
            for dy, va in ((3, "bottom"), (-3, "top"))
            for x, ha in ((0.99, "right"), (0.01, "left"), (0.5, "center"), (0.75, "center"))
        ],
    )


def _difference_axes(axes, assessment: Assessment, t, scale: float, unit: str):
    """Hottest minus coldest point over time, its peak marked; returns the function that
    places the peak's label, to be called once everything else is drawn."""
    spread = assessment.solution.internal_difference
    axes.plot(t, spread, color=INK, lw=1.6)
    peak_t = assessment.peak_internal_difference_time / scale
    axes.plot([peak_t], [assessment.peak_internal_difference], "o", color=WARM, ms=5)
    axes.set_ylabel("internal ΔT (K)")
    axes.set_xlabel(f"time ({unit})")
    axes.set_ylim(0, 1.3 * max(float(np.max(spread)), 1e-12))
    tidy(axes, t)
    peak = (peak_t, assessment.peak_internal_difference)
    label = axes.annotate(
        f"peak {assessment.peak_internal_difference:.3g} K at "
        f"{clock(assessment.peak_internal_difference_time)}",
        peak,
        xytext=(6, 4),
        textcoords="offset points",
        fontsize=8,
    )
    label.set_in_layout(False)
    return lambda: place_clear(
        label,
        [
            {"xy": peak, "offset": offset, "ha": ha, "va": va}
            for offset, ha, va in (
                ((6, 4), "left", "bottom"),
                ((-6, 4), "right", "bottom"),
                ((0, 6), "center", "bottom"),
                ((6, -6), "left", "top"),
                ((-6, -6), "right", "top"),
                # farther out, to the right then to the left, when the peak is crowded
                *(
                    ((side * dx, dy), "left" if side > 0 else "right", "bottom")
                    for side in (1, -1)
                    for dx in (16, 40, 80, 160)
                    for dy in (6, -12, -30)
                ),
            )
        ],
    )


def internal_difference_figure(assessment: Assessment) -> Figure:
    """Hottest minus coldest point over time, the peak marked; with a target, the slowest
    point's time to target as a vertical line."""
    t, scale, unit = scaled_times(assessment.solution)
    figure = new_figure(8.0, 3.6)
    axes = figure.subplots()
    axes.fill_between(t, 0, assessment.solution.internal_difference, color=BAND, lw=0)
    peak_label = _difference_axes(axes, assessment, t, scale, unit)
    through = assessment.time_to_target.get("slowest")
    if through is not None:
        x = through / scale
        axes.axvline(x, color=TARGET, lw=0.8, ls="-.")
        label = axes.annotate(
            f"slowest point at {assessment.target:g} °C",
            (x, 0.02),
            xycoords=axes.get_xaxis_transform(),
            xytext=(4, 0),
            textcoords="offset points",
            fontsize=8,
            color=TARGET,
            rotation=90,
        )
        label.set_in_layout(False)
    axes.set_title("Internal temperature difference in the section", fontsize=10, loc="left")
    peak_label()
    if through is not None:  # beside the line, low or high, where the curve is not
        place_clear(
            label,
            [
                {"xy": (x, y), "offset": (dx, 0), "ha": ha, "va": va}
                for y, va in ((0.02, "bottom"), (0.98, "top"))
                for dx, ha in ((4, "left"), (-4, "right"))
            ],
        )
    return figure


def lumped_error_figure(assessment: Assessment) -> Figure:
    """The lumped errors of :attr:`Assessment.error_histories` in percent against the
    tolerance band, with the recommended fitted model's when the advice names one."""
    t, _, unit = scaled_times(assessment.solution)
    tolerance = 100 * assessment.verdict.tolerance
    figure = new_figure(8.0, 4.2)
    axes = figure.subplots()
    axes.axhspan(-tolerance, tolerance, color=BAND, lw=0, label=f"tolerance ±{tolerance:.3g} %")
    axes.axhline(0.0, color=TARGET, lw=0.6)
    colours = {"classical": LUMPED, "corrected": CORRECTED}
    styles = {"field mean": "-", "slowest point": (0, (5, 2.5))}
    largest = tolerance
    for (model, quantity), error in assessment.error_histories.items():
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
    name = RECOMMENDED_NAMES.get(assessment.verdict.recommended, "")
    for quantity, error in assessment.recommended_error_histories.items():
        percent = 100 * error
        largest = max(largest, float(np.max(np.abs(percent))))
        axes.plot(
            t,
            percent,
            color=RECOMMENDED,
            ls=styles[quantity],
            lw=1.6,
            label=f"{name} vs {quantity} (recommended)",
        )
    axes.set_ylim(-1.15 * largest, 1.15 * largest)
    axes.set_ylabel("field − lumped (% of T0 − T∞)")
    axes.set_xlabel(f"time ({unit})")
    note = axes.annotate(
        "above 0: the lumped estimate runs ahead of the field",
        (0.01, 0.98),
        xycoords="axes fraction",
        xytext=(0, 0),
        textcoords="offset points",
        va="top",
        fontsize=8,
        color=TARGET,
    )
    note.set_in_layout(False)
    axes.legend(fontsize=8, frameon=False, loc="lower right", ncols=2)
    axes.set_title(
        "Lumped error against the field, as a share of the initial driving difference",
        fontsize=10,
        loc="left",
    )
    tidy(axes, t)
    place_clear(note, _corners())
    return figure


def _corners() -> list[dict]:
    """Candidate places for a note given in axes fractions: the four corners, then the
    middles of the top and bottom edges."""
    return [
        {"xy": xy, "offset": (0, 0), "ha": ha, "va": va}
        for xy, ha, va in (
            ((0.01, 0.98), "left", "top"),
            ((0.99, 0.98), "right", "top"),
            ((0.01, 0.02), "left", "bottom"),
            ((0.99, 0.02), "right", "bottom"),
            ((0.5, 0.98), "center", "top"),
            ((0.5, 0.02), "center", "bottom"),
        )
    ]


def energy_figure(assessment: Assessment) -> Figure:
    """Stored energy against absorbed heat (the run's ledger) and the classical lumped
    model's stored energy, with the ledger's imbalance below."""
    solution = assessment.solution
    t, _, unit = scaled_times(solution)
    copies = solution.model.section.facts.symmetry_multiplier  # the whole part's energies
    largest = copies * float(
        max(np.max(np.abs(solution.stored_energy)), np.max(np.abs(solution.absorbed_heat)), 1.0)
    )
    figure = new_figure(8.0, 5.2)
    top, bottom = figure.subplots(2, 1, sharex=True, height_ratios=(2.2, 1.0))
    _ledger_axes(top, assessment, t, largest, copies)
    imbalance = copies * (solution.stored_energy - solution.absorbed_heat) / largest
    bottom.plot(t, imbalance, color=INK, lw=1.2)
    bottom.set_ylabel("imbalance\n(share of largest)")
    bottom.set_xlabel(f"time ({unit})")
    note = bottom.annotate(
        f"the run's own balance check: {solution.checks.energy_balance_error:.2g}",
        (0.99, 0.06),
        xycoords="axes fraction",
        xytext=(0, 0),
        textcoords="offset points",
        ha="right",
        fontsize=8,
        color=TARGET,
    )
    note.set_in_layout(False)
    for axes in (top, bottom):
        tidy(axes, t)
    place_clear(
        note, [{"xy": (0.99, 0.06), "offset": (0, 0), "ha": "right", "va": "bottom"}] + _corners()
    )
    return figure


def _ledger_axes(axes, assessment: Assessment, t: np.ndarray, largest: float, copies: int) -> None:
    """Stored energy, heat taken in and the classical lumped model's stored energy of the
    whole part (``copies`` of the modelled piece), in the unit :func:`energy_axis` picks for
    ``largest`` J."""
    solution = assessment.solution
    per_depth = not solution.model.section.axisymmetric
    energy_scale, energy_unit = energy_axis(largest, per_depth)
    energy_scale /= copies
    axes.plot(
        t, solution.stored_energy / energy_scale, color=INK, lw=2.0, label="stored in the part"
    )
    axes.plot(
        t,
        solution.absorbed_heat / energy_scale,
        color=WARM,
        lw=1.2,
        ls=(0, (4, 2)),
        label="taken in through the edges and generated",
    )
    axes.plot(
        t,
        assessment.lumped_energy / energy_scale,
        color=LUMPED,
        lw=1.2,
        ls=(0, (1.5, 1.5)),
        label="stored, classical lumped estimate",
    )
    axes.axhline(0.0, color=TARGET, lw=0.6)
    axes.set_ylabel(f"energy since the start\n({energy_unit})")  # two lines: per depth is long
    axes.legend(fontsize=8, frameon=False)
    sign = "positive: heat taken up" if assessment.heating else "negative: heat given off"
    whole = f", whole part: {copies} copies of the modelled piece" if copies > 1 else ""
    axes.set_title(f"Energy ledger ({sign}{whole})", fontsize=10, loc="left")
