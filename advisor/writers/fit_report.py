"""fit.html: the fit's report, in the page style of the run report (one self-contained page,
every piece of text escaped), with headings of its own."""

from __future__ import annotations

from pathlib import Path

from ..caution import CAUTION
from .report_document import (
    Bullets,
    Callout,
    Facts,
    Listing,
    Paragraph,
    Part,
    Picture,
    Report,
    Table,
)
from .report_html import write_html_report

FIT_HEADINGS = {
    "verdict": "Can the readings fix what was asked?",
    "values": "Fitted values and their uncertainty",
    "curves": "Readings, fit and residuals",
    "lumped": "What a lumped fit of each curve would have read",
    "correlation": "How the fitted values trade off",
    "method": "How the fit was made",
    "fragment": "The fitted coefficients for a case file",
    "files": "Files in this folder",
    "caution": "Before relying on these figures",
}
TONE = {"identified": "adequate", "weakly identified": "marginal", "not identified": "inadequate"}


def _part(anchor: str, blocks: list) -> Part:
    return Part(FIT_HEADINGS[anchor], anchor, tuple(blocks))


def build_fit_report(outcome, pictures: list[Picture], files: list[str]) -> Report:
    """The report's document for ``outcome`` (a :class:`advisor.fitting.session.FitOutcome`)."""
    result = outcome.result
    parts = [
        _part("verdict", _verdict(outcome)),
        _part("values", _values(result)),
        _part("curves", [p for p in pictures if p.path != "plots/fit-coefficient.png"]),
    ]
    coefficient = [p for p in pictures if p.path == "plots/fit-coefficient.png"]
    if coefficient:
        parts[-1] = _part("curves", [*parts[-1].blocks, *coefficient])
    parts.append(_part("lumped", _lumped(outcome)))
    if len(result.names) > 1:
        parts.append(_part("correlation", _correlation(result)))
    parts += [
        _part("method", _method(outcome)),
        _part("fragment", _fragment(outcome)),
        _part("files", [Bullets(tuple(files))]),
        _part("caution", _caution()),
    ]
    lede = (
        f"Boundary coefficients fitted to {outcome.measured.path.name} "
        f"({len(outcome.measured.times)} times, thermocouples "
        f"{', '.join(outcome.measured.probes)}) on the case's own section, with the hand "
        "method's lumped reading of each curve beside them."
    )
    return Report(f"Fit: {outcome.title}" if outcome.title else "Fit", lede, tuple(parts))


def _verdict(outcome) -> list:
    result = outcome.result
    rating = result.verdict.rating
    noise = (
        f"the stated uncertainty {result.uncertainty:.3g} K"
        if result.uncertainty
        else "no stated uncertainty (give --uncertainty to compare)"
    )
    blocks = [
        Callout(rating.capitalize(), _sentence("; ".join(result.verdict.reasons)), TONE[rating]),
        Paragraph(
            f"Root-mean-square residual {result.rms_residual:.3g} K against {noise}. "
            + _residual_words(result)
        ),
    ]
    blocks += [Paragraph(f"Beside the field fit, {r.sentence()}.") for r in outcome.lumped[:4]]
    return blocks


def _sentence(text: str) -> str:
    return text[:1].upper() + text[1:] + ("" if text.endswith(".") else ".")


def _residual_words(result) -> str:
    if not result.uncertainty:
        return ""
    ratio = result.rms_residual / result.uncertainty
    if ratio > 1.5:
        return (
            "The residuals are larger than the thermocouples' scatter: the model misses "
            "something the readings hold (a coefficient that changes, radiation, a "
            "thermocouple's position or lag); see the residual plot for a pattern."
        )
    if ratio < 0.67:
        return (
            "The residuals are smaller than the stated scatter: the uncertainty stated may be "
            "generous."
        )
    return "The residuals are of the size of the thermocouples' scatter."


def _values(result) -> list:
    from ..fitting.fragment import decimals

    rows = tuple(
        (
            name,
            f"{value:.{decimals(error)}f}",
            f"{error:.2g}",
            f"{low:.{decimals(error)}f} to {high:.{decimals(error)}f}",
            unit or "—",
        )
        for name, value, error, (low, high), unit in zip(
            result.names,
            result.values,
            result.standard_errors,
            result.band,
            result.units,
            strict=True,
        )
    )
    return [
        Table(("parameter", "value", "standard error", "95 % interval", "unit"), rows),
        Paragraph(
            "Standard errors come from the sensitivities at the fitted values and the residual "
            f"scatter s = {result.scatter:.3g} K over {result.degrees_of_freedom:.4g} degrees of "
            "freedom; the interval is ± t(0.975) standard errors."
        ),
    ]


