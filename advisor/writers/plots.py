"""Plots of a run, each saved as PNG (and SVG when asked): which plots there are, and
writing them all.

The figures over time are in :mod:`.history_plots` (matplotlib's object interface, no global
pyplot state), the field snapshots in :mod:`.field_plots` (pixels, no figure), the shared
style and saving in :mod:`.plot_style`.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from ..analysis.assessment import Assessment
from ..whole_part import Mirror
from .field_plots import write_snapshots
from .history_plots import (
    energy_figure,
    history_figure,
    internal_difference_figure,
    lumped_error_figure,
)
from .plot_style import save_figure
from .process_plots import PROCESS_PLOTS, process_plots

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
        "hottest and coldest points marked; a symmetric model is drawn as the whole part, "
        "its symmetry lines dashed.",
    ),
    "energy": (
        "Energy ledger",
        "Heat stored in the part against heat taken in through its edges (and generated), "
        "with the classical lumped estimate; below, their difference.",
    ),
}


BUILDERS = {
    "histories": history_figure,
    "internal_difference": internal_difference_figure,
    "lumped_error": lumped_error_figure,
    "energy": energy_figure,
}


def write_plots(
    assessment: Assessment,
    folder: Path,
    formats: Sequence[str] = ("png",),
    mirrors: Sequence[Mirror] = (),
) -> list[Path]:
    """Write every plot of :data:`PLOTS` into ``folder`` in each of ``formats``, then the
    process plots the assessment has (:data:`.process_plots.PROCESS_PLOTS`: cooling rates,
    surface curves); return the paths in that order, formats within each. The field
    snapshots show the whole part unfolded across ``mirrors``."""
    drawn = write_line_plots(assessment, folder, formats)
    drawn += write_snapshots(assessment, Path(folder) / "field_snapshots", formats, mirrors)
    return in_plot_order(drawn)


def write_line_plots(
    assessment: Assessment, folder: Path, formats: Sequence[str] = ("png",)
) -> list[Path]:
    """Write the plots matplotlib draws (every plot but the field snapshots, and the process
    plots); return their paths."""
    paths = []
    for stem, build in BUILDERS.items():
        paths += save_figure(build(assessment), Path(folder) / stem, formats)
    for stem, figure in process_plots(assessment).items():
        paths += save_figure(figure, Path(folder) / stem, formats)
    return paths


def in_plot_order(paths: Sequence[Path]) -> list[Path]:
    """``paths`` of plot files in the order of :data:`PLOTS`, then the process plots, each
    stem's formats together (PNG first)."""
    order = {stem: k for k, stem in enumerate([*PLOTS, *PROCESS_PLOTS])}
    return sorted(
        paths,
        key=lambda p: (order.get(p.stem, len(order)), p.suffix != ".png"),
    )


def written_plots(names: Sequence[str], folder: str) -> set[str]:
    """Stems of the plots of :data:`PLOTS` whose PNG is among the written ``names``."""
    return {stem for stem in PLOTS if f"{folder}/{stem}.png" in names}
