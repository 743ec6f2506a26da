"""The report's parts on what the run found: the verdict, the times to target, the Biot
numbers, the lumped models' errors and parameters, and the run's own checks."""

from __future__ import annotations

from fem.interfaces import largest_jumps, probe_sides

from ..analysis.assessment import Assessment
from ..analysis.verdict import BIOT_NAMES, COMMON_LIMIT
from .report_document import Block, Bullets, Callout, Facts, Paragraph, Part, Table, part
from .report_words import (
    duration,
    millimetres,
    number,
    parameter_words,
    quantity_words,
    time_constant_text,
)


def verdict_part(a: Assessment) -> Part:
    """The rating of the classical lumped estimate and the figures behind it."""
    v = a.verdict
    headline = (
        f"The classical lumped estimate is {v.rating.upper()} for {v.subject}: an error of "
        f"{100 * v.error:.3g} % against a tolerance of {100 * v.tolerance:.3g} %."
    )
    return part(
        "verdict",
        (
            Callout(v.rating, headline, v.rating),
            Facts((("Which way it is wrong", v.direction), ("What to use", v.advice))),
            Bullets(v.reasons, lead="The figures behind the rating:"),
            Paragraph(
                f"Peak internal temperature difference: {a.peak_internal_difference:.4g} K at "
                f"{duration(a.peak_internal_difference_time)}. Largest stored-energy error of "
                f"the classical lumped estimate: {100 * a.energy_error:.3g} % of the energy a "
                "full approach to the ambient exchanges."
            ),
        ),
    )


def target_part(a: Assessment) -> Part:
    """When each estimate and field quantity reaches the target, against the slowest point;
    how the run ended; a staged target's stages."""
    if a.target is None:
        return part(
            "target",
            (
                Paragraph("No target temperature was given, so no times to target."),
                *_ending_blocks(a),
            ),
        )
    reference = a.time_to_target.get("slowest")
    rows = tuple(
        (quantity_words(key), duration(time), _against(time, reference, key))
        for key, time in a.time_to_target.items()
    )
    return part(
        "target",
        (
            Paragraph(f"Time for each estimate and field quantity to reach {a.target:g} °C."),
            Table(("estimate or quantity", "time to target", "against the slowest point"), rows),
            *_ending_blocks(a),
        ),
    )


def _ending_blocks(a: Assessment) -> list[Block]:
    """How the run ended, and each stage of a staged target with its margin."""
    blocks: list[Block] = [Paragraph(f"How the run ended: {a.ending}.")] if a.ending else []
    if not a.stages:
        return blocks
    rows = tuple(
        (
            f"{i + 1}. {r.stage.describe()}",
            duration(r.reached) if r.reached is not None else "not reached",
            r.status,
            _margin(r.margin),
            ", ".join(
                f"{name} {duration(t) if t is not None else 'never'}"
                for name, t in r.lumped.items()
                if name in ("classical", "corrected")
            ),
        )
        for i, r in enumerate(a.stages)
    )
    blocks.append(
        Table(("stage", "reached (field)", "result", "margin", "lumped estimates reach it"), rows)
    )
    return blocks


def _margin(margin: float | None) -> str:
    if margin is None:
        return "—"
    return f"{duration(abs(margin))} {'to spare' if margin >= 0 else 'late'}"


def _against(time: float | None, reference: float | None, key: str) -> str:
    """A time to target against the slowest point's, as a share earlier or later."""
    if time is None or reference is None or reference <= 0 or key == "slowest":
        return "—"
    change = 100 * (time - reference) / reference
    if abs(change) < 0.05:
        return "at the same time"
    return f"{abs(change):.3g} % {'earlier' if change < 0 else 'later'}"


