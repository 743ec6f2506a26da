"""The cost of a nonlinear step against a linear step of the same size on the same mesh.

Three nonlinear cases, each beside its linear twin (same section, same fixed steps):

- ``conductivity``: the benchmark square (:mod:`benchmarks.models`) with k(T) falling from 40
  to 28 W/(m·K) over 20–500 °C, against constant k;
- ``latent``: the square as a water-like food block (invented values) at 5 °C cooled by air
  at −30 °C, with 280 kJ/kg of latent heat released over 1 K and frozen and unfrozen k and c
  as tables of temperature, against the unfrozen constants;
- ``surface``: the square quenched from 850 °C with h following the surface temperature
  through a film-to-nucleate jump of 10× over 50 K, against a constant h.

Each run is ``fem.solve`` with fixed Crank–Nicolson steps; the cost per step is the run's
factorisation and stepping time over its steps. Each twin runs ``--repeat`` times, in turn with
the other, and the fastest run of each is kept, so that the machine's load moves both alike.
Run from the repository root::

    python -m benchmarks.nonlinear --nodes 10k --steps 200

It prints a table and writes ``benchmarks/results-nonlinear.json``.

Measured at 9,761 nodes, 200 steps, ``--repeat 3``, the tree of 2026-12-05's start
(``git worktree`` of dad9aed) and the present one back to back (``uptime`` load average
0.39 → 0.76); per-step cost, ratio to the linear twin (0.74–0.77 ms), iterations per step,
factorisations over the run:

=============  ===============================  ===============================
case           before                           after
=============  ===============================  ===============================
k(T)           3.00 ms, 3.98×, 2.22, 1          2.54 ms, 3.43×, 2.22, 1
latent heat    26.3 ms, 34.1×, 6.20, 100        22.0 ms, 29.5×, 4.83, 118
h(T_s)         5.16 ms, 6.77×, 1.97, 3          3.39 ms, 4.55×, 4.90, 3
=============  ===============================  ===============================

h(T_s)'s iterations are now Newton iterations on the 183 surface unknowns
(:mod:`fem.surface_step`), each a surface evaluation and a dense solve, not iterations on the
whole field. What did it:

- h(T_s): each step solved on the surface unknowns alone, then the field by one more solve
  (two solves and two residuals a step, against two solves, a GMRES and a residual an
  iteration); the surface Jacobian I + C·Δ by LAPACK on one BLAS thread (0.3 ms, against
  SuperLU's 1–1.5 ms and OpenBLAS's second thread waiting up to 100 ms for a busy core); C
  built in blocks of 8 right-hand sides (25 against 43 ms in blocks of 64); a stalled surface
  iteration retried smaller at once. Away from the film's collapse a step costs about 2.6×
  the linear one; the collapse costs two failed 1 s steps and a factorisation and C for each
  of the two smaller sizes (about 0.19 s of the run's 0.70 s).
- every nonlinear Crank–Nicolson step: the old state's stored heat and outflow taken from the
  residual the last step ended with, the free unknowns indexed by a slice, the converged
  update without the mixing's least squares (k(T): 3.00 → 2.54 ms).
- latent heat: the kept tangent's LU in single precision where a check solve against the
  double tangent leaves a relative residual below 1e-4 (:mod:`fem.single_precision`; 15.7 →
  12.5 ms a factorisation, 0.67 → 0.53 ms a solve), and a latent-heat tangent renewed at the
  second iteration of its third step (``fem.newton.PHASE_TANGENT_STEPS``; 6.2 → 4.8
  iterations a step for 118 instead of 100 factorisations). The Neumann errors of the
  freezing tests agree to 0.001 % with the earlier tree.

The energy balances stayed at 1e-14–1e-10. Earlier figures (the tree before the cheaper
freezing residual: k(T) 4.5×, latent heat 57×, h(T_s) 7.0×; before the tangents of
:mod:`fem.tangents`: 5.8×, 72×, 17.5×) and what each change did are in
``benchmarks/README.md``, "Nonlinear steps".

The 3× target is met by k(T) on larger meshes only (3.4× at 10k nodes, where each of its two
iterations a step is a solve and a residual and the Python around them is a fifth of the step;
2.7× at 38k nodes, ``benchmarks/README.md``), and NOT MET by h(T_s) (4.5×, the film's
collapse) or latent heat (29–31×). Latent heat: air cooling keeps 11–13 % of the nodes inside
the 1 K freezing range, where the capacity is about 75× the sensible one and changes with every
iterate, so a kept tangent shrinks the change by only 0.3–0.6 an iteration: a step is about
five iterations (a residual, 1.1 ms, is itself 1.5 linear steps; a solve 0.5 ms) and a
factorisation every 1.7 steps (12.5 ms). Even Newton's exact tangent at no cost would leave two
iterations, three residuals and two solves (4.3 ms, 5.7 linear steps). What was tried and
dropped (one fixed matrix per step size, which did not converge in 30 iterations even at
0.015 s steps; a kept LU with an exact local solve at the changed rows; GMRES preconditioned
by the kept LU; other orderings and SuperLU settings; symmetric tangents by Cholesky) is
listed with its figures in DEVELOPERS.md.
"""

from __future__ import annotations

import argparse
import json
import os
import time
from pathlib import Path

