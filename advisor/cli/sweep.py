"""``soakwise sweep CASE --out DIR``: run a study of a case file — a grid of values or samples
of uncertain inputs — and keep every case's answers in DIR/study.sqlite (and .csv, .parquet)."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..caution import CAUTION
from .common import EXIT_FAILED, EXIT_OK, log

SUMMARY = "run a study: vary case keys over a grid or samples, one row of answers per case"
DESCRIPTION = (
    "Run CASE many times with some of its keys varied, as its [study] table and the --vary "
    "options say, on local worker processes or a dask.distributed cluster. Every case is "
    "checked before the first one runs. Each finished case is stored at once in "
    "DIR/study.sqlite, so an interrupted study continues with --resume; DIR/study.csv and "
    "DIR/study.parquet (with pandas and pyarrow) hold the table at the end.\n\n"
    "SPEC: a list 'a,b,c' or TOML '[...]'; a range 'linear(start, stop, count)' or "
    "'log(start, stop, count)'; a distribution 'uniform(low, high)', "
    "'normal(mean, deviation)', 'lognormal(median, log_deviation)', "
    "'triangular(low, mode, high)'. Values take units as in case files, e.g.\n"
    "  soakwise sweep bar.toml --out bar-study \\\n"
    "    --vary 'boundaries.quenched.convection.coefficient=log(100 W/(m^2*K), 2000 "
    "W/(m^2*K), 12)' \\\n    --vary 'section.mesh_size=2 mm,1 mm'"
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    parser.add_argument(
        "--out", type=Path, metavar="DIR", help="study folder (default: CASE's name + -study)"
    )
    parser.add_argument(
        "--vary",
        action="append",
        default=[],
        metavar="KEY=SPEC",
        help="vary a case key (repeat for more keys; replaces the file's entry for KEY)",
    )
    parser.add_argument("--samples", type=int, metavar="N", help="draws of the distributions")
    parser.add_argument("--seed", type=int, metavar="S", help="seed of the draws")
    parser.add_argument(
        "--sampling", choices=("random", "latin-hypercube"), help="how distributions are drawn"
    )
    parser.add_argument(
        "--workers", type=int, metavar="N", help="local worker processes (default: one a core)"
    )
    parser.add_argument(
        "--cluster", metavar="ADDRESS", help="run on this dask.distributed scheduler instead"
    )
    parser.add_argument(
        "--resume", action="store_true", help="continue the study in DIR (same case and spec)"
    )
    parser.add_argument("--force", action="store_true", help="replace a study in DIR")
    parser.add_argument(
        "--case-folders", action="store_true", help="write each case's results folder too"
    )
    parser.add_argument(
        "--sensitivity",
        choices=("rank", "sobol", "chaos"),
        default="rank",
        help="how a sampled study ranks its inputs: rank correlation (default), Sobol indices "
        "by RBD-FAST or by a polynomial-chaos surrogate (these two need the uncertainty extra)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..studies.study import read_spec, run_study

    if args.workers is not None and args.workers < 1:
        raise _usage(f"--workers must be 1 or more, got {args.workers}")
    case_file, spec = read_spec(
        args.case,
        args.vary,
        sampling=args.sampling,
        samples=args.samples,
        seed=args.seed,
        workers=args.workers,
        cluster=args.cluster,
    )
    out = args.out or args.case.with_name(args.case.stem + "-study")
    where = f"the cluster at {spec.cluster}" if spec.cluster else f"{spec.workers or 'all'} cores"
    log.info(f"Study of {case_file.path.name} on {where}: checking its cases ...")
    run = run_study(
        case_file,
        spec,
        out,
        resume=args.resume,
        force=args.force,
        progress=_progress_line(),
        case_folders=args.case_folders,
    )
    files = [*run.files, *_report(out, run, args.sensitivity)]
    log.info(
        f"{run.done} of {len(run.planned.cases)} cases done, {run.failed} failed; wrote "
        f"{out}/study.sqlite, " + ", ".join(str(f.relative_to(out)) for f in files)
    )
    if run.failed:
        log.warning(f"{run.failed} cases failed: their errors are in the table's error column")
    log.info(f"Caution: {CAUTION}")
    return EXIT_OK if run.done else EXIT_FAILED


def _report(out: Path, run, sensitivity: str) -> list[Path]:
    """The study report (validity map, design rule, spreads), when pandas is there and a case
    finished."""
    import importlib.util

    if not run.done or importlib.util.find_spec("pandas") is None:
        if run.done:
            log.info("No study report: it needs pandas (pip install 'soakwise[studies]')")
        return []
    from ..studies.study_report import write_sweep_report

    return write_sweep_report(out, run.planned, sensitivity=sensitivity)


def _usage(message: str):
    from ..errors import AdvisorError

    return AdvisorError(message)


def _progress_line():
    """A progress callback: a redrawn line on a terminal, a line every 10 % otherwise."""
    import logging

    if not log.isEnabledFor(logging.INFO):
        return None
    terminal = sys.stderr.isatty()
    shown = [-1]

    def show(progress) -> None:
        finished = progress.done + progress.failed
        left = "" if progress.left is None else f", about {_duration(progress.left)} left"
        text = (
            f"cases: {finished}/{progress.total} ({progress.done} done, {progress.failed} "
            f"failed){left}"
        )
        if terminal:
            end = "\n" if finished == progress.total else ""
            print(f"\r{text}\033[K", end=end, file=sys.stderr, flush=True)
            return
        tenth = 10 * finished // max(progress.total, 1)
        if tenth > shown[0]:
            shown[0] = tenth
            log.info(text)

    return show


def _duration(seconds: float) -> str:
    """Wall-clock time left, in whole seconds at most (the project's one time formatter)."""
    from ..time_words import duration_text

    return duration_text(round(seconds))