def biot_part(a: Assessment) -> Part:
    """Every Biot number with its length scale and what it measures."""
    regions = bool(a.biot) and bool(a.biot[0].regions)
    rows = tuple(
        (
            BIOT_NAMES.get(b.name, b.name),
            f"{b.value:.3g}",
            *((", ".join(f"{r} {v:.3g}" for r, v in b.regions.items()),) if regions else ()),
            "constant" if f"{b.low:.3g}" == f"{b.high:.3g}" else f"{b.low:.3g} to {b.high:.3g}",
            millimetres(b.length),
            f"{b.heat_transfer_coefficient:.4g} W/(m²·K)",
            b.explanation,
        )
        for b in a.biot
    )
    columns = ("length scale", "Bi", *(("per region",) if regions else ()), "over the run")
    blocks: list[Block] = [
        Paragraph(
            "Bi = h·L/k compares the resistance to conduction inside the part with the "
            "resistance to heat exchange at its surface; each length L answers a different "
            "question."
        ),
        Table((*columns, "L", "mean h", "what it measures"), rows),
        *_interface_blocks(a),
    ]
    if regions:
        blocks.insert(
            1,
            Paragraph(
                "With several materials Bi uses the least conductive region's k (the worst "
                'case); "per region" gives each region\'s own number at the start, and "over '
                'the run" how the worst case changes with time and temperature.'
            ),
        )
    return part("biot", blocks)


def _interface_blocks(a: Assessment) -> list[Block]:
    """The contact interfaces: their resistance against the surface's, and the largest jump
    across each over the run (nothing when the part has none)."""
    found = largest_jumps(a.solution)
    if not found:
        return []
    h = a.biot[0].heat_transfer_coefficient if a.biot else 0.0
    watts = "W" if a.solution.model.section.axisymmetric else "W/m"
    rows = tuple(
        (
            name,
            f"{j.interface.regions[0]} | {j.interface.regions[1]}",
            f"{j.interface.conductance:.4g} W/(m²·K)",
            f"{j.interface.resistance:.3g} m²·K/W",
            f"{j.jump:+.4g} K at {duration(j.time)}",
            f"{abs(j.largest_heat_flow):.4g} {watts}",
            f"{h * j.interface.resistance:.3g}",
        )
        for name, j in found.items()
    )
    blocks: list[Block] = [
        Paragraph(
            "The part has contact interfaces, across which the temperature jumps (the jump is "
            "the first region's temperature minus the second's). The Biot numbers above "
            "measure conduction only: h·R compares an interface's resistance R with the "
            "surface's 1/h and adds to the Biot number of any path that crosses the interface. "
            "The lumped models see one temperature and ignore the interfaces; the corrected "
            "model's correction length includes their resistance."
        ),
        Table(
            (
                "interface",
                "regions",
                "conductance",
                "resistance",
                "largest jump",
                "largest heat flow across",
                "h·R",
            ),
            rows,
        ),
    ]
    largest_biot = max((b.value for b in a.biot), default=0.0)
    for name, j in found.items():
        contact = h * j.interface.resistance
        words = _contact_words(contact, largest_biot)
        if words:
            blocks.append(Paragraph(f"At {name!r}, h·R = {contact:.3g}: {words}"))
    sides = probe_sides(a.solution.model)
    if sides:
        blocks.append(
            Paragraph(
                " ".join(
                    f"Probe {probe!r} lies on interface {name!r} and reads the {region!r} side."
                    for probe, (name, region) in sides.items()
                )
            )
        )
    return blocks


def errors_part(a: Assessment) -> Part:
    """Each lumped model's largest gap to the field quantities it stands for."""
    rows = tuple(
        (
            e.model,
            quantity_words(e.quantity),
            f"{e.largest:.4g} K",
            f"{100 * e.fraction:.3g} %",
            duration(e.time),
            "runs ahead" if e.lumped_ahead else "lags behind",
        )
        for e in a.errors.values()
    )
    return part(
        "errors",
        (
            Paragraph(
                "The largest gap over the run between each lumped model and a field quantity, "
                "as a temperature and as a share of the initial driving difference |T0 − T∞|. "
                "A model that runs ahead heats or cools the part faster than the field does."
            ),
            Table(
                ("model", "against", "largest gap", "share", "at", "the model"),
                rows,
            ),
        ),
    )


