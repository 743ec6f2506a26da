"""Which plots a run has, their titles and captions, and their order: names only, so the
report and the results folder know the plots without loading matplotlib (the figures are
drawn by :mod:`.plots` and :mod:`.process_plots`)."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

# The plots :func:`.plots.write_plots` writes: file stem -> (title, what it shows). The report uses
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


# The figures :func:`.process_plots.process_plots` may add: file stem -> (title, caption).
PROCESS_PLOT_TITLES = {
    "cooling_rates": (
        "Rate of temperature change against temperature",
        "The rate at the slowest point and each probe from local quadratic fits to its "
        "history, the largest rate of each marked and the requested range shaded.",
    ),
    "surface_curves": (
        "The curves of surface temperature used",
        "For each coefficient that follows the surface temperature: h (solid, left axis) and "
        "the heat flux it gives (dashed, right axis), the table's own points marked, and the "
        "band of surface temperatures the run passed through on its edge groups (read from "
        "the stored fields at the output times).",
    ),
}


def in_plot_order(paths: Sequence[Path]) -> list[Path]:
    """``paths`` of plot files in the order of :data:`PLOTS`, then the process plots, each
    stem's formats together (PNG first)."""
    order = {stem: k for k, stem in enumerate([*PLOTS, *PROCESS_PLOT_TITLES])}
    return sorted(
        paths,
        key=lambda p: (order.get(p.stem, len(order)), p.suffix != ".png"),
    )


def written_plots(names: Sequence[str], folder: str) -> set[str]:
    """Stems of the plots of :data:`PLOTS` whose PNG is among the written ``names``."""
    return {stem for stem in PLOTS if f"{folder}/{stem}.png" in names}
