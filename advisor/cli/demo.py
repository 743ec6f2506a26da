"""``soakwise demo``: run the built-in example into a results folder."""

from __future__ import annotations

import argparse
from pathlib import Path

from .common import EXIT_OK, Interrupted, log, rearm_terminate, refuse_existing, report_run

DEFAULT_FOLDER = "soakwise-demo"
SUMMARY = "run the built-in example (a steel bar quenched in oil) into a results folder"
DESCRIPTION = (
    "Run the built-in example, a 60 mm x 40 mm steel bar quenched from 850 degC "
    "in 60 degC oil, and write its results folder."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--out",
        type=Path,
        default=Path(DEFAULT_FOLDER),
        metavar="DIR",
        help=f"results folder to write (default: ./{DEFAULT_FOLDER})",
    )
    parser.add_argument(
        "--force",
        action="store_true",
        help="replace the results folder (only one soakwise wrote, holding nothing else)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..demo import run_demo
    from ..folder_lock import results_lock
    from ..pipeline import write_results
    from ..results_folder import check_results_folder
    from ..writers.side_by_side import load_plotting, warm_writer

    refuse_existing(args.out, args.force)
    check_results_folder(args.out, force=args.force)  # fail before the solve, not after
    try:  # matplotlib and the fonts load on the other core during the solve
        with results_lock(args.out), warm_writer(load_plotting):
            log.info("Solving the demonstration: steel bar 60 mm x 40 mm quenched in oil ...")
            results = run_demo()
            rearm_terminate()  # meshing reset SIGTERM
            files = write_results(results, args.out, force=args.force)
    except KeyboardInterrupt as stop:
        raise Interrupted() from stop
    report_run(results.assessment, args.out, files)
    return EXIT_OK