def _contact_words(contact: float, largest_biot: float) -> str:
    """What an interface's h·R says about the lumped estimate (empty when it is small)."""
    words = []
    if contact > largest_biot:
        words.append(
            "it exceeds every Biot number above, so the interface holds back more heat than "
            "conduction inside the part does"
        )
    if contact >= COMMON_LIMIT:
        words.append(
            f"on its own it reaches the common-practice limit of {COMMON_LIMIT:g}, so the two "
            "sides need not share one temperature even where the Biot numbers are small"
        )
    return "; ".join(words) + "." if words else ""


def models_part(a: Assessment) -> Part:
    """The lumped family's parameters and the slowest mode, and which models were not fitted."""
    blocks: list[Block] = [
        Paragraph(
            "Parameters of the lumped family for use in system models or hand checks. The "
            "corrected model scales h by 1/(1 + Bi/β); the fitted models are fitted to this "
            "run's field and hold for conditions like it."
        ),
        Table(("model", "parameter", "value", "unit"), tuple(_model_rows(a) + _mode_rows(a))),
        Paragraph(f"How β was chosen: {a.correction_note}."),
    ]
    if not a.lumped.closed_form:  # conditions, radiation or properties change τ
        end = float(a.solution.times[-1])
        blocks.insert(
            2,
            Paragraph(
                "The time constants above are those at the start. Over the run: classical "
                f"lumped {time_constant_text(a.lumped, end)}; corrected lumped "
                f"{time_constant_text(a.corrected, end)}."
            ),
        )
    missing = []
    if a.fitted is None:
        missing.append("a single exponential (conditions change during the run)")
    if a.two_node is None:
        missing.append("a two-node model (the run does not allow a fit)")
    if missing:
        blocks.append(Paragraph("Not fitted: " + "; ".join(missing) + "."))
    return part("models", blocks)


def _model_rows(a: Assessment) -> list[tuple[str, str, str, str]]:
    """(model, parameter, value, unit) of every lumped model there is."""
    rows: list[tuple[str, str, str, str]] = []

    per_depth = not a.solution.model.section.facts.axisymmetric

    def add(model: str, parameters: dict) -> None:
        for key, value in parameters.items():
            words, unit = parameter_words(key)
            shown = number(value, 5)
            if unit == "s" and value is not None:
                shown += f" ({duration(value)})"
            if per_depth and unit in ("J/K", "W/K"):  # planar capacities and conductances
                unit += " per metre of depth"
            rows.append((model, words, shown, unit))

    add("classical lumped", a.lumped.parameters())
    add("corrected lumped", a.corrected.parameters())
    rows.append(
        (
            "corrected lumped",
            "effective heat-transfer coefficient",
            number(a.effective_coefficient, 5),
            "W/(m²·K)",
        )
    )
    rows.append(("corrected lumped", "shape factor β", number(a.correction_shape, 4), ""))
    if a.fitted is not None:
        add("fitted single exponential", a.fitted.parameters())
    if a.two_node is not None:
        add("two-node (core and skin)", a.two_node.parameters())
    return rows


def _mode_rows(a: Assessment) -> list[tuple[str, str, str, str]]:
    """(model, parameter, value, unit) of the slowest mode."""
    mode = a.mode
    return [
        ("slowest mode", "decay rate", number(mode.rate, 5), "1/s"),
        ("slowest mode", "lumped decay rate", number(mode.lumped_rate, 5), "1/s"),
        ("slowest mode", "ratio to the lumped rate", number(mode.ratio, 4), ""),
        (
            "slowest mode",
            "coefficient a lumped model would need",
            number(mode.equivalent_coefficient, 5),
            "W/(m²·K)",
        ),
        ("slowest mode", "peak to mean of the mode shape", number(mode.core_to_mean, 4), ""),
    ]


