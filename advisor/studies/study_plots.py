"""Plots of a study: the validity map, the spread of the answers, the inputs that matter and
grid convergence, with matplotlib's object interface in the run plots' style
(:mod:`advisor.writers.plots`: rust dashed for the classical lumped model, olive for the
corrected one, ink for the field, light horizontal grid only).

The rating regions are shaded in three pale tints of our own: sage (adequate), sand
(marginal) and clay (inadequate).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from pathlib import Path

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Patch
from matplotlib.ticker import FuncFormatter, NullFormatter

from ..writers.plot_style import (
    BAND,
    CORRECTED,
    FORMATS,
    GRID,
    INK,
    LUMPED,
    TARGET,
    WARM,
    new_figure,
    save_figure,
)
from .convergence import GridConvergence
from .uncertainty import Influence, Spread
from .validity import DesignRule, ValidityMap, rating_regions, variable_words

REGION_TINTS = {"adequate": "#e4ecd6", "marginal": "#f4e9c8", "inadequate": "#f3dcd5"}
MODEL_STYLES = {
    "classical": {"color": LUMPED, "ls": (0, (6, 3)), "marker": "o"},
    "corrected": {"color": CORRECTED, "ls": (0, (1.5, 1.5)), "marker": "s"},
}
ANSWER_WORDS = {
    "time_to_target_slowest_s": ("slowest point's time to target", "s"),
    "time_to_target_classical_s": ("classical lumped time to target", "s"),
    "time_to_target_corrected_s": ("corrected lumped time to target", "s"),
    "peak_difference_K": ("peak internal ΔT", "K"),
    "peak_difference_time_s": ("time of the peak internal ΔT", "s"),
}

# The plots a study report shows: file stem -> (title, what it shows).
STUDY_PLOTS = {
    "validity_map": (
        "Validity map",
        "The largest error of the classical and corrected lumped estimates, as a share of "
        "the initial driving difference, for each case; the tolerance and twice it as lines "
        "and the classical estimate's rating as shaded bands.",
    ),
    "spread": (
        "Spread of the answers",
        "Histograms of the answers over the sampled cases with their 5, 50 and 95 % values; "
        "the pale band around each mark is its bootstrap confidence interval.",
    ),
    "influence": (
        "Which input matters most",
        "Spearman's rank correlation of each varied input with each answer (negative: the "
        "answer falls as the input rises), or on request its first-order Sobol index (the "
        "share of the answer's variance it explains alone).",
    ),
    "convergence": (
        "Grid convergence",
        "Each answer against the representative element size, with Richardson's "
        "extrapolated value at zero size and the fine-grid convergence index as an error bar "
        "on the finest grid's value.",
    ),
}


def axis_label(column: str) -> str:
    """An axis label for a column: its symbol and unit (``"h (W/(m²·K))"``)."""
    if column in ANSWER_WORDS:
        words, unit = ANSWER_WORDS[column]
        return f"{words} ({unit})"
    symbol, unit, _ = variable_words(column)
    if column.startswith("biot"):
        return f"Bi ({column.removeprefix('biot_').replace('_', ' ')})"
    return f"{symbol} ({unit})" if unit else symbol


def _tidy(axes) -> None:
    axes.grid(axis="y", color=GRID, lw=0.6, which="both")
    axes.spines[["top", "right"]].set_visible(False)


def _plain_log_ticks(axis, low: float, high: float) -> None:
    """Log-axis labels as plain numbers (0.1, 20, 300); minor ticks labelled too when the
    range is under a decade, so that a narrow axis still carries numbers."""
    plain = FuncFormatter(lambda value, _: f"{value:g}")
    axis.set_major_formatter(plain)
    axis.set_minor_formatter(plain if high < 10 * low else NullFormatter())


def validity_figure(vmap: ValidityMap, rules: Sequence[DesignRule] = ()) -> Figure:
    """Lumped error against the map's input (log–log), tolerance lines, rating bands of the
    classical model and the design limits found."""
    _, _, scale = variable_words(vmap.variable)
    x = vmap.values * scale
    figure = new_figure(8.0, 4.6)
    axes = figure.subplots()
    shaded = "classical" if "classical" in vmap.errors else next(iter(vmap.errors))
    for low, high, rated in rating_regions(vmap, shaded):
        axes.axvspan(low * scale, high * scale, color=REGION_TINTS[rated], lw=0, zorder=0)
    for model, errors in vmap.errors.items():
        style = MODEL_STYLES.get(model, {"color": INK, "ls": "-", "marker": "^"})
        axes.plot(x, 100 * errors, lw=1.6, ms=3.5, label=f"{model} lumped", **style)
    tolerance = 100 * vmap.tolerance
    axes.axhline(tolerance, color=INK, lw=1.0, label=f"tolerance {tolerance:.3g} %")
    axes.axhline(2 * tolerance, color=INK, lw=0.8, ls=(0, (4, 2)), label="twice the tolerance")
    for rule in rules:
        if rule.limit is None:
            continue
        axes.axvline(rule.limit * scale, color=TARGET, lw=0.8, ls="-.")
        axes.annotate(  # along the line, from the foot of the axes: limits never overlap
            f"{rule.model} limit {rule.limit * scale:.3g}",
            (rule.limit * scale, 0.03),
            xycoords=axes.get_xaxis_transform(),
            xytext=(-3, 0),
            textcoords="offset points",
            rotation=90,
            ha="right",
            va="bottom",
            fontsize=8,
            color=TARGET,
        )
    axes.set_xscale("log")
    axes.set_yscale("log")
    axes.set_xlim(x[0], x[-1])
    axes.set_xlabel(axis_label(vmap.variable))
    axes.set_ylabel(f"largest lumped error, {vmap.subject} (%)")
    _plain_log_ticks(axes.xaxis, x[0], x[-1])
    errors = np.concatenate([100 * e for e in vmap.errors.values()] + [[tolerance]])
    _plain_log_ticks(axes.yaxis, float(np.min(errors)), float(np.max(errors)))
    handles, labels = axes.get_legend_handles_labels()
    for rated, tint in REGION_TINTS.items():
        handles.append(Patch(facecolor=tint, edgecolor="#a8a8a8", lw=0.5))
        labels.append(f"{shaded} {rated}")
    axes.legend(handles, labels, fontsize=8, frameon=False, ncols=2, loc="upper left")
    axes.set_title(f"Where the lumped estimate holds ({vmap.subject})", fontsize=10, loc="left")
    _tidy(axes)
    return figure


def spread_figure(spreads: Sequence[Spread]) -> Figure:
    """One histogram per answer with its 5/50/95 % values and their bootstrap intervals."""
    if not spreads:
        raise ValueError("no spreads to draw")
    figure = new_figure(4.2 * len(spreads) + 0.6, 3.8)
    panels = np.atleast_1d(figure.subplots(1, len(spreads)))
    for axes, s in zip(panels, spreads, strict=True):
        bins = min(60, max(10, int(np.sqrt(s.count))))
        axes.hist(s.values, bins=bins, color=BAND, edgecolor="#b9c6d3", lw=0.5)
        top = axes.get_ylim()[1]
        for level, value in s.quantiles.items():
            low, high = s.intervals[level]
            axes.axvspan(low, high, color=WARM if level == 0.5 else INK, alpha=0.15, lw=0)
            axes.axvline(value, color=WARM if level == 0.5 else INK, lw=1.2)
            axes.annotate(
                f"{100 * level:g} %: {value:.4g}",
                (value, top),
                xytext=(3, -3),
                textcoords="offset points",
                rotation=90,
                va="top",
                fontsize=8,
            )
        axes.set_xlabel(axis_label(s.column))
        axes.set_ylabel("cases")
        axes.set_title(
            f"mean {s.mean:.4g}, standard deviation {s.standard_deviation:.3g} ({s.count} cases)",
            fontsize=9,
            loc="left",
        )
        _tidy(axes)
    return figure


def influence_figure(influences: Mapping[str, Sequence[Influence]]) -> Figure:
    """Horizontal bars of each input's influence on each answer (one panel per answer)."""
    if not influences:
        raise ValueError("no influences to draw")
    rows = max(len(v) for v in influences.values())
    figure = new_figure(4.2 * len(influences) + 0.6, 0.5 * rows + 1.6)
    panels = np.atleast_1d(figure.subplots(1, len(influences), sharey=False))
    for axes, (answer, found) in zip(panels, influences.items(), strict=True):
        names = [axis_label(i.input) for i in found][::-1]
        values = [i.value for i in found][::-1]
        colours = [WARM if v < 0 else INK for v in values]
        axes.barh(names, values, color=colours, height=0.6)
        axes.axvline(0, color=TARGET, lw=0.6)
        lower = -1 if any(v < 0 for v in values) else 0
        axes.set_xlim(lower, 1)
        axes.set_xlabel(found[0].method if found else "")
        axes.set_title(ANSWER_WORDS.get(answer, (answer, ""))[0], fontsize=9, loc="left")
        axes.spines[["top", "right"]].set_visible(False)
    return figure


