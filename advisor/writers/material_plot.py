"""The picture of one library material: conductivity and specific heat over its range."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .plot_style import BAND, GRID, INK, WARM, new_figure, save_figure


def material_figure(name: str, temperatures, conductivity, specific_heat, density, valid_range):
    """Two panels against temperature (°C): k in W/(m·K) and c in J/(kg·K) (apparent, latent
    heat included: then on a logarithmic axis, the peak being a hundred times the rest); the
    valid range shaded."""
    figure = new_figure(7.5, 5.2)
    top, bottom = figure.subplots(2, 1, sharex=True)
    for axes, values, colour, label in (
        (top, conductivity, INK, "conductivity k (W/(m·K))"),
        (bottom, specific_heat, WARM, "specific heat c (J/(kg·K))"),
    ):
        axes.plot(temperatures, values, color=colour, lw=1.8)
        axes.set_ylabel(label)
        axes.grid(axis="y", color=GRID, lw=0.6)
        axes.spines[["top", "right"]].set_visible(False)
        if valid_range is not None:
            axes.axvspan(*valid_range, color=BAND, lw=0, zorder=0)
        if axes is bottom and np.max(values) > 20 * np.min(values):  # latent heat
            axes.set_yscale("log")
        else:
            axes.set_ylim(bottom=min(0.0, float(np.min(values))))
    bottom.set_xlabel("temperature (°C)")
    words = "" if valid_range is None else f", data {valid_range[0]:g} to {valid_range[1]:g} °C"
    top.set_title(f"{name}: density {density:.5g} kg/m³{words}", fontsize=10, loc="left")
    return figure


def write_material_plot(path: Path, *args) -> Path:
    """Write :func:`material_figure` as the PNG ``path``."""
    figure = material_figure(*args)
    (written,) = save_figure(figure, Path(path).with_suffix(""), formats=("png",))
    return written
