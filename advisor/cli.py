"""The ``soakwise`` command line. The only module that talks to the terminal.

Commands: ``run`` a case into a results folder, ``check`` a case without the field solve,
``demo``, ``new`` (write a starting case for a scenario), ``materials`` (the library) and
``show`` (a results folder's summary).

Exit status: 0 done, 1 the run failed, 2 bad command line or input (nothing written).
"""

from __future__ import annotations

import argparse
import json
import logging
import sys
import warnings
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

from fem import ModelError, SolverError
from geometries import GeometryError

from .caution import CAUTION
from .errors import AdvisorError

EXIT_OK, EXIT_FAILED, EXIT_USAGE = 0, 1, 2
DEFAULT_DEMO_FOLDER = "soakwise-demo"
EPILOG = (
    f"Caution: {CAUTION}\n\nExit status: 0 done, 1 the run failed, 2 bad command line "
    "or input (nothing is written)."
)

log = logging.getLogger("soakwise")


def build_parser() -> argparse.ArgumentParser:
    from .casefile.starters import SCENARIOS

    parser = argparse.ArgumentParser(
        prog="soakwise",
        description="Warm-up and cool-down of solid sections: a 2-D transient field checked "
        "against the lumped estimate.",
        epilog=EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"soakwise {_version()}")
    loudness = parser.add_mutually_exclusive_group()
    loudness.add_argument("-q", "--quiet", action="store_true", help="print errors only")
    loudness.add_argument("-v", "--verbose", action="store_true", help="print solver details")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    def command(name, summary, description):
        return commands.add_parser(
            name,
            help=summary,
            description=description,
            epilog=EPILOG,
            formatter_class=argparse.RawDescriptionHelpFormatter,
        )

    run = command(
        "run",
        "solve a case file and write its results folder",
        "Read CASE (a TOML case file), check it, mesh and solve it, judge the lumped "
        "estimate and write the results folder.",
    )
    run.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    run.add_argument(
        "--out",
        type=Path,
        metavar="DIR",
        help="results folder (default: the case file's name without .toml)",
    )
    run.add_argument("--force", action="store_true", help="replace the results folder")

    check = command(
        "check",
        "judge the lumped estimate of a case without solving the field",
        "Read CASE and report Biot numbers, the lumped and corrected times to "
        "target, the slowest mode and the expected direction of the lumped "
        "error, on the case's mesh, without time stepping.",
    )
    check.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")

    demo = command(
        "demo",
        "run the built-in example (a steel bar quenched in oil) into a results folder",
        "Run the built-in example, a 60 mm x 40 mm steel bar quenched from 850 degC "
        "in 60 degC oil, and write its results folder.",
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

    new = command(
        "new",
        "write a starting case file for a scenario",
        "Write an annotated starting case for one of the scenarios, to edit.",
    )
    new.add_argument(
        "scenario",
        choices=sorted(SCENARIOS),
        metavar="SCENARIO",
        help="one of: " + ", ".join(sorted(SCENARIOS)),
    )
    new.add_argument(
        "--out", type=Path, metavar="FILE", help="case file to write (default: SCENARIO.toml)"
    )
    new.add_argument("--force", action="store_true", help="replace the file if it exists")

    command(
        "materials",
        "list the material library",
        "List the library's materials with their properties and sources.",
    )

    show = command(
        "show",
        "print a results folder's summary",
        "Print the verdict, Biot numbers and times to target of a results folder.",
    )
    show.add_argument("folder", type=Path, metavar="DIR", help="results folder")
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
    handlers = {
        "run": _run,
        "check": _check,
        "demo": _demo,
        "new": _new,
        "materials": _materials,
        "show": _show,
    }
    try:
        return handlers[args.command](args)
    except (AdvisorError, ModelError, GeometryError) as error:
        print(f"soakwise: error: {error}", file=sys.stderr)
        return EXIT_USAGE
    except (SolverError, OSError, RuntimeError, ArithmeticError) as error:
        print(f"soakwise: the run failed: {error}", file=sys.stderr)
        return EXIT_FAILED


# ---------------------------------------------------------------------------------------------


def _run(args) -> int:
    from fem import solve

    from .analysis.assessment import assess, check_request
    from .casefile.case import load_case
    from .results import check_results_folder, write_results

    case = load_case(args.case)  # every check that needs no mesh, before anything is written
    out = args.out or args.case.with_suffix("")
    if out.resolve() == args.case.resolve():
        out = args.case.parent / f"{args.case.stem}-results"
    check_results_folder(out, force=args.force)
    log.info(f"Meshing and solving {case.title!r} ...")
    model = case.model()
    check_request(model, **case.advisor_options)  # a bad target fails before the solve
    solution = solve(model, case.end_time, progress=_progress(), **case.run_options)
    assessment = assess(solution, **case.advisor_options)
    files = write_results(assessment, out, force=args.force, **_output_options(case))
    _report(assessment, out, files)
    return EXIT_OK


def _check(args) -> int:
    from .analysis.quick import quick_check
    from .casefile.case import load_case

    case = load_case(args.case)
    check = quick_check(case.model(), target=case.advisor_options.get("target"))
    for bi in check.biot:
        log.info(f"Biot number ({bi.name}, L = {1000 * bi.length:.3g} mm): {bi.value:.3g}")
    mode = check.mode
    log.info(
        f"Slowest-mode ratio: {mode.ratio:.3g} (a lumped model would need h = "
        f"{mode.equivalent_coefficient:.4g} W/(m^2*K))"
    )
    log.info(
        f"Lumped time constant: classical {check.lumped.time_constant:.4g} s, corrected "
        f"{check.corrected.time_constant:.4g} s"
    )
    for name, value in check.time_to_target.items():
        shown = "not reached" if value is None else f"{value:.4g} s"
        log.info(f"Time to {check.target:g} degC, {name}: {shown}")
    log.info(f"Expected direction: {check.expected_direction}.")
    log.info(f"Caution: {CAUTION}")
    return EXIT_OK


def _demo(args: argparse.Namespace) -> int:
    from .demo import run_demo
    from .results import check_results_folder, write_results

    check_results_folder(args.out, force=args.force)  # fail before the solve, not after
    log.info("Solving the demonstration: steel bar 60 mm x 40 mm quenched in oil ...")
    assessment = run_demo()
    files = write_results(assessment, args.out, force=args.force)
    _report(assessment, args.out, files)
    return EXIT_OK


def _new(args) -> int:
    from .casefile.starters import starter_text

    out = args.out or Path(f"{args.scenario}.toml")
    if out.exists() and not args.force:
        raise AdvisorError(
            f"{str(out)!r} already exists; choose another with --out or replace it with --force"
        )
    from .writers.atomic import write_text

    write_text(out, starter_text(args.scenario))
    log.info(f"Wrote {out}; edit it, then: soakwise run {out}")
    return EXIT_OK


def _materials(args) -> int:
    from fem import solids

    for name, m in sorted(solids.MATERIALS.items()):
        print(
            f"{name:36s} k = {m.conductivity:7.4g} W/(m*K)  rho = {m.density:6.0f} kg/m^3  "
            f"c = {m.specific_heat:5.0f} J/(kg*K)"
        )
    print(
        f"\nSource: {next(iter(solids.MATERIALS.values())).source}; values near room "
        "temperature. Use a property table from your supplier's data where it matters."
    )
    return EXIT_OK


def _show(args) -> int:
    path = args.folder / "summary.json"
    if not path.is_file():
        raise AdvisorError(f"{str(args.folder)!r} is not a results folder (no summary.json)")
    try:
        summary = json.loads(path.read_text(encoding="utf-8"))
        verdict = summary["verdict"]
    except (ValueError, KeyError) as error:
        raise AdvisorError(
            f"{str(path)!r} cannot be read as a soakwise summary: {error}"
        ) from None
    print(f"Verdict: classical lumped estimate {verdict['rating']} for {verdict['quantity']}")
    for reason in verdict["reasons"]:
        print(f"  - {reason}")
    print(f"Direction: {verdict['direction']}")
    print(f"Advice: {verdict['advice']}")
    for bi in summary["biot_numbers"]:
        print(f"Biot number ({bi['name']}): {bi['value']:.3g}")
    for name, value in summary["time_to_target_s"].items():
        print(f"Time to target, {name}: " + ("not reached" if value is None else f"{value:.4g} s"))
    for warning in summary["checks"]["warnings"]:
        print(f"Check: {warning}")
    print(f"Caution: {summary['caution']}")
    return EXIT_OK


# ---------------------------------------------------------------------------------------------


def _output_options(case) -> dict:
    """The case's [outputs] switches that the results writer accepts."""
    import inspect

    from .results import write_results

    accepted = inspect.signature(write_results).parameters
    return {k: v for k, v in case.outputs.items() if k in accepted}


def _progress():
    try:
        from .writers.progress import RunProgress
    except ImportError:
        return None
    return RunProgress() if log.isEnabledFor(logging.INFO) else None


def _report(assessment, folder: Path, files: list[Path]) -> None:
    solution = assessment.solution
    stats = solution.stats
    log.debug(
        f"{stats.unknowns} unknowns, {stats.steps} steps ({stats.rejected_steps} rejected), "
        f"{stats.factorisations} factorisations, {stats.solves} solves, "
        f"{stats.newton_iterations} Newton iterations, "
        f"stepping {stats.stepping_seconds:.2f} s"
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
    log.info(
        f"Wrote {len(files)} files to {folder}/: open report.html, or fields/ in a VTK viewer"
    )
    log.info(f"Caution: {CAUTION}")


def _show_warning(message, category, filename, lineno, file=None, line=None) -> None:
    """Library warnings (a property table left, ...) as one plain line each."""
    log.warning(f"warning: {message}")


def _configure_logging(level: int) -> None:
    """Our messages to stderr at ``level``; other libraries' chatter only when verbose."""
    warnings.showwarning = _show_warning
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
