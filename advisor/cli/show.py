"""``soakwise show DIR``: print a results folder's summary."""

from __future__ import annotations

import argparse
import json
from pathlib import Path

from ..errors import AdvisorError
from .common import EXIT_OK

SUMMARY = "print a results folder's summary"
DESCRIPTION = "Print the verdict, Biot numbers and times to target of a results folder."


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("folder", type=Path, metavar="DIR", help="results folder")


def execute(args: argparse.Namespace) -> int:
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
