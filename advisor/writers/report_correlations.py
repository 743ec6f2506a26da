"""The report's table of each flow correlation over the run: Re or Ra, Nu and h at a few
surface temperatures its edge groups passed through."""

from __future__ import annotations

import numpy as np

from fem.conditions import CorrelationConvection

from ..analysis.surface_band import curve_conditions, surface_band
from .report_document import Block, Table

POINTS = 5  # surface temperatures per edge group, evenly over the band it passed through


def correlation_blocks(solution) -> list[Block]:
    """A table of Re or Ra, Nu and h for each edge group whose h comes from a correlation;
    none without such a group."""
    rows = []
    for groups, condition in curve_conditions(solution.model):
        if not isinstance(condition, CorrelationConvection) or not condition.bound:
            continue
        for group in groups:
            band = surface_band(solution, group)
            temperatures = np.linspace(band.high, band.low, POINTS)
            for t, value, nusselt, h in condition.rows(temperatures):
                rows.append(
                    (
                        group,
                        f"{t:.4g} °C",
                        f"{condition.table.group} = {value:.3g}",
                        f"{nusselt:.3g}",
                        f"{h:.3g} W/(m²·K)",
                    )
                )
    if not rows:
        return []
    return [
        Table(
            ("edge group", "surface temperature", "Re or Ra", "Nu", "h"),
            tuple(rows),
            "The flow correlations over the run, from the hottest to the coolest surface "
            "temperature each edge group passed through (fluid properties at the film "
            "temperature).",
        )
    ]
