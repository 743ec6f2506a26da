"""``soakwise new SCENARIO``: write a starting case file to edit."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..casefile.starters import SCENARIOS, starter_text
from ..errors import AdvisorError
from .common import EXIT_OK, log

SUMMARY = "write a starting case file for a scenario"
DESCRIPTION = "Write an annotated starting case for one of the scenarios, to edit."


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "scenario",
        choices=sorted(SCENARIOS),
        metavar="SCENARIO",
        help="one of: " + ", ".join(sorted(SCENARIOS)),
    )
    parser.add_argument(
        "--out", type=Path, metavar="FILE", help="case file to write (default: SCENARIO.toml)"
    )
    parser.add_argument("--force", action="store_true", help="replace the file if it exists")


def execute(args: argparse.Namespace) -> int:
    from ..writers.atomic import write_text

    out = args.out or Path(f"{args.scenario}.toml")
    if out.exists() and not args.force:
        raise AdvisorError(
            f"{str(out)!r} already exists; choose another with --out or replace it with --force"
        )
    write_text(out, starter_text(args.scenario))
    log.info(f"Wrote {out}; edit it, then: soakwise run {out}")
    return EXIT_OK
