"""The ``soakwise`` command line. The only module that talks to the terminal.

Exit status: 0 success, 1 the run failed, 2 bad command line or input.
"""

from __future__ import annotations

import argparse
import logging
import sys
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

from fem import ModelError
from geometries import GeometryError

from .caution import CAUTION
from .errors import AdvisorError

EXIT_OK, EXIT_FAILED, EXIT_USAGE = 0, 1, 2
DEFAULT_DEMO_FOLDER = "soakwise-demo"

log = logging.getLogger("soakwise")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="soakwise",
        description="Warm-up and cool-down of solid sections: a 2-D transient field checked "
        "against the lumped estimate.",
        epilog=f"Caution: {CAUTION}\n\nExit status: 0 done, 1 the run failed, 2 bad input.",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"soakwise {_version()}")
    loudness = parser.add_mutually_exclusive_group()
    loudness.add_argument("-q", "--quiet", action="store_true", help="print errors only")
    loudness.add_argument("-v", "--verbose", action="store_true", help="print solver details")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    demo = commands.add_parser(
        "demo",
        help="run the built-in example (a steel bar quenched in oil) into a results folder",
        description="Run the built-in example, a 60 mm x 40 mm steel bar quenched from "
        "850 degC in 60 degC oil, and write its results folder.",
        epilog=f"Caution: {CAUTION}",
    )
    demo.add_argument(
        "--out",
        type=Path,
        default=Path(DEFAULT_DEMO_FOLDER),
        metavar="DIR",
        help=f"results folder to write (default: ./{DEFAULT_DEMO_FOLDER})",
    )
    demo.add_argument(
        "--force", action="store_true", help="replace the results folder if it exists"
    )
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    _configure_logging(
        logging.ERROR if args.quiet else logging.DEBUG if args.verbose else logging.INFO
    )
    if args.command is None:
        parser.print_help()
        return EXIT_USAGE
    try:
        return _demo(args)
    except (AdvisorError, ModelError, GeometryError) as error:
        print(f"soakwise: error: {error}", file=sys.stderr)
        return EXIT_USAGE
    except (OSError, RuntimeError, ArithmeticError) as error:
        print(f"soakwise: the run failed: {error}", file=sys.stderr)
        return EXIT_FAILED


def _demo(args: argparse.Namespace) -> int:
    from .demo import run_demo
    from .results import check_results_folder, write_results

    check_results_folder(args.out, force=args.force)  # fail before the solve, not after
    log.info("Solving the demonstration: steel bar 60 mm x 40 mm quenched in oil ...")
    assessment = run_demo()
    files = write_results(assessment, args.out, force=args.force)
    _report(assessment, args.out, files)
    return EXIT_OK


def _report(assessment, folder: Path, files: list[Path]) -> None:
    solution = assessment.solution
    stats = solution.stats
    log.debug(
        f"{stats.unknowns} unknowns, {stats.steps} steps of {stats.time_step:g} s, "
        f"{stats.factorisations} factorisation, stepping {stats.stepping_seconds:.2f} s"
    )
    for bi in assessment.biot:
        log.info(f"Biot number ({bi.name}, L = {1000 * bi.length:.3g} mm): {bi.value:.3g}")
    log.info(
        f"Peak internal temperature difference: {assessment.peak_internal_difference:.3g} K "
        f"at {assessment.peak_internal_difference_time:.4g} s"
    )
    verdict = assessment.verdict
    log.info(f"Classical lumped estimate {verdict.rating.upper()} for {verdict.subject}:")
    for reason in verdict.reasons:
        log.info(f"  - {reason}")
    log.info(f"Direction: {verdict.direction}.")
    log.info(f"Advice: {verdict.advice}")
    for warning in solution.checks.warnings:
        log.warning(f"check: {warning}")
    log.info(f"Wrote {len(files)} files to {folder}/ (summary.json, histories.png, fields/)")
    log.info(f"Caution: {CAUTION}")


def _configure_logging(level: int) -> None:
    """Our messages to stderr at ``level``; other libraries' chatter only when verbose."""
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(message)s"))
    log.handlers[:] = [handler]
    log.setLevel(level)
    log.propagate = False
    logging.getLogger().setLevel(logging.WARNING if level > logging.DEBUG else logging.INFO)


def _version() -> str:
    try:
        return version("soakwise")
    except PackageNotFoundError:
        return "unknown"


if __name__ == "__main__":
    sys.exit(main())