def convergence_figure(results: Mapping[str, GridConvergence], sizes_all=None) -> Figure:
    """Each answer against the element size, its extrapolated value and GCI (finest grid).

    ``results`` maps an answer's column to its finest triple; ``sizes_all`` optionally maps
    it to (sizes, values) of every grid run, m and the answer's unit.
    """
    if not results:
        raise ValueError("no convergence results to draw")
    figure = new_figure(4.2 * len(results) + 0.6, 3.8)
    panels = np.atleast_1d(figure.subplots(1, len(results)))
    for axes, (answer, g) in zip(panels, results.items(), strict=True):
        sizes, values = (sizes_all or {}).get(answer, (g.sizes, g.values))
        h = 1e3 * np.asarray(sizes)
        axes.plot(h, values, "o", color=INK, ms=5, label="grids run", zorder=3)
        if np.isfinite(g.order):
            curve = np.linspace(0, h.max(), 100)
            fitted = (
                g.extrapolated
                + (g.values[0] - g.extrapolated) * (curve / (1e3 * g.sizes[0])) ** g.order
            )
            axes.plot(
                curve, fitted, color=TARGET, lw=0.9, ls=(0, (4, 2)), label=f"p = {g.order:.3g}"
            )
        axes.plot([0.0], [g.extrapolated], "D", color=WARM, ms=5, label="extrapolated")
        axes.errorbar(  # the index is the uncertainty band of the finest grid's value
            [1e3 * g.sizes[0]],
            [g.values[0]],
            yerr=[[abs(g.gci_fine * g.values[0])]],
            fmt="none",
            ecolor=WARM,
            capsize=4,
            label=f"finest grid ± GCI ({100 * g.gci_fine:.2g} %)",
        )
        axes.set_xlabel("representative element size (mm)")
        axes.set_ylabel(axis_label(answer))
        axes.set_xlim(left=-0.03 * h.max())
        axes.legend(fontsize=8, frameon=False)
        axes.set_title(f"{g.behaviour} convergence", fontsize=9, loc="left")
        _tidy(axes)
    return figure


def write_study_plot(figure: Figure, folder: Path, stem: str, formats=FORMATS) -> list[Path]:
    """Save a study figure as ``folder/stem.png`` (and ``.svg``) atomically."""
    return save_figure(figure, Path(folder) / stem, formats)