def _lumped(outcome) -> list:
    rows = tuple(
        (
            r.probe,
            f"{r.time_constant:.4g}",
            f"{r.coefficient:.4g}",
            f"{r.field_coefficient:.4g}",
            f"{100 * r.bias:+.1f} %",
            f"{r.biot:.3g}",
            f"{r.rms_residual:.3g}",
        )
        for r in outcome.lumped
    )
    columns = (
        "thermocouple",
        "τ [s]",
        "lumped h [W/(m²·K)]",
        "field h [W/(m²·K)]",
        "bias",
        "Biot number (V/A)",
        "RMS of the exponential [K]",
    )
    missing = [p for p in outcome.measured.probes if p not in {r.probe for r in outcome.lumped}]
    note = (
        [
            Paragraph(
                f"No exponential could be fitted to {', '.join(missing)}: the curve does not "
                "approach the fluid's temperature."
            )
        ]
        if missing
        else []
    )
    return note + [
        Paragraph(
            "The hand method fits T = T∞ + (T₁ − T∞)·exp(−t/τ) to each curve and reads "
            "h = ρcV/(Aτ). At any point the curve decays at the slowest mode's rate, which is "
            "slower than the lumped rate hA/(ρcV) when the Biot number is not small: the lumped "
            "reading is low. "
            "The field h is the fitted coefficient (linearised where it depends on temperature) "
            "averaged over the surfaces and the readings' span."
        ),
        Table(columns, rows),
    ]


def _correlation(result) -> list:
    names = result.names
    short = tuple(f"p{i + 1}" for i in range(len(names)))
    rows = tuple(
        (f"{short[i]}: {names[i]}", *(f"{c:+.2f}" for c in result.correlation[i]))
        for i in range(len(names))
    )
    return [
        Table(("", *short), rows),
        Paragraph(
            "Values near ±1 mean the readings fix a combination of two parameters rather than "
            "each one; neighbouring nodes of a smoothed table are expected to be correlated."
        ),
    ]


def _method(outcome) -> list:
    result, measured = outcome.result, outcome.measured
    stats = outcome.solution.stats
    mapping = "; ".join(f"column {measured.columns[p]!r} → probe {p!r}" for p in measured.probes)
    pairs = [
        (
            "estimator",
            "least squares (scipy.optimize.least_squares, trust-region reflective, "
            "within bounds), sensitivities by finite differences on one assembled system",
        ),
        ("regularisation", result.regularisation_rule),
        ("measured file", f"{measured.path.name}: {mapping}"),
        ("readings", f"{measured.count} ({len(measured.times)} times)"),
        ("transient solves", f"{result.trials}"),
        ("time of the fit", f"{result.seconds:.3g} s"),
        ("condition number (scaled)", f"{result.condition_number:.3g}"),
        ("unknowns, steps per solve", f"{stats.unknowns}, {stats.steps} ({stats.method})"),
    ]
    if result.regularisation:
        pairs.insert(2, ("λ", f"{result.regularisation:.3g} K²"))
    sensitivity = "; ".join(
        f"{n}: {s:.3g} K" for n, s in zip(result.names, result.sensitivities, strict=True)
    )
    pairs.append(("largest change of a reading for +10 % of each value", sensitivity))
    return [Facts(tuple(pairs))]


def _fragment(outcome) -> list:
    blocks = [
        Paragraph(
            "fitted.toml holds the fitted edge groups' tables in the case format; "
            + (
                "fitted-case.toml is the whole case with them in place: soakwise run "
                "fitted-case.toml runs it."
                if outcome.fitted_case
                else f"the whole case could not be written with them ({outcome.note})."
            )
        ),
    ]
    blocks.append(Listing(outcome.fragment, "fitted.toml:"))
    return blocks


def _caution() -> list:
    return [
        Callout("Caution", CAUTION, "caution"),
        Paragraph(
            "A fitted coefficient carries whatever the model leaves out: the thermocouples' "
            "positions and lag, contact and heat lost along the wires, radiation when it is "
            "not modelled, and properties that differ from the case's. Its band covers only "
            "the readings' scatter. Use it for parts and conditions like the trial's."
        ),
    ]


def write_fit_report(outcome, path: Path, pictures: list[Picture], files: list[str]) -> None:
    """Write fit.html to ``path``, pictures read relative to its folder."""
    write_html_report(build_fit_report(outcome, pictures, files), Path(path))