from fem import (
    Convection,
    Insulated,
    Material,
    PropertyTable,
    SurfaceCurve,
    SurfaceTemperatureConvection,
    ThermalModel,
    solve,
)

from . import models
from .cli import count

OUTPUT = Path(__file__).resolve().parent / "results-nonlinear.json"
FOOD = {"conductivity": 0.5, "density": 1050.0, "specific_heat": 3700.0}  # unfrozen
EDGES = (-60.0, -1.5, -0.5, 60.0)  # degC: frozen below -1.5, unfrozen above -0.5
QUENCH = SurfaceCurve(
    (60.0, 300.0, 500.0, 550.0, 900.0), (1200.0, 4000.0, 3000.0, 300.0, 300.0)
)  # W/(m^2 K): film above 550 degC, nucleate peak at 300 degC


def _model(section, material, condition, initial: float) -> ThermalModel:
    return ThermalModel(
        section,
        material,
        {"symmetry": Insulated("symmetry"), "cooled": condition},
        initial_temperature=initial,
    )


def cases(section) -> dict[str, tuple[ThermalModel, ThermalModel, float]]:
    """name → (nonlinear model, its linear twin, time step in s)."""
    steel = models.MATERIAL
    varying = Material(
        PropertyTable((20.0, 500.0), (40.0, 28.0)), steel.density, steel.specific_heat
    )
    plunge = Convection(models.HEAT_TRANSFER, models.AMBIENT)
    frozen = Material(
        PropertyTable(EDGES, (1.6, 1.6, 0.5, 0.5)),
        FOOD["density"],
        PropertyTable(EDGES, (1900.0, 1900.0, 3700.0, 3700.0)),
        latent_heat=2.8e5,
        solidus=-1.5,
        liquidus=-0.5,
    )
    air = Convection(25.0, -30.0)
    return {
        "conductivity": (
            _model(section, varying, plunge, models.INITIAL),
            _model(section, steel, plunge, models.INITIAL),
            10.0,
        ),
        "latent": (
            _model(section, frozen, air, 5.0),
            _model(section, Material(**FOOD), air, 5.0),
            60.0,
        ),
        "surface": (
            _model(section, steel, SurfaceTemperatureConvection(QUENCH, 60.0), 850.0),
            _model(section, steel, Convection(3000.0, 60.0), 850.0),
            1.0,
        ),
    }


def per_step(model: ThermalModel, time_step: float, steps: int) -> dict:
    """One fixed-step run: seconds per step and what it did."""
    started = time.perf_counter()
    solution = solve(
        model, time_step * steps, time_step=time_step, output_interval=time_step * steps
    )
    wall = time.perf_counter() - started
    stats = solution.stats
    return {
        "seconds_per_step": (stats.factorisation_seconds + stats.stepping_seconds) / stats.steps,
        "wall_seconds": wall,
        "steps": stats.steps,
        "factorisations": stats.factorisations,
        "newton_iterations": stats.newton_iterations,
        "subdivided_steps": stats.subdivided_steps,
        "damped_iterations": stats.damped_iterations,
        "energy_balance_error": solution.checks.energy_balance_error,
    }


def fastest(linear, nonlinear, step: float, steps: int, repeat: int) -> tuple[dict, dict]:
    """The fastest of ``repeat`` runs of each twin, taken in turn, so that a change in the
    machine's load during the benchmark touches both alike."""
    twins, runs = [], []
    for _ in range(max(repeat, 1)):
        twins.append(per_step(linear, step, steps))
        runs.append(per_step(nonlinear, step, steps))
    return (
        min(twins, key=lambda row: row["seconds_per_step"]),
        min(runs, key=lambda row: row["seconds_per_step"]),
    )


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m benchmarks.nonlinear", description=__doc__)
    parser.add_argument("--nodes", type=count, default=10_000, help="P1 nodes (10k)")
    parser.add_argument("--steps", type=int, default=200, help="fixed steps per run (200)")
    parser.add_argument("--only", default="", help="comma-separated cases")
    parser.add_argument(
        "--repeat", type=int, default=3, help="runs of each twin, alternating; the fastest kept"
    )
    args = parser.parse_args(argv)
    section = models.mesh("square", models.size_for("square", nodes=args.nodes))
    rows = {}
    for name, (nonlinear, linear, step) in cases(section).items():
        if args.only and name not in args.only.split(","):
            continue
        twin, run = fastest(linear, nonlinear, step, args.steps, args.repeat)
        ratio = run["seconds_per_step"] / twin["seconds_per_step"]
        rows[name] = {"time_step": step, "linear": twin, "nonlinear": run, "ratio": ratio}
        print(
            f"{name:13s} nodes {section.mesh.p.shape[1]:7d}  step {step:5g} s  linear "
            f"{1e3 * twin['seconds_per_step']:7.2f} ms  nonlinear "
            f"{1e3 * run['seconds_per_step']:7.2f} ms  ratio {ratio:5.2f}  steps {run['steps']}  "
            f"iterations/step "
            f"{run['newton_iterations'] / run['steps']:4.2f}  factorisations "
            f"{run['factorisations']}  subdivided {run['subdivided_steps']}"
        )
    load = os.getloadavg()
    print(f"load average {load[0]:.2f} {load[1]:.2f} {load[2]:.2f}")
    OUTPUT.write_text(
        json.dumps({"nodes": args.nodes, "load_average": load, "cases": rows}, indent=2)
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
