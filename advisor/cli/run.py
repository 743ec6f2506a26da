"""``soakwise run CASE``: solve a case file and write its results folder."""

from __future__ import annotations

import argparse
from pathlib import Path

from .common import (
    EXIT_OK,
    Interrupted,
    SolvePosition,
    log,
    progress_display,
    rearm_terminate,
    refuse_existing,
    report_run,
)

SUMMARY = "solve a case file and write its results folder"
DESCRIPTION = (
    "Read CASE (a TOML case file), check it, mesh and solve it, judge the lumped "
    "estimate and write the results folder."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    parser.add_argument(
        "--out",
        type=Path,
        metavar="DIR",
        help="results folder (default: the case file's name without .toml)",
    )
    parser.add_argument(
        "--force",
        action="store_true",
        help="replace the results folder (only one soakwise wrote, holding nothing else)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..casefile.case import load_case
    from ..folder_lock import results_lock
    from ..pipeline import run_case, write_results
    from ..results_folder import check_results_folder

    case = load_case(args.case)  # every check that needs no mesh, before anything is written
    out = results_folder(args.case, args.out)
    refuse_existing(out, args.force)
    check_results_folder(out, force=args.force, keep=(args.case,))
    position = SolvePosition(progress_display())
    try:
        with results_lock(out):  # held through the solve: a second run into out is refused
            log.info(f"Meshing and solving {case.title!r} ...")
            results = run_case(case, progress=position)
            position.solved = True
            rearm_terminate()
            check_results_folder(out, force=args.force, keep=(args.case,))
            files = write_results(results, out, force=args.force)
    except KeyboardInterrupt as stop:
        position.close()
        raise Interrupted(position.where()) from stop
    report_run(results.assessment, out, files)
    from ..analysis.error_estimate import estimate_lines
    from ..analysis.stages import ending_lines

    for line in ending_lines(results.assessment.ending, results.assessment.stages):
        log.info(line)
    for line in estimate_lines(results.assessment.error_estimate):
        log.info(line)
    return EXIT_OK


def results_folder(case_path: Path, out: Path | None) -> Path:
    """``out``, or the case file's name without .toml (never the case file itself)."""
    folder = out or case_path.with_suffix("")
    if folder.resolve() == case_path.resolve():
        folder = case_path.parent / f"{case_path.stem}-results"
    return folder
