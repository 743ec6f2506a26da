"""Plots of a run, each saved as PNG (and SVG when asked): writing them all (which plots
there are, and their order: :mod:`.plot_list`).

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
from .plot_list import PLOTS, PROCESS_PLOT_TITLES, in_plot_order, written_plots
from .plot_style import save_figure
from .process_plots import process_plots

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
    process plots the assessment has (:data:`.plot_list.PROCESS_PLOT_TITLES`: cooling rates,
    surface curves); return the paths in that order, formats within each. The field
    snapshots show the whole part unfolded across ``mirrors``."""
    drawn = write_line_plots(assessment, folder, formats)
    drawn += write_snapshots(assessment, Path(folder) / "field_snapshots", formats, mirrors)
    return in_plot_order(drawn)


def write_line_plots(
    assessment: Assessment,
    folder: Path,
    formats: Sequence[str] = ("png",),
    process: bool = True,
    stems: Sequence[str] | None = None,
) -> list[Path]:
    """Write the plots matplotlib draws (every plot of :data:`BUILDERS`, or those of
    ``stems``, and the process plots unless ``process`` is False); return their paths."""
    paths = []
    for stem, build in BUILDERS.items():
        if stems is None or stem in stems:
            paths += save_figure(build(assessment), Path(folder) / stem, formats)
    return paths + (write_process_plots(assessment, folder, formats) if process else [])


def write_process_plots(
    assessment: Assessment, folder: Path, formats: Sequence[str] = ("png",)
) -> list[Path]:
    """Write the process plots the assessment has (:func:`.process_plots.process_plots`);
    return their paths."""
    paths = []
    for stem, figure in process_plots(assessment).items():
        paths += save_figure(figure, Path(folder) / stem, formats)
    return paths


__all__ = [
    "PLOTS",
    "PROCESS_PLOT_TITLES",
    "in_plot_order",
    "write_line_plots",
    "write_plots",
    "write_process_plots",
    "written_plots",
]
