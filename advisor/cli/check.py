"""``soakwise check CASE``: judge the lumped estimate of a case without solving the field."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..caution import CAUTION
from ..time_words import duration_text
from .common import EXIT_OK, biot_lines, log

SUMMARY = "judge the lumped estimate of a case without solving the field"
DESCRIPTION = (
    "Read CASE and report Biot numbers, the lumped and corrected times to "
    "target, the slowest mode and the expected direction of the lumped "
    "error, on the case's mesh, without time stepping."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")


def execute(args: argparse.Namespace) -> int:
    from ..analysis.quick import quick_check
    from ..casefile.case import load_case
    from ..field_results import no_lumped_reason

    case = load_case(args.case)
    options = case.advisor_options
    model = case.model()
    reason = no_lumped_reason(model)
    if reason is not None:  # fixed temperatures or fluxes only: nothing to judge
        log.info(f"No lumped model applies: {reason}; `soakwise run` gives the field.")
        log.info(f"Caution: {CAUTION}")
        return EXIT_OK
    check = quick_check(
        model,
        target=options.get("target"),
        process=options.get("process"),
        end_time=case.end_time,
    )
    for line in biot_lines(check.biot):
        log.info(line)
    for reason in check.assumptions_broken:  # before the figures they qualify
        log.warning(f"The modal estimate does not hold here: {reason}.")
    mode = check.mode
    log.info(
        f"Slowest-mode ratio: {mode.ratio:.3g} (a lumped model would need h = "
        f"{mode.equivalent_coefficient:.4g} W/(m²·K))"
    )
    log.info(
        f"Lumped time constant: classical {duration_text(check.lumped.time_constant)}, "
        f"corrected {duration_text(check.corrected.time_constant)}"
    )
    for name, value in check.time_to_target.items():
        shown = "not reached" if value is None else duration_text(value)
        if "modal" in name and check.assumptions_broken and value is not None:
            shown += " (not to be relied on: see above; `soakwise run` gives the field)"
        log.info(f"Time to {check.target:g} °C, {name}: {shown}")
    log.info(f"Expected direction: {check.expected_direction}.")
    log.info(f"Caution: {CAUTION}")
    return EXIT_OK
