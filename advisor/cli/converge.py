"""``soakwise converge CASE``: the same case on three or more meshes, the observed order and
the grid convergence index of its answers, and the mesh to use."""

from __future__ import annotations

import argparse
import csv
import json
import math
from pathlib import Path

from ..errors import AdvisorError
from .common import EXIT_OK, log

SUMMARY = "run a case on finer and coarser meshes and judge the mesh (grid convergence index)"
DESCRIPTION = (
    "Run CASE on three or more meshes, each RATIO times coarser than the one before, starting "
    "from the case's mesh size (or --finest). Report the observed order and the grid "
    "convergence index (Celik et al., J. Fluids Eng. 130, 2008) of the slowest point's time "
    "to target and of the peak internal temperature difference, and recommend the coarsest "
    "mesh whose index is below the threshold. Writes converge.json, converge.csv, plots/ and "
    "study.html into --out. Runs one case at a time."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", type=Path, metavar="CASE", help="case file (.toml)")
    parser.add_argument(
        "--out", type=Path, metavar="DIR", help="output folder (default: CASE-converge)"
    )
    parser.add_argument(
        "--meshes", type=int, default=3, metavar="N", help="number of meshes, 3 or more (3)"
    )
    parser.add_argument(
        "--ratio",
        type=float,
        default=math.sqrt(2.0),
        metavar="R",
        help="size ratio between successive meshes, above 1.3 advised (default √2)",
    )
    parser.add_argument(
        "--finest",
        metavar="SIZE",
        help="finest mesh size with its unit, e.g. '1 mm' (default: the case's mesh_size)",
    )
    parser.add_argument(
        "--steps",
        action="store_true",
        help="coarsen the time step (or the step tolerance, squared) with the mesh",
    )
    parser.add_argument(
        "--threshold",
        type=float,
        default=1.0,
        metavar="PERCENT",
        help="largest acceptable grid convergence index, percent (1)",
    )
    parser.add_argument("--force", action="store_true", help="write into an existing folder")


def execute(args: argparse.Namespace) -> int:
    from ..casefile.case import load_case
    from ..studies.mesh_convergence import mesh_recommendation, mesh_sizes, run_grids

    if not 0 < args.threshold < 100:
        raise AdvisorError(f"--threshold is a percentage in (0, 100); got {args.threshold!r}")
    case = load_case(args.case)  # every check that needs no mesh, before anything runs
    if case.imported is not None:
        raise AdvisorError("converge needs a section meshed from shapes, not an imported mesh")
    finest = case.mesh_options["size"]
    if args.finest is not None:
        finest = load_case(args.case, {"section.mesh_size": args.finest}).mesh_options["size"]
    sizes = mesh_sizes(finest, args.ratio, args.meshes)
    out = args.out or args.case.with_name(f"{args.case.stem}-converge")
    if out.exists() and not args.force:
        raise AdvisorError(f"{str(out)!r} exists; choose another --out or pass --force")

    def announce(index: int, size: float) -> None:
        log.info(f"Mesh {index + 1} of {len(sizes)}: size {1000 * size:.4g} mm ...")

    runs = run_grids(
        args.case, sizes, step_ratio=args.ratio if args.steps else None, progress=announce
    )
    series, chosen, text = mesh_recommendation(runs, args.threshold / 100)
    _print(runs, series, text)
    files = _write(out, case.title, runs, series, text)
    log.info(f"Wrote {len(files)} files to {out}/: open study.html")
    from ..caution import CAUTION

    log.info(f"Caution: {CAUTION}")
    return EXIT_OK


def _print(runs, series, text: str) -> None:
    print(f"{'mesh size':>10} {'h':>9} {'triangles':>9} {'time to target':>15} {'peak ΔT':>9}")
    for run in runs:
        reached = run.answers["time_to_target_slowest_s"]
        print(
            f"{1000 * run.mesh_size:8.4g}mm {1000 * run.representative_size:7.4g}mm "
            f"{run.triangles:9d} {reached:13.6g} s {run.answers['peak_difference_K']:7.5g} K"
        )
    for answer, found in series.items():
        g = found[0]
        print(
            f"{answer}: observed order {g.order:.3g}, extrapolated {g.extrapolated:.6g}, "
            f"GCI {100 * g.gci_fine:.3g} % on the finest mesh ({g.behaviour})"
        )
    print(text)


def _write(out: Path, title: str, runs, series, text: str) -> list[Path]:
    from ..studies.study_report import StudyFindings, write_study_report
    from ..writers.atomic import write_text

    out.mkdir(parents=True, exist_ok=True)
    columns = ["mesh_size_m", "representative_size_m", "triangles", "unknowns", "time_step_s"]
    answers = list(runs[0].answers)
    rows = [
        [r.mesh_size, r.representative_size, r.triangles, r.unknowns, r.time_step]
        + [r.answers[a] for a in answers]
        + [r.wall_seconds]
        for r in runs
    ]
    with (out / "converge.csv").open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(columns + answers + ["wall_seconds"])
        writer.writerows(rows)
    summary = {
        "title": title,
        "grids": [
            {k: _number(v) for k, v in zip(columns + answers + ["wall_seconds"], row, strict=True)}
            for row in rows
        ],
        "convergence": {
            answer: [_json_triple(g) for g in found] for answer, found in series.items()
        },
        "recommendation": text,
    }
    write_text(out / "converge.json", json.dumps(summary, indent=2, allow_nan=False))
    findings = StudyFindings(
        f"Mesh check: {title}",
        cases=len(runs),
        convergence={answer: found[0] for answer, found in series.items()},
        grids={
            answer: ([r.representative_size for r in runs], [r.answers[answer] for r in runs])
            for answer in series
        },
        recommendation=text,
    )
    try:
        import pandas as pd  # the report's table of grids, when pandas is there
    except ImportError:
        table = None
    else:
        table = pd.DataFrame(rows, columns=columns + answers + ["wall_seconds"])
    return [out / "converge.csv", out / "converge.json", *write_study_report(findings, out, table)]


def _json_triple(g) -> dict:
    return {
        "representative_sizes_m": list(g.sizes),
        "values": list(g.values),
        "ratios": list(g.ratios),
        "observed_order": g.order if math.isfinite(g.order) else None,
        "extrapolated": g.extrapolated,
        "approximate_relative_error": g.approximate_error,
        "extrapolated_relative_error": g.extrapolated_error,
        "gci_fine": g.gci_fine,
        "behaviour": g.behaviour,
    }


def _number(value):
    """JSON has no NaN: an answer that does not exist (a target not reached) is null."""
    return None if isinstance(value, float) and not math.isfinite(value) else value
