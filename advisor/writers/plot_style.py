"""The plots' shared style and saving: colours, time and energy axes, figures with their own
canvas, the tidy look of every time axis, and atomic PNG/SVG files.

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
from matplotlib.figure import Figure

from ..time_words import duration_text
from .atomic import write_with

INK = "#1d3557"
WARM = "#c8553d"
COOL = "#3a86a8"
LUMPED = "#b5651d"
CORRECTED = "#6b8f23"
BAND = "#dfe7ef"
TARGET = "#5c5c5c"
GRID = "#e6e6e6"
RECOMMENDED = "#7b2d8b"  # the model the advice recommends, when it is a fitted one
PROBE_COLOURS = ("#2a9d8f", "#8e6c8a", "#6b8f23", "#d19c1d", "#4f6d7a")
FIELD_MAP = "cividis"
FORMATS = ("png", "svg")
DPI = 120
PAD = 0.08  # inches of margin around what is drawn


def time_axis(end_time: float) -> tuple[float, str]:
    """A divisor and unit label that keep time ticks readable."""
    if end_time >= 3 * 3600:
        return 3600.0, "h"
    if end_time >= 3 * 60:
        return 60.0, "min"
    return 1.0, "s"


def clock(seconds: float) -> str:
    """A time a person reads at a glance: ``"45 s"``, ``"3 min 40 s"``, ``"2 h 5 min"``
    (:func:`advisor.time_words.duration_text`)."""
    return duration_text(seconds)


def energy_axis(largest: float, per_depth: bool) -> tuple[float, str]:
    """A divisor and unit label for energies whose largest magnitude is ``largest`` J."""
    suffix = " per metre of depth" if per_depth else ""
    for scale, unit in ((1e9, "GJ"), (1e6, "MJ"), (1e3, "kJ")):
        if largest >= scale:
            return scale, unit + suffix
    return 1.0, "J" + suffix


def new_figure(width: float, height: float) -> Figure:
    """A figure with its own Agg canvas, laid out by matplotlib's constrained layout."""
    figure = Figure(figsize=(width, height), dpi=DPI, layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def tidy(axes, t) -> None:
    axes.grid(axis="y", color=GRID, lw=0.6)
    axes.spines[["top", "right"]].set_visible(False)
    axes.set_xlim(t[0], t[-1])


def lay_out(figure: Figure):
    """Lay ``figure`` out (constrained layout, a draw without rendering) unless it was laid
    out already and nothing was added, moved or rescaled since; return its renderer.

    A layout is a third of a figure's drawing time: the labels placed clear of the curves
    (:func:`.plot_labels.place_clear`) and the saving share one.
    """
    if getattr(figure, "_laid_out", None) != _layout_mark(figure):
        figure.draw_without_rendering()
        figure._laid_out = _layout_mark(figure)
    return figure.canvas.get_renderer()


def _layout_mark(figure: Figure) -> tuple:
    """What a layout depends on that a figure's builder changes: its size, its axes, their
    artists and view limits (labels kept out of the layout are moved freely)."""
    return (
        tuple(figure.get_size_inches()),
        figure.dpi,
        tuple((len(axes.get_children()), tuple(axes.viewLim.bounds)) for axes in figure.axes),
    )


def save_figure(figure: Figure, stem: Path, formats: Sequence[str] = FORMATS) -> list[Path]:
    """Save ``figure`` as ``stem.png``, ``stem.svg`` (or ``formats``) atomically.

    The picture is cut to what is drawn (a left-aligned title wider than its axes, for tall
    sections, stays in it) with a margin of :data:`PAD` inches. A PNG reuses the figure's
    layout (:func:`lay_out`) and is drawn once; an SVG is laid out again at its own 72 dpi.
    """
    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    paths = []
    for kind in formats:
        path = stem.with_name(f"{stem.name}.{kind}")
        write_with(path, lambda p, k=kind: _save(figure, p, k))
        paths.append(path)
    return paths


def _save(figure: Figure, path: Path, kind: str) -> None:
    if kind != "png":
        figure.savefig(path, format=kind, bbox_inches="tight", pad_inches=PAD)
        return
    box = figure.get_tightbbox(lay_out(figure)).padded(PAD)
    engine = figure.get_layout_engine()
    figure.set_layout_engine("none")  # laid out above: savefig would lay out and draw twice
    try:
        figure.savefig(path, format=kind, bbox_inches=box)
    finally:
        figure.set_layout_engine(engine)


def scaled_times(solution) -> tuple[np.ndarray, float, str]:
    """The run's times in the unit of :func:`time_axis`, with its divisor and label."""
    scale, unit = time_axis(float(solution.times[-1]))
    return solution.times / scale, scale, unit
