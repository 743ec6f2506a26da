"""``soakwise show DIR``: print a results folder's summary in words."""

from __future__ import annotations

import argparse
import json
from pathlib import Path

from ..errors import AdvisorError
from ..time_words import duration_text
from .common import EXIT_OK

SUMMARY = "print a results folder's summary"
DESCRIPTION = (
    "Print the verdict, the target and the times to reach it, the peak internal temperature "
    "difference, how the run ended, the Biot numbers and the run's checks of a results folder."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("folder", type=Path, metavar="DIR", help="results folder")


def execute(args: argparse.Namespace) -> int:
    summary = read_summary(args.folder)
    lines = field_lines(summary) if "lumped_model" in summary else summary_lines(summary)
    for line in lines:
        print(line)
    return EXIT_OK


def read_summary(folder: Path) -> dict:
    """The folder's summary.json, or an error naming what is wrong with it."""
    path = folder / "summary.json"
    if not path.is_file():
        raise AdvisorError(f"{str(folder)!r} is not a results folder (no summary.json)")
    try:
        summary = json.loads(path.read_text(encoding="utf-8"))
        needed = ("verdict", "inputs", "time_to_target_s", "peak_internal_difference_K")
        if "lumped_model" in summary:  # a run of the field alone
            needed = ("lumped_model", "final", "peak_internal_difference_K")
        for key in needed:
            summary[key]  # noqa: B018 - a KeyError names the missing part
    except (ValueError, KeyError, TypeError) as error:
        raise AdvisorError(
            f"{str(path)!r} cannot be read as a soakwise summary: {error}"
        ) from None
    return summary


def field_lines(summary: dict) -> list[str]:
    """A run no lumped model applies to, in words: why, the field at the end, its checks."""
    final = summary["final"]
    lines = [
        f"No lumped model applies: {summary['lumped_model']['reason']}.",
        f"At {duration_text(final['time_s'])} the field runs from {final['minimum_degC']:.4g} "
        f"to {final['maximum_degC']:.4g} °C (mean {final['mean_degC']:.4g} °C).",
        f"Peak internal temperature difference: {summary['peak_internal_difference_K']:.3g} K",
    ]
    checks = summary.get("checks", {})
    lines += [f"Check: {w}" for w in checks.get("warnings", [])]
    lines += [f"Note: {n}" for n in checks.get("notes", [])]
    return [*lines, f"Caution: {summary['caution']}"]


def summary_lines(summary: dict) -> list[str]:
    """The summary in words, one line each: verdict, target and times, peak ΔT, how the run
    ended, reasons, direction, advice, Biot numbers, checks and the caution."""
    from ..analysis.verdict import BIOT_NAMES, SUBJECTS

    verdict, inputs = summary["verdict"], summary["inputs"]
    subject = SUBJECTS.get(verdict["quantity"], verdict["quantity"])
    lines = [
        f"Verdict: the classical lumped estimate is {verdict['rating'].upper()} for {subject} "
        f"(error {100 * verdict['error_fraction']:.3g} % against a tolerance of "
        f"{100 * inputs['tolerance_fraction']:.3g} %)"
    ]
    lines += _target_lines(summary)
    lines.append(
        f"Peak internal temperature difference: {summary['peak_internal_difference_K']:.3g} K "
        f"at {duration_text(summary['peak_internal_difference_time_s'])}"
    )
    lines.append(f"The run: {_ending(summary)}")
    lines += [f"  - {reason}" for reason in verdict["reasons"]]
    lines.append(f"Direction: {verdict['direction']}")
    lines.append(f"Advice: {verdict['advice']}")
    for bi in summary.get("biot_numbers", []):
        low, high = bi["range_over_run"]
        spread = "constant" if f"{low:.3g}" == f"{high:.3g}" else f"{low:.3g} to {high:.3g}"
        regions = bi.get("per_region") or {}
        each = "; per region " + ", ".join(f"{r} {v:.3g}" for r, v in regions.items())
        lines.append(
            f"Biot number ({BIOT_NAMES.get(bi['name'], bi['name'])} = "
            f"{1000 * bi['length_m']:.3g} mm): {bi['value']:.3g} (over the run: {spread}"
            f"{each if regions else ''})"
        )
    lines += [f"Check: {warning}" for warning in summary.get("checks", {}).get("warnings", [])]
    lines.append(f"Caution: {summary['caution']}")
    return lines


_TIME_WORDS = {
    "classical": "classical lumped estimate",
    "corrected": "corrected lumped model",
    "fitted exponential": "fitted single exponential",
    "two-node (core)": "two-node model, core node",
    "mean": "field mean",
    "slowest": "slowest point",
}


def _target_lines(summary: dict) -> list[str]:
    """The target and the time each quantity takes to reach it, the slowest point first."""
    target = summary["inputs"].get("target_degC")
    if target is None:
        return ["Target: none given, so no times to target"]
    times = summary["time_to_target_s"]
    order = ["slowest", *(k for k in times if k != "slowest")]
    words = []
    for key in order:
        if key not in times:
            continue
        name = f"probe {key[6:]}" if key.startswith("probe:") else _TIME_WORDS.get(key, key)
        value = times[key]
        words.append(f"{name} {'not within the run' if value is None else duration_text(value)}")
    return [f"Target: {target:g} °C", "Time to target: " + "; ".join(words)]


def _ending(summary: dict) -> str:
    """How the run ended, in words: at the end time, or when the stop condition was met."""
    end = summary["inputs"].get("end_time_s")
    stop = summary.get("stop_time_s")
    if stop is not None:
        return f"stopped at {duration_text(stop)}, when the stop condition was met"
    unmet = [w for w in summary.get("checks", {}).get("warnings", []) if "stop" in w]
    if unmet:
        return f"ran to the end time, {duration_text(end)}, without meeting the stop condition"
    return f"ran to the end time, {duration_text(end)}" if end is not None else "finished"
