"""The time a fit takes: one constant coefficient on a section of about 5k nodes, and an
8-node table of h against surface temperature.

Both fit readings made by the solver on the benchmark square (:mod:`benchmarks.models`) from
a known coefficient, with 0.5 K of Gaussian noise (fixed seed), at the centre and the corner,
every 1/60 of the run:

- ``constant``: h = 160 W/(m²·K) (Bi = 0.2), fitted from a start of 80, 200 fixed
  Crank–Nicolson steps to 3055 s; target < 10 s;
- ``surface``: h rising linearly with the surface temperature from 100 W/(m²·K) at 20 °C to
  400 at 500 °C, fitted as an 8-node h(T) table (Tikhonov, discrepancy principle) with Newton
  steps; target < 60 s.

The time counts everything after meshing: assembly, every transient solve, the covariance and
the lumped readings; the processor time of the process is printed beside the wall time (on a
loaded machine the wall time is the larger by the share of the cores others took). Run from
the repository root::

    python -m benchmarks.fit --nodes 5k --table-nodes 5k

It prints a table and writes ``benchmarks/results-fit.json``.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import os
import tempfile
import time
from pathlib import Path

import numpy as np

from advisor.fitting.estimate import fit
from advisor.fitting.lumped_fit import lumped_readings
from advisor.fitting.measured import read_measured
from advisor.fitting.parameters import build_parameters, parse_request
from advisor.fitting.problem import FitProblem
from fem import Convection, SurfaceCurve, SurfaceTemperatureConvection, solve

from . import models
from .cli import count

OUTPUT = Path(__file__).resolve().parent / "results-fit.json"
END = 3055.0  # s: the square's centre is 99 % of the way to the fluid
NOISE, SEED = 0.5, 11
TARGETS = {"constant": 10.0, "surface": 60.0}
CURVE = SurfaceCurve((20.0, 500.0), (100.0, 400.0))


def readings(model, condition, steps: int, folder: Path) -> Path:
    truth = dataclasses.replace(model, boundaries={**model.boundaries, "cooled": (condition,)})
    solution = solve(truth, END, time_step=END / steps, output_times=(END,))
    times = np.linspace(END / 60, END, 60)
    noise = np.random.default_rng(SEED).normal(0.0, NOISE, (times.size, 2))
    columns = [
        np.interp(times, solution.times, solution.probes[name]) + noise[:, i]
        for i, name in enumerate(("centre", "corner"))
    ]
    path = folder / "readings.csv"
    rows = "".join(f"{t:.10g},{a:.4f},{b:.4f}\n" for t, a, b in zip(times, *columns, strict=True))
    path.write_text("time [s], centre [degC], corner [degC]\n" + rows)
    return path


def timed_fit(model, request: str, path: Path, steps: int) -> dict:
    started, processor = time.perf_counter(), time.process_time()
    measured = read_measured(path, model.probes)
    parameters = build_parameters(
        [parse_request(request)],
        dict(model.boundaries),
        end_time=END,
        temperature_range=(float(measured.stacked().min()), models.INITIAL),
    )
    problem = FitProblem(model, parameters, measured, time_step=END / steps)
    result = fit(problem, uncertainty=NOISE)
    lumped_readings(problem, result.values)
    wall = time.perf_counter() - started
    return {
        "wall_seconds": wall,
        "process_seconds": time.process_time() - processor,
        "solve_seconds": problem.solve_seconds,
        "transient_solves": result.trials,
        "values": result.values.tolist(),
        "standard_errors": result.standard_errors.tolist(),
        "rms_residual": result.rms_residual,
        "verdict": result.verdict.rating,
    }


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m benchmarks.fit", description=__doc__)
    parser.add_argument("--nodes", type=count, default=5_000, help="constant h: nodes (5k)")
    parser.add_argument("--table-nodes", type=count, default=5_000, help="h(T): nodes (5k)")
    parser.add_argument("--steps", type=int, default=200, help="fixed steps per solve (200)")
    parser.add_argument("--only", default="", help="constant, surface or both")
    args = parser.parse_args(argv)
    rows = {}
    plan = {
        "constant": (args.nodes, Convection(models.HEAT_TRANSFER, models.AMBIENT), "h:cooled"),
        "surface": (
            args.table_nodes,
            SurfaceTemperatureConvection(CURVE, models.AMBIENT),
            "h(T):cooled:nodes=8",
        ),
    }
    for name, (nodes, condition, request) in plan.items():
        if args.only and name not in args.only.split(","):
            continue
        section = models.mesh("square", models.size_for("square", nodes=nodes))
        model = dataclasses.replace(
            models.square_model(section),
            boundaries={
                **models.square_model(section).boundaries,
                "cooled": (Convection(80.0, models.AMBIENT),),
            },
        )
        with tempfile.TemporaryDirectory() as folder:
            path = readings(model, condition, args.steps, Path(folder))
            row = timed_fit(model, request, path, args.steps)
        row.update(nodes=int(section.mesh.p.shape[1]), target_seconds=TARGETS[name])
        row["load_average"] = os.getloadavg()
        rows[name] = row
        met = "MET" if row["wall_seconds"] < TARGETS[name] else "NOT MET"
        print(
            f"{name:9s} nodes {row['nodes']:6d}  {row['transient_solves']:3d} solves  "
            f"{row['wall_seconds']:7.2f} s (target < {TARGETS[name]:g} s: {met}; processor "
            f"{row['process_seconds']:.2f} s)  "
            f"values {np.round(row['values'], 1).tolist()}  load {row['load_average'][0]:.2f}"
        )
    OUTPUT.write_text(json.dumps({"steps": args.steps, "cases": rows}, indent=2))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
