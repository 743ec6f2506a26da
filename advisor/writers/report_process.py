"""The report's parts on the process readings an assessment carries on request: the quench
readings (rates against temperature, the largest rate, times to temperatures and through a
range), the freezing time of the field beside Plank's and Pham's, and the curves of surface
temperature a model's coefficients followed with the surface temperatures the run passed
through."""

from __future__ import annotations

from ..analysis.assessment import Assessment
from ..analysis.surface_band import curve_conditions, surface_band
from .report_correlations import correlation_blocks
from .report_document import Block, Facts, Paragraph, Part, Picture, Table, part
from .report_words import duration, millimetres, number, quantity_words


def quench_part(a: Assessment, picture: Picture | None = None) -> Part:
    """The largest rate of each history with its temperature and time, the time through the
    cooling range, the times to the requested temperatures, and the rate plot."""
    quench = a.quench
    words = "cooling rate" if quench.cooling else "heating rate"
    blocks: list[Block] = [
        Paragraph(
            f"The {words} of each history is the slope of a quadratic fitted by least squares "
            "to each recorded point and its neighbours, so the step-to-step jitter of the time "
            "scheme is not amplified. The slowest point is the one farthest from the ambient."
        )
    ]
    columns = ["history", f"largest {words}", "at temperature", "at time"]
    if quench.cooling_range is not None:
        start, end = quench.cooling_range
        columns.append(f"time from {start:g} to {end:g} °C")
    rows = []
    for name, curve in quench.curves.items():
        row = [
            quantity_words(name),
            f"{curve.largest_rate:.4g} K/s",
            f"{curve.largest_rate_temperature:.4g} °C",
            duration(curve.largest_rate_time),
        ]
        if quench.cooling_range is not None:
            row.append(duration(curve.range_time))
        rows.append(tuple(row))
    blocks.append(Table(tuple(columns), tuple(rows), caption=f"Largest {words}"))
    if quench.times_to:
        blocks.append(
            Table(
                ("history", *(f"time to {t:g} °C" for t in quench.times_to)),
                tuple(
                    (quantity_words(name), *(duration(curve.times_to[t]) for t in quench.times_to))
                    for name, curve in quench.curves.items()
                ),
                caption="When each history first reaches the requested temperatures",
            )
        )
    if picture is not None:
        blocks.append(picture)
    return part("quench", blocks)


def freezing_part(a: Assessment) -> Part:
    """The field's freezing time beside Plank's and Pham's, their errors and which way."""
    f = a.freezing
    rows = [("the field, slowest point", duration(f.field_time), "—", "the reference")]
    for key, name in (("plank", "Plank's equation"), ("pham", "Pham's method (1986)")):
        hand, error = getattr(f, key), f.error(key)
        if hand is None:
            rows.append((name, "outside its range of use", "—", "—"))
            continue
        rows.append(
            (
                name,
                duration(hand),
                "—" if error is None else f"{100 * error:+.3g} %",
                "—" if error is None else _which_way(error),
            )
        )
    return part(
        "freezing",
        (
            Paragraph(
                f"Freezing ends when the slowest point of the field passes {f.end_temperature:g} "
                "°C. Plank's equation counts only the latent heat, conducted through the frozen "
                "layer and the surface film; Pham's method adds the sensible heat removed "
                "before and after freezing. Error = (hand calculation − field) / field."
            ),
            Table(("estimate", "freezing time", "error", "which way"), tuple(rows)),
            Paragraph(f.wording),
            Facts(
                (
                    ("Half-thickness or radius d", millimetres(f.half_thickness)),
                    ("Shape number E = d·A/V", number(f.shape_number, 3)),
                    (
                        "Heat-transfer coefficient used",
                        f"{f.heat_transfer_coefficient:.4g} W/(m²·K)",
                    ),
                    ("Medium temperature", f"{f.medium_temperature:.4g} °C"),
                )
            ),
        ),
    )


def curves_part(a: Assessment, picture: Picture | None = None) -> Part:
    """Each coefficient that follows the surface temperature, in words, with the band of
    surface temperatures its edge groups passed through, and the plot of the curves."""
    solution = a.solution
    end = float(solution.times[-1])
    rows = []
    for groups, condition in curve_conditions(solution.model):
        for group in groups:
            band = surface_band(solution, group)
            rows.append((group, condition.describe(end), f"{band.low:.4g} to {band.high:.4g} °C"))
    blocks: list[Block] = [
        Paragraph(
            "Where a coefficient follows the surface temperature, the run used only the part "
            "of its curve between the lowest and highest surface temperatures of its edge "
            f"groups, read here from the {len(solution.output_times)} stored fields; between "
            "output times the surface may have gone a little beyond them. Beyond a table's "
            "ends its end value carries on (a heat-flux table: its end's q/(T_s − T∞))."
        ),
        Table(
            ("edge group", "the curve", "surface temperatures over the run"),
            tuple(rows),
        ),
    ]
    blocks.extend(correlation_blocks(solution))
    if picture is not None:
        blocks.append(picture)
    return part("curves", blocks)


def _which_way(error: float) -> str:
    """The sign of a hand freezing time's error in words."""
    if abs(error) < 0.005:
        return "agrees within 0.5 %"
    if error < 0:
        return "too short (non-conservative)"
    return "too long (conservative)"
