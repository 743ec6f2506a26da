"""Studies: a sweep of the demonstration section (the quench-bar starter at its default 1 mm
mesh) over 64 heat-transfer coefficients, on local worker processes.

The same study runs three times from its own empty store: in this process (``serial``), then
on a pool of 1 and of 2 spawned worker processes. Figures:

- wall time of each, the store and the exports (CSV, Parquet) included;
- parallel efficiency = T(1 worker) / (2 · T(2 workers)), both through the same pool machinery
  (target ≥ 85 %);
- overhead per case beyond its run = (wall time · workers − Σ run time) / cases, where a
  case's run time is ``run_case``'s own wall time (mesh taken from the worker's cache,
  assembly, solve, assessment): what the study adds per case — loading, sending the case,
  spawning and starting the workers, storing (target < 0.2 s); also given beyond the solve
  alone (assembly, factorisation, stepping), which counts the assessment as overhead.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

EFFICIENCY_TARGET = 0.85
OVERHEAD_TARGET = 0.2  # s per case
H_KEY = "boundaries.quenched.convection.coefficient"


def _study(case: Path, out: Path, cases: int, map_, workers: int) -> dict:
    from advisor.studies import sweep

    variations = {H_KEY: f"log(100 W/(m^2*K), 3000 W/(m^2*K), {cases})"}
    load_start = os.getloadavg()[0]
    started = time.perf_counter()
    table = sweep(case, variations, map=map_, workers=workers, store=out, force=True)
    wall = time.perf_counter() - started
    runs, solves = float(table["run_seconds"].sum()), float(table["solve_seconds"].sum())
    return {
        "workers": workers,
        "cases": len(table),
        "failed": int((table["status"] != "done").sum()),
        "wall_seconds": wall,
        "run_seconds_total": runs,
        "solve_seconds_total": solves,
        "overhead_per_case_s": (wall * workers - runs) / len(table),
        "overhead_beyond_solve_per_case_s": (wall * workers - solves) / len(table),
        "load_average": [load_start, os.getloadavg()[0]],
    }


def task_study(params: dict, reporter) -> dict:
    from advisor.casefile.starters import starter_text

    scratch = Path(params["scratch"]) / "study"
    scratch.mkdir(parents=True, exist_ok=True)
    case = scratch / "quench-bar.toml"
    text = starter_text("quench-bar")
    if params.get("mesh_size"):
        text = text.replace('mesh_size = "1 mm"', f'mesh_size = "{params["mesh_size"]}"')
    case.write_text(text, encoding="utf-8")
    cases = int(params.get("cases", 64))
    runs = {}
    for name, map_, workers in (
        ("serial", "serial", 1),
        ("1", "processes", 1),
        ("2", "processes", 2),
    ):
        runs[name] = _study(case, scratch / f"out-{name}", cases, map_, workers)
        reporter.update(runs=runs)
    efficiency = runs["1"]["wall_seconds"] / (2 * runs["2"]["wall_seconds"])
    return {"cases": cases, "runs": runs, "parallel_efficiency": efficiency}


def study_targets(outcomes, target) -> list[dict]:
    """The study targets from the ``study`` task; ``target`` builds one row."""
    found = [o for o in outcomes if o.meta.get("case") == "study"]
    if not found or "runs" not in found[-1].data:
        return []
    data = found[-1].data
    runs = data["runs"]
    efficiency = data.get("parallel_efficiency")
    detail = ", ".join(
        f"{k}: {v['wall_seconds']:.3g} s, {v['run_seconds_total'] / v['cases']:.3g} s a run"
        + (f", load {v['load_average'][0]:.1f}" if "load_average" in v else "")
        for k, v in runs.items()
    )
    rows = [
        target(
            f"{data['cases']}-case sweep: parallel efficiency on 2 workers",
            f">= {EFFICIENCY_TARGET:.0%}",
            "-" if efficiency is None else f"{efficiency:.1%}",
            None if efficiency is None else efficiency >= EFFICIENCY_TARGET,
            detail,
        )
    ]
    for name in ("1", "2"):
        run = runs.get(name)
        if run is None:
            continue
        rows.append(
            target(
                f"{data['cases']}-case sweep, {name} worker(s): overhead per case beyond its run",
                f"< {OVERHEAD_TARGET} s",
                f"{run['overhead_per_case_s']:.3g} s",
                run["overhead_per_case_s"] < OVERHEAD_TARGET,
                f"beyond the solve alone {run['overhead_beyond_solve_per_case_s']:.3g} s",
            )
        )
    return rows


def describe(data: dict) -> str:
    """One line for the table of other tasks."""
    runs = data.get("runs") or {}
    parts = [f"{k}: {v['wall_seconds']:.3g} s" for k, v in runs.items()]
    if data.get("parallel_efficiency") is not None:
        parts.append(f"efficiency {data['parallel_efficiency']:.1%}")
    return "; ".join(parts)
