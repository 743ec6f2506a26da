"""study.html: what a study concludes, as one self-contained page.

:func:`write_study_report` draws the plots of a study's :class:`StudyFindings`
(:mod:`advisor.studies.study_findings`, re-exported here with :func:`analyse_study`) and
writes the page with the run report's blocks and renderer
(:mod:`advisor.writers.report_content`, :mod:`advisor.writers.report_html`): images embedded
as base64, every piece of text escaped, the caution at the end. :func:`write_sweep_report`
does both for a finished study's folder.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..caution import CAUTION
from .study_findings import StudyFindings, analyse_study
from .uncertainty import DEFAULT_ANSWERS, varied_inputs
from .validity import DesignRule, quantity_text

__all__ = [
    "MAX_TABLE_ROWS",
    "STUDY_HEADINGS",
    "StudyFindings",
    "analyse_study",
    "build_study_report",
    "write_study_plots",
    "write_study_report",
    "write_sweep_report",
]

STUDY_HEADINGS = {
    "summary": "What the study found",
    "validity": "Where the lumped estimate holds",
    "spread": "How far the answers spread",
    "influence": "Which input matters most",
    "convergence": "Is the mesh fine enough?",
    "cases": "The cases",
    "caution": "Before relying on these figures",
}
MAX_TABLE_ROWS = 60


def _summary(findings: StudyFindings) -> list:
    from ..writers.report_document import Bullets, Facts

    facts = [("cases", str(findings.cases)), ("failed cases", str(findings.failed))]
    lines = [rule.text for rule in findings.rules]
    for s in findings.spreads:
        values = ", ".join(f"{100 * q:g} % {v:.4g}" for q, v in sorted(s.quantiles.items()))
        lines.append(f"{s.column}: {values} (mean {s.mean:.4g}, {s.count} cases)")
    for answer, found in findings.influences.items():
        if found:
            lines.append(
                f"{answer} depends most on {found[0].input} ({found[0].method} "
                f"{found[0].value:.2f})"
            )
    if findings.recommendation:
        lines.append(findings.recommendation)
    return [Facts(tuple(facts)), Bullets(tuple(lines) or ("No conclusions could be drawn.",))]


def _validity_blocks(findings: StudyFindings) -> list:
    from ..writers.report_document import Callout, Picture, Table

    vmap = findings.validity
    blocks = [
        Callout(f"{rule.model} lumped estimate", rule.text, _tone(rule)) for rule in findings.rules
    ]
    blocks.append(Picture("plots/validity_map.png", *_plot_words("validity_map")))
    rows = tuple(
        (quantity_text(vmap.variable, float(x)),)
        + tuple(f"{100 * vmap.errors[m][k]:.3g} % ({vmap.ratings[m][k]})" for m in vmap.errors)
        for k, x in enumerate(vmap.values[:MAX_TABLE_ROWS])
    )
    blocks.append(
        Table(("input", *(f"{m} error" for m in vmap.errors)), rows, "Largest error per case")
    )
    return blocks


def _tone(rule: DesignRule) -> str:
    return {"everywhere": "adequate", "nowhere": "inadequate"}.get(rule.status, "marginal")


def _plot_words(stem: str) -> tuple[str, str]:
    from .study_plots import STUDY_PLOTS

    return STUDY_PLOTS[stem]


def _spread_blocks(findings: StudyFindings) -> list:
    from ..writers.report_document import Picture, Table

    rows = tuple(
        (
            s.column,
            f"{s.mean:.4g}",
            f"{s.standard_deviation:.3g}",
            *(
                f"{s.quantiles[q]:.4g} [{s.intervals[q][0]:.4g}, {s.intervals[q][1]:.4g}]"
                for q in sorted(s.quantiles)
            ),
        )
        for s in findings.spreads
    )
    levels = sorted(findings.spreads[0].quantiles)
    columns = (
        "answer",
        "mean",
        "standard deviation",
        *(f"{100 * q:g} % [interval]" for q in levels),
    )
    return [
        Picture("plots/spread.png", *_plot_words("spread")),
        Table(
            columns,
            rows,
            f"Values with {100 * findings.spreads[0].confidence:g} % bootstrap intervals",
        ),
    ]


def _influence_blocks(findings: StudyFindings) -> list:
    from ..writers.report_document import Picture, Table

    rows = tuple(
        (
            answer,
            i.input,
            i.method,
            f"{i.value:.3f}",
            "" if i.p_value is None else f"{i.p_value:.2g}",
        )
        for answer, found in findings.influences.items()
        for i in found
    )
    return [
        Picture("plots/influence.png", *_plot_words("influence")),
        Table(("answer", "input", "measure", "value", "p-value"), rows),
    ]


def _convergence_blocks(findings: StudyFindings) -> list:
    from ..writers.report_document import Paragraph, Picture, Table

    rows = tuple(
        (
            answer,
            f"{g.order:.3g}",
            f"{g.extrapolated:.5g}",
            f"{100 * g.approximate_error:.3g} %",
            f"{100 * g.gci_fine:.3g} %",
            g.behaviour,
        )
        for answer, g in findings.convergence.items()
    )
    columns = (
        "answer",
        "observed order",
        "extrapolated",
        "change from the next grid",
        "GCI",
        "behaviour",
    )
    blocks = [
        Picture("plots/convergence.png", *_plot_words("convergence")),
        Table(columns, rows, "Finest three grids (Celik et al. 2008)"),
    ]
    if findings.recommendation:
        blocks.append(Paragraph(findings.recommendation))
    return blocks


def _cases_table(table, status: str | None) -> list:
    from ..writers.report_document import Paragraph, Table

    shown = table.head(MAX_TABLE_ROWS)
    columns = tuple(str(c) for c in shown.columns)
    rows = tuple(tuple(_cell(v) for v in row) for row in shown.itertuples(index=False))
    blocks = [Table(columns, rows)]
    if len(table) > MAX_TABLE_ROWS:
        blocks.append(
            Paragraph(
                f"The first {MAX_TABLE_ROWS} of {len(table)} cases; all are in the study's table."
            )
        )
    return blocks


def _cell(value) -> str:
    if isinstance(value, float | np.floating):
        return "" if not np.isfinite(value) else f"{value:.4g}"
    return str(value)


def write_study_plots(findings: StudyFindings, folder: Path) -> list[Path]:
    """Draw the plots the findings call for into ``folder/plots``; return their paths."""
    from . import study_plots

    plots = Path(folder) / "plots"
    paths = []
    if findings.validity is not None:
        figure = study_plots.validity_figure(findings.validity, findings.rules)
        paths += study_plots.write_study_plot(figure, plots, "validity_map")
    if findings.spreads:
        paths += study_plots.write_study_plot(
            study_plots.spread_figure(findings.spreads), plots, "spread"
        )
    if any(findings.influences.values()):
        figure = study_plots.influence_figure(findings.influences)
        paths += study_plots.write_study_plot(figure, plots, "influence")
    if findings.convergence:
        figure = study_plots.convergence_figure(findings.convergence, findings.grids)
        paths += study_plots.write_study_plot(figure, plots, "convergence")
    return paths


def build_study_report(findings: StudyFindings, table=None, status: str | None = "status"):
    """The report's content (:class:`advisor.writers.report_content.Report`)."""
    from ..writers.report_document import Callout, Part, Report

    parts = [Part(STUDY_HEADINGS["summary"], "summary", tuple(_summary(findings)))]
    if findings.validity is not None:
        parts.append(
            Part(STUDY_HEADINGS["validity"], "validity", tuple(_validity_blocks(findings)))
        )
    if findings.spreads:
        parts.append(Part(STUDY_HEADINGS["spread"], "spread", tuple(_spread_blocks(findings))))
    if any(findings.influences.values()):
        parts.append(
            Part(STUDY_HEADINGS["influence"], "influence", tuple(_influence_blocks(findings)))
        )
    if findings.convergence:
        parts.append(
            Part(
                STUDY_HEADINGS["convergence"], "convergence", tuple(_convergence_blocks(findings))
            )
        )
    if table is not None and len(table):
        parts.append(Part(STUDY_HEADINGS["cases"], "cases", tuple(_cases_table(table, status))))
    parts.append(
        Part(STUDY_HEADINGS["caution"], "caution", (Callout("Caution", CAUTION, "caution"),))
    )
    lede = f"{findings.cases} cases, {findings.failed} failed."
    return Report(findings.title, lede, tuple(parts))


