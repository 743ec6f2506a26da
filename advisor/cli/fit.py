"""``soakwise fit CASE --measured FILE``: fit boundary coefficients to measured curves and
write a fit folder."""

from __future__ import annotations

import argparse
import logging
import sys
from pathlib import Path

from ..errors import AdvisorError
from ..time_words import duration_text
from .common import EXIT_OK, Interrupted, log, rearm_terminate

SUMMARY = "fit heat-transfer coefficients (or an emissivity) to measured temperature curves"
DESCRIPTION = (
    "Read CASE and a measured file of thermocouple readings (time and one column per probe), "
    "fit the requested coefficients on the case's own section by least squares, and write "
    "fit.json, fit.html, residuals.csv, plots and fitted.toml (the fitted boundary tables, "
    "which soakwise run takes) with the lumped hand method's reading of each curve beside "
    "the field fit."
)
FIT_FORMS = (
    "what to fit: h:GROUP (one constant coefficient), h(t):GROUP:nodes=N (against time), "
    "h(T):GROUP:nodes=N (against surface temperature) or emissivity:GROUP; repeat for "
    "several (default: h on every group with convection)"
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    parser.add_argument(
        "--measured",
        type=Path,
        metavar="FILE",
        required=True,
        help="CSV or whitespace table: a 'time' column and one column per thermocouple, "
        "named as the case's probes, units in the header ('core [degC]') or with --units",
    )
    parser.add_argument("--fit", action="append", metavar="WHAT", default=[], help=FIT_FORMS)
    parser.add_argument(
        "--out", type=Path, metavar="DIR", help="fit folder (default: CASE's name + '-fit')"
    )
    parser.add_argument(
        "--units",
        action="append",
        metavar="COLUMN=UNIT",
        default=[],
        help="unit of a column whose header gives none, e.g. time=min or core=degC",
    )
    parser.add_argument(
        "--map",
        action="append",
        metavar="COLUMN=PROBE",
        default=[],
        help="tie a column to a probe of the case, or to a point: 'tc3=0 mm, 18 mm'",
    )
    parser.add_argument(
        "--uncertainty",
        type=float,
        metavar="K",
        help="the thermocouples' random error (one standard deviation, K); needed for h(t) "
        "and h(T), which it regularises by the discrepancy principle",
    )
    parser.add_argument(
        "--force",
        action="store_true",
        help="replace the fit folder (only one soakwise wrote, holding nothing else)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..casefile.case import load_case
    from ..fitting.session import fit_case, prepare
    from ..folder_lock import results_lock
    from ..results_folder import check_results_folder
    from ..writers.fit_files import write_fit_folder

    case = load_case(args.case)
    requests = args.fit or _default_requests(case)
    parsed, measured = prepare(
        case,
        args.measured,
        requests,
        units=_pairs(args.units, "--units", "COLUMN=UNIT, e.g. time=min"),
        mapping=_pairs(args.map, "--map", "COLUMN=PROBE, or COLUMN=X, Y with units"),
        uncertainty=args.uncertainty,
    )
    out = args.out or args.case.parent / f"{args.case.stem}-fit"
    keep = (args.case, args.measured)
    check_results_folder(out, force=args.force, keep=keep)
    progress = None
    try:
        with results_lock(out):
            log.info(f"Fitting {', '.join(requests)} to {measured.path.name} ...")
            progress = _progress()  # after the message, so the line has its own row
            outcome = fit_case(
                case, parsed, measured, uncertainty=args.uncertainty, progress=progress
            )
            _close(progress)
            rearm_terminate()
            check_results_folder(out, force=args.force, keep=keep)
            files = write_fit_folder(outcome, out, force=args.force)
    except KeyboardInterrupt as stop:
        _close(progress)
        raise Interrupted(" while fitting") from stop
    _report(outcome, out, files)
    return EXIT_OK


def _default_requests(case) -> list[str]:
    from fem import Convection, SurfaceTemperatureConvection

    kinds = (Convection, SurfaceTemperatureConvection)
    groups = [
        group
        for group, conditions in case.boundaries.items()
        if any(isinstance(c, kinds) for c in conditions)
    ]
    if not groups:
        raise AdvisorError(
            "the case has no edge group with convection to fit: give --fit (" + FIT_FORMS + ")",
            argument="fit",
        )
    return [f"h:{group}" for group in groups]


def _pairs(items: list[str], option: str, form: str) -> dict[str, str]:
    pairs = {}
    for item in items:
        name, equals, value = item.partition("=")
        if not equals or not name.strip() or not value.strip():
            raise AdvisorError(f"{option} {item!r}: write {form}", argument=option)
        pairs[name.strip()] = value.strip()
    return pairs


def _progress():
    """A line counting the transient solves when messages go to a terminal."""
    if not (log.isEnabledFor(logging.INFO) and sys.stderr.isatty()):
        return None
    try:
        from tqdm import tqdm
    except ImportError:
        return None
    bar = tqdm(desc="fitting", unit=" solves", file=sys.stderr, leave=True, mininterval=0.2)

    def progress(trials: int) -> None:
        bar.update(trials - bar.n)

    progress.bar = bar
    return progress


def _close(progress) -> None:
    if progress is not None:
        progress.bar.close()


def _report(outcome, out: Path, files) -> None:
    from ..caution import CAUTION

    result = outcome.result
    from ..fitting.fragment import with_interval

    rows = zip(
        result.names, result.values, result.band, result.units, result.standard_errors, strict=True
    )
    for name, value, (low, high), unit, error in rows:
        log.info(with_interval(name, value, low, high, unit, error))
    stated = f" (stated uncertainty {result.uncertainty:.3g} K)" if result.uncertainty else ""
    log.info(f"RMS residual {result.rms_residual:.3g} K{stated}")
    log.info(f"The readings: {result.verdict.rating}.")
    for reason in result.verdict.reasons:
        log.info(f"  - {reason}")
    for reading in outcome.lumped:
        log.info(f"Lumped hand method: {reading.sentence()}.")
    log.info(
        f"{result.trials} transient solves in {duration_text(result.seconds)}. Wrote "
        f"{len(files)} files to {out}/: open fit.html; fitted.toml holds the fitted boundary "
        "tables"
    )
    log.info(f"Caution: {CAUTION}")
