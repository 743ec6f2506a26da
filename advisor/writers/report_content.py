"""What the report says, built once from an Assessment and rendered twice (HTML and Markdown).

The content is plain text in a few block types; the renderers escape every piece of it, so
names a user gave (materials, regions, edge groups, probes) can never become markup.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from fem.schedules import schedule_text

from ..analysis.assessment import Assessment
from ..caution import CAUTION
from .plots import clock


@dataclass(frozen=True)
class Paragraph:
    text: str


@dataclass(frozen=True)
class Facts:
    """Label–value pairs."""

    pairs: tuple[tuple[str, str], ...]


@dataclass(frozen=True)
class Table:
    columns: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    caption: str = ""


@dataclass(frozen=True)
class Bullets:
    items: tuple[str, ...]
    lead: str = ""


@dataclass(frozen=True)
class Picture:
    """An image file, ``path`` relative to the report (POSIX separators)."""

    path: str
    title: str
    caption: str


@dataclass(frozen=True)
class Callout:
    """A boxed statement; ``tone`` is a rating (``adequate``, ``marginal``, ``inadequate``)
    or ``caution``."""

    title: str
    text: str
    tone: str


Block = Paragraph | Facts | Table | Bullets | Picture | Callout


@dataclass(frozen=True)
class Part:
    heading: str
    anchor: str
    blocks: tuple[Block, ...]


@dataclass(frozen=True)
class Report:
    title: str
    lede: str
    parts: tuple[Part, ...]


# The report's section headings, in order (tests look for them in the rendered page).
HEADINGS = {
    "verdict": "Can the lumped estimate be trusted here?",
    "target": "When each estimate reaches the target",
    "histories": "How the run went",
    "inputs": "What was modelled",
    "biot": "Biot numbers and what each one measures",
    "errors": "How far each lumped model strays from the field",
    "models": "Simple models that stand in for the field",
    "checks": "The run's own checks",
    "files": "Files in this results folder",
    "caution": "Before relying on these figures",
}

_UNIT_SUFFIXES = (
    ("_J_per_K", "J/K"),
    ("_W_per_K", "W/K"),
    ("_W_per_m2_K", "W/(m²·K)"),
    ("_degC", "°C"),
    ("_per_s", "1/s"),
    ("_s", "s"),
    ("_K", "K"),
)


def number(value: float | None, digits: int = 4) -> str:
    """``value`` to ``digits`` significant figures; a dash for None."""
    if value is None:
        return "—"
    return f"{float(value):.{digits}g}"


def duration(seconds: float | None) -> str:
    """A time as seconds and, when long, as minutes and hours too."""
    if seconds is None:
        return "not within the run"
    if seconds < 120:
        return f"{seconds:.4g} s"
    return f"{seconds:.5g} s ({clock(seconds)})"


def _parameter(key: str) -> tuple[str, str]:
    """A ``parameters()`` key split into words and a unit."""
    for suffix, unit in _UNIT_SUFFIXES:
        if key.endswith(suffix):
            return key[: -len(suffix)].replace("_", " "), unit
    return key.replace("_", " "), ""


def condition_text(condition, end_time: float) -> str:
    """One boundary condition in words."""
    return condition.describe(end_time)


def _property(value, unit: str) -> str:
    if isinstance(value, float | int):
        return f"{value:.4g} {unit}"
    low, high = value.range
    t0, t1 = value.temperatures[0], value.temperatures[-1]
    return f"{low:.4g} to {high:.4g} {unit} (table, {t0:.4g} to {t1:.4g} °C)"


def _initial(value) -> str:
    if isinstance(value, float | int):
        return f"{value:.4g} °C, uniform"
    if isinstance(value, dict):
        return "; ".join(f"{region}: {t:.4g} °C" for region, t in value.items())
    values = np.asarray(value, dtype=float)
    return f"the field of an earlier run, {values.min():.4g} to {values.max():.4g} °C"


def _mm(length: float) -> str:
    return f"{1000 * length:.4g} mm"


def _what(key: str) -> str:
    """A model or field quantity key in words."""
    names = {
        "classical": "classical lumped estimate",
        "corrected": "corrected lumped model",
        "fitted exponential": "fitted single exponential",
        "two-node (core)": "two-node model, core node",
        "two-node": "two-node model",
        "mean": "field mean",
        "slowest": "slowest point of the field",
        "hottest": "hottest point of the field",
        "coldest": "coldest point of the field",
    }
    if key.startswith("probe:"):
        return f"probe {key[len('probe:') :]}"
    return names.get(key, key)


def build_report(
    assessment: Assessment,
    pictures: Sequence[Picture] = (),
    files: Sequence[str] = (),
) -> Report:
    """The report's content for ``assessment``, with ``pictures`` under the histories and
    ``files`` (paths relative to the results folder) listed at the end."""
    solution = assessment.solution
    lumped = assessment.lumped
    heating = assessment.heating
    end = float(solution.times[-1])
    verdict = assessment.verdict
    target = (
        f"; target {assessment.target:g} °C" if assessment.target is not None else "; no target"
    )
    lede = (
        f"The section {'heats' if heating else 'cools'} from {lumped.initial_temperature:.4g} °C "
        f"towards {lumped.equilibrium:.4g} °C over {clock(end)}{target}. The verdict is about "
        f"{verdict.subject}, with a tolerance of {100 * verdict.tolerance:.3g} %."
    )
    parts = [
        _verdict_part(assessment),
        _target_part(assessment),
        Part(HEADINGS["histories"], "histories", tuple(pictures))
        if pictures
        else Part(HEADINGS["histories"], "histories", (Paragraph("No plots were written."),)),
        _inputs_part(assessment),
        _biot_part(assessment),
        _errors_part(assessment),
        _models_part(assessment),
        _checks_part(assessment),
    ]
    if files:
        parts.append(Part(HEADINGS["files"], "files", (Bullets(tuple(files)),)))
    parts.append(Part(HEADINGS["caution"], "caution", (Callout("Caution", CAUTION, "caution"),)))
    return Report(
        title=f"soakwise: how the section {'heats up' if heating else 'cools down'}",
        lede=lede,
        parts=tuple(parts),
    )


def _verdict_part(a: Assessment) -> Part:
    v = a.verdict
    headline = (
        f"The classical lumped estimate is {v.rating.upper()} for {v.subject}: an error of "
        f"{100 * v.error:.3g} % against a tolerance of {100 * v.tolerance:.3g} %."
    )
    return Part(
        HEADINGS["verdict"],
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


def _target_part(a: Assessment) -> Part:
    if a.target is None:
        blocks = (Paragraph("No target temperature was given, so no times to target."),)
        return Part(HEADINGS["target"], "target", blocks)
    reference = a.time_to_target.get("slowest")
    rows = []
    for key, time in a.time_to_target.items():
        if time is None or reference is None or reference <= 0 or key == "slowest":
            against = "—"
        else:
            change = 100 * (time - reference) / reference
            if abs(change) < 0.05:
                against = "at the same time"
            else:
                against = f"{abs(change):.3g} % {'earlier' if change < 0 else 'later'}"
        rows.append((_what(key), duration(time), against))
    return Part(
        HEADINGS["target"],
        "target",
        (
            Paragraph(f"Time for each estimate and field quantity to reach {a.target:g} °C."),
            Table(("estimate or quantity", "time to target", "against the slowest point"), rows),
        ),
    )


def _inputs_part(a: Assessment) -> Part:
    solution = a.solution
    model = solution.model
    section = model.section
    facts = section.facts
    end = float(solution.times[-1])
    per_depth = "" if facts.axisymmetric else " per m of depth"
    exchange = model.exchange_groups
    general = Facts(
        (
            (
                "Section",
                "axisymmetric (the solid of revolution about r = 0)"
                if facts.axisymmetric
                else "planar (per metre of depth)",
            ),
            ("Modelled area", f"{facts.area * 1e6:.5g} mm²"),
            ("Volume", f"{facts.volume:.5g} m³{per_depth}"),
            (
                "Copies that make the whole part",
                f"{facts.symmetry_multiplier} (symmetry cuts)"
                if facts.symmetry_multiplier > 1
                else "1",
            ),
            (
                "Mesh",
                f"{section.mesh.p.shape[1]} nodes, {section.mesh.t.shape[1]} triangles, "
                f"element order {model.element_order}",
            ),
            ("Initial temperature", _initial(model.initial_temperature)),
            ("Simulated time", duration(end)),
            ("Target", f"{a.target:g} °C" if a.target is not None else "none"),
            ("Judged quantity", a.verdict.subject),
            ("Tolerance", f"{100 * a.verdict.tolerance:.3g} %"),
        )
    )
    materials = Table(
        ("region", "area", "material", "conductivity", "density", "specific heat", "source"),
        tuple(
            (
                region,
                f"{facts.region_areas[region] * 1e6:.5g} mm²",
                material.name,
                _property(material.conductivity, "W/(m·K)"),
                _property(material.density, "kg/m³"),
                _property(material.specific_heat, "J/(kg·K)"),
                material.source or "—",
            )
            for region, material in sorted(model.materials.items())
        ),
        caption="Materials by region",
    )
    edges = Table(
        ("edge group", "length", "surface", "exchanges heat", "condition"),
        tuple(
            (
                name,
                _mm(facts.edge_lengths[name]),
                f"{facts.surface_areas[name]:.4g} m²{per_depth}",
                "yes" if name in exchange else "no",
                "; ".join(condition_text(c, end) for c in conditions),
            )
            for name, conditions in sorted(model.boundaries.items())
        ),
        caption="Boundary conditions by edge group",
    )
    blocks: list[Block] = [general, materials, edges]
    if model.heat_sources:
        blocks.append(
            Table(
                ("region", "heat generated"),
                tuple(
                    (region, schedule_text(q, "W/m³", end))
                    for region, q in sorted(model.heat_sources.items())
                ),
                caption="Heat sources",
            )
        )
    if model.probes:
        blocks.append(
            Table(
                ("probe", "position", "final temperature"),
                tuple(
                    (
                        name,
                        f"({_mm(x)}, {_mm(y)})",
                        f"{float(solution.probes[name][-1]):.4g} °C",
                    )
                    for name, (x, y) in model.probes.items()
                ),
                caption="Probes",
            )
        )
    return Part(HEADINGS["inputs"], "inputs", tuple(blocks))


def _biot_part(a: Assessment) -> Part:
    rows = tuple(
        (
            b.name.replace("_", " "),
            f"{b.value:.3g}",
            f"{b.low:.3g} to {b.high:.3g}",
            _mm(b.length),
            f"{b.heat_transfer_coefficient:.4g} W/(m²·K)",
            b.explanation,
        )
        for b in a.biot
    )
    return Part(
        HEADINGS["biot"],
        "biot",
        (
            Paragraph(
                "Bi = h·L/k compares the resistance to conduction inside the part with the "
                "resistance to heat exchange at its surface; each length L answers a different "
                "question."
            ),
            Table(("length scale", "Bi", "over the run", "L", "mean h", "what it measures"), rows),
        ),
    )


def _errors_part(a: Assessment) -> Part:
    rows = tuple(
        (
            e.model,
            _what(e.quantity),
            f"{e.largest:.4g} K",
            f"{100 * e.fraction:.3g} %",
            duration(e.time),
            "runs ahead" if e.lumped_ahead else "lags behind",
        )
        for e in a.errors.values()
    )
    return Part(
        HEADINGS["errors"],
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


def _models_part(a: Assessment) -> Part:
    rows: list[tuple[str, str, str, str]] = []

    def add(model: str, parameters: dict) -> None:
        for key, value in parameters.items():
            words, unit = _parameter(key)
            rows.append((model, words, number(value, 5), unit))

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
    mode = a.mode
    rows += [
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
    blocks: list[Block] = [
        Paragraph(
            "Parameters of the lumped family for use in system models or hand checks. The "
            "corrected model scales h by 1/(1 + Bi/β); the fitted models are fitted to this "
            "run's field and hold for conditions like it."
        ),
        Table(("model", "parameter", "value", "unit"), tuple(rows)),
        Paragraph(f"How β was chosen: {a.correction_note}."),
    ]
    missing = []
    if a.fitted is None:
        missing.append("a single exponential (conditions change during the run)")
    if a.two_node is None:
        missing.append("a two-node model (the run does not allow a fit)")
    if missing:
        blocks.append(Paragraph("Not fitted: " + "; ".join(missing) + "."))
    return Part(HEADINGS["models"], "models", tuple(blocks))


def _checks_part(a: Assessment) -> Part:
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
                f"assembly {stats.assembly_seconds:.3g} s, factorisation "
                f"{stats.factorisation_seconds:.3g} s, stepping {stats.stepping_seconds:.3g} s",
            ),
        )
    )
    warnings = (
        Bullets(checks.warnings, lead="Failed checks:")
        if checks.warnings
        else Paragraph("Every check passed.")
    )
    return Part(HEADINGS["checks"], "checks", (facts, warnings))


def _stepping(stats) -> str:
    if stats.method == "exponential":
        return (
            f"exponential, {stats.steps} step(s) from breakpoint to breakpoint, exact in time "
            f"to an estimated {stats.error_estimate:.3g} K (Krylov basis of up to "
            f"{stats.krylov_dimension} vectors)"
        )
    return (
        f"{stats.method}, {'adaptive' if stats.adaptive else 'fixed'} step "
        f"{stats.smallest_step:.4g} to {stats.largest_step:.4g} s, {stats.steps} steps "
        f"({stats.rejected_steps} rejected, {stats.startup_steps} start-up)"
    )