def checks_part(a: Assessment) -> Part:
    """The run's energy balance, excursions, step sizes and solver statistics."""
    solution = a.solution
    checks, stats = solution.checks, solution.stats
    facts = Facts(
        (
            (
                "Energy balance",
                f"largest mismatch {checks.energy_balance_error:.3g} of the energy scale "
                "(stored against taken in)",
            ),
            (
                "Temperatures outside the initial and boundary range",
                f"{checks.temperature_excursion:.3g} K at most",
            ),
            (
                "Smallest step against the surface elements' diffusion time",
                f"{checks.step_to_surface_diffusion:.3g}",
            ),
            ("Time stepping", _stepping(stats)),
            (
                "Linear algebra",
                f"{stats.unknowns} unknowns, {stats.factorisations} factorisations, "
                f"{stats.solves} triangular solves, {stats.newton_iterations} Newton iterations",
            ),
            (
                "Wall-clock time",
                f"assembly {duration(stats.assembly_seconds)}, factorisation "
                f"{duration(stats.factorisation_seconds)}, stepping "
                f"{duration(stats.stepping_seconds)}",
            ),
        )
    )
    warnings = (
        Bullets(checks.warnings, lead="Failed checks:")
        if checks.warnings
        else Paragraph("Every check passed.")
    )
    notes = [Bullets(checks.notes, lead="Notes on the inputs:")] if checks.notes else []
    return part("checks", (facts, warnings, *notes, *_estimate_blocks(a)))


VALUE_UNITS = {"time_to_target": "s", "peak_difference": "K"}  # temperatures: °C


def _estimate_blocks(a: Assessment) -> list[Block]:
    """The run's own discretisation-error estimate, each answer ± its estimate."""
    estimate = a.error_estimate
    if estimate is None:
        return []
    rows = tuple(
        (
            quantity_words(name) if name.startswith("probe:") else name.replace("_", " "),
            f"{e.value:.5g} {VALUE_UNITS[name]}" if name in VALUE_UNITS else "over the run",
            f"± {e.estimate:.3g} {e.unit}",
            f"{e.space:+.3g} / {e.time:+.3g} {e.unit}",
            f"{e.allowed:.3g} {e.unit}" + (" (exceeded)" if e.exceeds else ""),
        )
        for name, e in estimate.answers.items()
    )
    return [
        Paragraph(f"Discretisation error of the key answers: {estimate.method}."),
        Table(("answer", "value", "estimate", "space / time part", "tolerance"), rows),
        *([Bullets(estimate.warnings, lead="Too large:")] if estimate.warnings else []),
    ]


def _stepping(stats) -> str:
    """How the run stepped through time, in words."""
    if stats.method == "exponential":
        return (
            f"exponential, {stats.steps} step(s) from breakpoint to breakpoint, exact in time "
            f"to an estimated {stats.error_estimate:.3g} K (Krylov basis of up to "
            f"{stats.krylov_dimension} vectors)"
        )
    return (
        f"{stats.method}, {'adaptive' if stats.adaptive else 'fixed'} step "
        f"{duration(stats.smallest_step)} to {duration(stats.largest_step)}, {stats.steps} steps "
        f"({stats.rejected_steps} rejected, {stats.startup_steps} start-up)" + _retries(stats)
    )


def _retries(stats) -> str:
    """Nonlinear steps retried smaller, subdivided or damped, in words (empty when none)."""
    counts = (
        (stats.retried_steps, "retried at half the size"),
        (stats.subdivided_steps, "taken in substeps"),
        (stats.damped_iterations, "Newton updates shortened by the line search"),
    )
    words = [f"{n} {what}" for n, what in counts if n]
    return f"; {', '.join(words)}" if words else ""