def write_study_report(findings: StudyFindings, folder: Path, table=None) -> list[Path]:
    """Write the plots and ``study.html`` into ``folder``; return the paths written.

    Parameters
    ----------
    findings : StudyFindings
        From :func:`analyse_study` (or built by the convergence command).
    folder : path
        The study's folder; created if missing.
    table : pandas.DataFrame, optional
        The cases, shown in a table (the first rows).
    """
    from ..writers.report_html import write_html_report

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    paths = write_study_plots(findings, folder)
    page = folder / "study.html"
    write_html_report(build_study_report(findings, table), page, folder)
    return [*paths, page]


def write_sweep_report(folder: Path, planned, *, sensitivity: str = "rank") -> list[Path]:
    """Analyse a finished study in ``folder`` (its store, through
    :func:`advisor.studies.read_study`) and write its plots and ``study.html``.

    The validity map runs against the one varied input, or against the Biot number on V/A_s
    when several are varied; errors are those of the quantity the case's advisor judges
    (the slowest point or the mean), against the case's tolerance.
    """
    from .tables import read_study

    table = read_study(folder)
    first = planned.cases[0]
    options = first.advisor_options
    judged = "mean" if options.get("quantity") == "mean" else "slowest"
    errors = {model: f"error_{model}_{judged}" for model in ("classical", "corrected")}
    sampled = any(v.distribution is not None for v in planned.spec.variations)
    varied = varied_inputs(table, (*DEFAULT_ANSWERS, *errors.values()))
    variable = None if sampled else varied[0] if len(varied) == 1 else "biot_volume_to_surface"
    findings = analyse_study(
        table,
        title=f"Study of {first.title}",
        variable=variable,
        tolerance=options.get("tolerance", 0.05),
        errors=errors,
        sampled=sampled,
        sensitivity=sensitivity,
    )
    return write_study_report(findings, folder, table)
