"""What the report says, built once from an Assessment and rendered twice (HTML and Markdown).

The document model is :mod:`.report_document`; the parts come from :mod:`.report_inputs`
(what was modelled) and :mod:`.report_results` (what the run found), in the words of
:mod:`.report_words`. This module puts them in order.
"""

from __future__ import annotations

from collections.abc import Sequence

from ..analysis.assessment import Assessment
from ..analysis.surface_band import curve_conditions
from ..caution import CAUTION
from ..time_words import duration_text
from .plot_list import PROCESS_PLOT_TITLES
from .report_document import HEADINGS, Bullets, Callout, Paragraph, Picture, Report, part
from .report_inputs import inputs_part
from .report_process import curves_part, freezing_part, quench_part
from .report_results import (
    biot_part,
    checks_part,
    errors_part,
    models_part,
    target_part,
    verdict_part,
)
from .report_words import condition_text, file_summary

# HEADINGS, Picture and condition_text are also read from here by the results folder and tests.
__all__ = ["HEADINGS", "Picture", "Report", "build_report", "condition_text"]


def build_report(
    assessment: Assessment,
    pictures: Sequence[Picture] = (),
    files: Sequence[str] = (),
) -> Report:
    """The report's content for ``assessment``, with ``pictures`` under the histories and
    ``files`` (paths relative to the results folder) listed at the end."""
    histories = tuple(pictures) if pictures else (Paragraph("No plots were written."),)
    parts = [verdict_part(assessment), target_part(assessment)]
    if assessment.quench is not None:
        parts.append(quench_part(assessment, _process_picture("cooling_rates", files)))
    if assessment.freezing is not None:
        parts.append(freezing_part(assessment))
    if curve_conditions(assessment.solution.model):
        parts.append(curves_part(assessment, _process_picture("surface_curves", files)))
    parts += [
        part("histories", histories),
        inputs_part(assessment),
        biot_part(assessment),
        errors_part(assessment),
        models_part(assessment),
        checks_part(assessment),
    ]
    if files:
        parts.append(part("files", (Bullets(tuple(file_summary(files))),)))
    parts.append(part("caution", (Callout("Caution", CAUTION, "caution"),)))
    heating = assessment.heating
    return Report(
        title=f"soakwise: how the section {'heats up' if heating else 'cools down'}",
        lede=_lede(assessment),
        parts=tuple(parts),
    )


def _process_picture(stem: str, files: Sequence[str]) -> Picture | None:
    """The process plot ``stem`` (:data:`.plot_list.PROCESS_PLOT_TITLES`) as a picture, when
    its PNG is among ``files``."""
    title, caption = PROCESS_PLOT_TITLES[stem]
    for name in files:
        if name == f"{stem}.png" or name.endswith(f"/{stem}.png"):
            return Picture(name, title, caption)
    return None


def _lede(assessment: Assessment) -> str:
    """One sentence on where the section goes, over how long, and what the verdict judges."""
    lumped = assessment.lumped
    end = float(assessment.solution.times[-1])
    verdict = assessment.verdict
    target = (
        f"; target {assessment.target:g} °C" if assessment.target is not None else "; no target"
    )
    return (
        f"The section {'heats' if assessment.heating else 'cools'} from "
        f"{lumped.initial_temperature:.4g} °C towards {lumped.equilibrium:.4g} °C over "
        f"{duration_text(end)}{target}. The verdict is about {verdict.subject}, with a "
        f"tolerance of {100 * verdict.tolerance:.3g} %."
    )
