"""Studies: a sweep of the demonstration section (the quench-bar starter at its default 1 mm
mesh) over 64 heat-transfer coefficients, on local worker processes; and a 200-point validity
map of it, analysed into its report, on 2 worker processes and on a dask LocalCluster of 2
workers (when dask is installed).

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
    maps = _validity_maps(case, scratch, int(params.get("map_cases", 200)), reporter, runs)
    return {"cases": cases, "runs": runs, "parallel_efficiency": efficiency, "maps": maps}


def _validity_maps(case: Path, scratch: Path, cases: int, reporter, runs: dict) -> dict:
    """A ``cases``-point validity map on 2 processes and on a LocalCluster of 2 workers: the
    sweep, then its analysis and report (``study.html``)."""
    import importlib.util

    from advisor.casefile import load_case
    from advisor.studies.study_report import analyse_study, write_study_report
    from advisor.studies.tables import read_study

    engines = [("processes", "processes")]
    if importlib.util.find_spec("distributed") is not None:
        engines.append(("dask LocalCluster", "dask"))
    maps = {}
    for name, kind in engines:
        out = scratch / f"map-{kind}"
        if kind == "dask":
            from distributed import Client, LocalCluster

            with (
                LocalCluster(n_workers=2, threads_per_worker=1, processes=True) as cluster,
                Client(cluster) as client,
            ):
                found = _study(case, out, cases, client, 2)
        else:
            found = _study(case, out, cases, "processes", 2)
        started = time.perf_counter()
        title = load_case(case).title
        findings = analyse_study(
            read_study(out),
            title=title,
            variable=H_KEY,
            errors={
                "classical": "error_classical_slowest",
                "corrected": "error_corrected_slowest",
            },
        )
        write_study_report(findings, out, read_study(out))
        found["report_seconds"] = time.perf_counter() - started
        found["design_rule"] = findings.rules[0].text if findings.rules else ""
        maps[name] = found
        reporter.update(runs=runs, maps=maps)
    return maps


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
    for name, run in (data.get("maps") or {}).items():
        rows.append(
            target(
                f"{run['cases']}-point validity map on {name} (2 workers), report included",
                "measured",
                f"{run['wall_seconds'] + run['report_seconds']:.3g} s",
                None,
                f"sweep {run['wall_seconds']:.3g} s, report {run['report_seconds']:.3g} s, "
                f"load {run['load_average'][0]:.1f}; {run['design_rule']}",
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
