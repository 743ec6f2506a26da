"""The ``soakwise`` command line, the only code that talks to the terminal.

Commands, one module each: ``run`` a case into a results folder, ``check`` a case without the
field solve, ``demo``, ``new`` (write a starting case for a scenario), ``materials`` (the
library) and ``show`` (a results folder's summary). A command imports the solver, the mesher
and the plotting only when it runs, so the help and the small commands start quickly.

Exit status: 0 done, 1 the run failed, 2 bad command line or input (nothing written), 130
interrupted by Ctrl-C or SIGTERM (one line, staging folders removed, nothing written).
"""

from __future__ import annotations

import argparse
import logging
import os
import signal
import sys
import threading

from ..errors import AdvisorError
from . import check, converge, demo, fit, materials, new, run, show, sweep
from .common import (
    EPILOG,
    EXIT_FAILED,
    EXIT_INTERRUPTED,
    EXIT_OK,
    EXIT_USAGE,
    configure_logging,
    on_terminate,
)

__all__ = [
    "EXIT_FAILED",
    "EXIT_INTERRUPTED",
    "EXIT_OK",
    "EXIT_USAGE",
    "build_parser",
    "console",
    "main",
]

COMMANDS = {
    "run": run,
    "check": check,
    "demo": demo,
    "new": new,
    "materials": materials,
    "show": show,
    "sweep": sweep,
    "converge": converge,
    "fit": fit,
}
# Errors in what the user gave (exit 2) and failures of the run (exit 1), by package and name:
# a class whose package was never imported cannot have been raised, so none is imported here.
USAGE_ERRORS = (("fem", "ModelError"), ("geometries", "GeometryError"))
RUN_FAILURES = (("fem", "SolverError"),)


def build_parser() -> argparse.ArgumentParser:
    """The command line's parser, one sub-command per module of :data:`COMMANDS`."""
    parser = argparse.ArgumentParser(
        prog="soakwise",
        description="Warm-up and cool-down of solid sections: a 2-D transient field checked "
        "against the lumped estimate.",
        epilog=EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"soakwise {_version()}")
    _loudness(parser, default=False)
    # -q/-v after the command too (soakwise run case.toml -v); there they default to nothing,
    # so that a flag given before the command is not undone.
    after = argparse.ArgumentParser(add_help=False)
    _loudness(after, default=argparse.SUPPRESS)
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, module in COMMANDS.items():
        module.add_arguments(
            commands.add_parser(
                name,
                help=module.SUMMARY,
                description=module.DESCRIPTION,
                epilog=EPILOG,
                formatter_class=argparse.RawDescriptionHelpFormatter,
                parents=[after],
            )
        )
    return parser


def _loudness(parser: argparse.ArgumentParser, default) -> None:
    loudness = parser.add_mutually_exclusive_group()
    loudness.add_argument(
        "-q", "--quiet", action="store_true", default=default, help="print errors only"
    )
    loudness.add_argument(
        "-v", "--verbose", action="store_true", default=default, help="print solver details"
    )


def main(argv: list[str] | None = None) -> int:
    """Run the command line; return the exit status."""
    main_thread = threading.current_thread() is threading.main_thread()
    previous = signal.signal(signal.SIGTERM, on_terminate) if main_thread else None
    try:
        return _main(argv)
    except KeyboardInterrupt as stop:  # Ctrl-C or SIGTERM, wherever it came
        where = getattr(stop, "where", "")
        outcome = getattr(stop, "outcome", "nothing written")
        print(f"soakwise: interrupted{where}; {outcome}", file=sys.stderr)
        return EXIT_INTERRUPTED
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)


def console() -> None:
    """The ``soakwise`` program: :func:`main`, then exit with its status.

    After an interruption the process ends at once with status 130 (every cleanup has run):
    CPython remembers a Ctrl-C that landed inside code compiled at run time (dataclasses make
    their methods so) and would otherwise end the process by SIGINT although it was handled.
    """
    status = main()
    if status == EXIT_INTERRUPTED:
        sys.stdout.flush()
        sys.stderr.flush()
        os._exit(status)
    sys.exit(status)


def _main(argv: list[str] | None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.quiet and args.verbose:  # one before the command, the other after it
        parser.error("-q/--quiet and -v/--verbose cannot be used together")
    configure_logging(
        logging.ERROR if args.quiet else logging.DEBUG if args.verbose else logging.INFO
    )
    if args.command is None:
        parser.print_help()
        return EXIT_USAGE
    try:
        status = COMMANDS[args.command].execute(args)
        sys.stdout.flush()  # a reader that stopped early shows here, not at exit
        return status
    except (AdvisorError, *_loaded(USAGE_ERRORS)) as error:
        print(f"soakwise: error: {error}", file=sys.stderr)
        return EXIT_USAGE
    except BrokenPipeError:  # the reader (head, a pager) stopped reading: nothing is wrong
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())  # no error at exit
        return EXIT_OK
    except (*_loaded(RUN_FAILURES), OSError, RuntimeError, ArithmeticError) as error:
        print(f"soakwise: the run failed: {error}", file=sys.stderr)
        return EXIT_FAILED


def _loaded(names: tuple[tuple[str, str], ...]) -> tuple[type[BaseException], ...]:
    """The exception classes named by (package, class) whose packages have been imported."""
    found = (getattr(sys.modules.get(module), name, None) for module, name in names)
    return tuple(kind for kind in found if kind is not None)


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("soakwise")
    except PackageNotFoundError:
        return "unknown"
