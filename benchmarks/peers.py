"""What a user would pick instead of soakwise, on the same plunge (the benchmark square).

The problem is :mod:`benchmarks.models`' square: a quarter of a 100 mm bar, insulated on the
two symmetry edges, cooled by h = 160 W/(m²·K) (Bi = 0.2) on the other two, from 500 °C into a
fluid at 20 °C, run to the time the centre is 99 % of the way (3055 s) in equal steps. Each
peer's error is the largest |T − T_exact| at the centre over every step, as a fraction of the
initial difference (480 K); the exact product series is :mod:`benchmarks.exact`'s.

- ``soakwise``: ``fem.solve`` with fixed Crank–Nicolson steps (two backward-Euler half-steps at
  the start), on a gmsh mesh of the square.
- ``scikit-fem script``: the good script an analyst writes with scikit-fem on the same mesh:
  assemble K, M and the edge terms once, factorise M + Δt/2·A once with ``splu`` (its
  defaults), then Crank–Nicolson steps of one solve and one product each.
- ``FiPy``: finite volumes on a uniform grid of as many cells as the mesh has nodes; the
  convection enters as a source on the boundary cells with the series resistance of the
  half cell, 1/h_eff = 1/h + (Δx/2)/k, and ``eq.solve(dt=...)`` every step (backward Euler,
  FiPy's default solver). Run only when ``fipy`` is installed (the ``peers`` extra).
- ``SfePy``: only when ``sfepy`` can be imported (it is not on the package index as a wheel
  for every machine and takes long to build, so the suite never installs it); otherwise the
  row says why it was skipped.

Times: set-up (assembly, factorisation, or the grid and the terms) and steps, in the worker
process; the mesh is made once by the suite and not counted. Peak memory is the worker's own
(VmHWM, imports included).
"""

from __future__ import annotations

import importlib.util
import time

import numpy as np

from . import models
from .exact import SquareBarExact

PEERS = ("soakwise", "scikit-fem script", "FiPy", "SfePy")
MODULES = {"scikit-fem script": "skfem", "FiPy": "fipy", "SfePy": "sfepy"}


def missing(peer: str) -> str | None:
    """Why ``peer`` cannot run here, or None."""
    module = MODULES.get(peer)
    if module and importlib.util.find_spec(module) is None:
        extra = " (pip install fipy, or the peers extra)" if module == "fipy" else ""
        return f"{module} is not installed{extra}"
    return None


def centre_exact(times: np.ndarray, x: float = 0.0, y: float = 0.0) -> np.ndarray:
    """The exact temperature at (x, y) at ``times``, °C."""
    exact = SquareBarExact(models.BIOT)
    drop = models.INITIAL - models.AMBIENT
    return np.array(
        [
            models.AMBIENT
            + drop
            * float(
                exact.theta(x / models.HALF_SIDE, y / models.HALF_SIDE, t / models.DIFFUSION_TIME)
            )
            for t in times
        ]
    )


def _error(times, temperatures, x: float = 0.0, y: float = 0.0) -> float:
    drop = models.INITIAL - models.AMBIENT
    return float(np.max(np.abs(np.asarray(temperatures) - centre_exact(times, x, y))) / drop)


def _result(setup: float, step_times: list[float], times, probe, unknowns, **extra) -> dict:
    steps = len(step_times)
    return {
        "unknowns": int(unknowns),
        "steps": steps,
        "setup_seconds": setup,
        "steps_seconds": float(sum(step_times)),
        "per_step_seconds": float(np.median(step_times)),
        "total_seconds": setup + float(sum(step_times)),
        "error": _error(times, probe, *extra.pop("probe_at", (0.0, 0.0))),
        **extra,
    }


def run_soakwise(section, end_time: float, steps: int) -> dict:
    """fem.solve with fixed steps; a step's time is the interval between two progress calls
    (so the first step, which factorises, and the run's checks count as set-up)."""
    import fem

    ticks: list[float] = []
    started = time.perf_counter()
    solution = fem.solve(
        models.square_model(section),
        end_time,
        time_step=end_time / steps,
        output_times=[end_time],
        progress=lambda t, end, count: ticks.append(time.perf_counter()),
    )
    total = time.perf_counter() - started
    step_times = list(np.diff(ticks))
    result = _result(
        total - sum(step_times),
        step_times,
        solution.times,
        solution.probes["centre"],
        solution.stats.unknowns,
    )
    result["solver_steps"] = solution.stats.steps
    return result


def run_skfem_script(section, end_time: float, steps: int) -> dict:
    """The good scikit-fem script: assemble once, factorise once, step."""
    import scipy.sparse.linalg as spla
    from skfem import Basis, BilinearForm, ElementTriP1, FacetBasis, LinearForm, asm
    from skfem.helpers import dot, grad

    @BilinearForm
    def conduction(u, v, w):
        return models.CONDUCTIVITY * dot(grad(u), grad(v))

    @BilinearForm
    def capacity(u, v, w):
        return models.DENSITY * models.SPECIFIC_HEAT * u * v

    @BilinearForm
    def exchange(u, v, w):
        return models.HEAT_TRANSFER * u * v

    @LinearForm
    def supply(v, w):
        return models.HEAT_TRANSFER * models.AMBIENT * v

    started = time.perf_counter()
    mesh = section.mesh
    basis = Basis(mesh, ElementTriP1())
    cooled = FacetBasis(mesh, ElementTriP1(), facets=mesh.boundaries["cooled"])
    M = asm(capacity, basis)
    A = asm(conduction, basis) + asm(exchange, cooled)
    b = asm(supply, cooled)
    step = end_time / steps
    lu = spla.splu((M + 0.5 * step * A).tocsc())
    right = (M - 0.5 * step * A).tocsr()
    load = step * b
    centre = int(np.argmin(np.hypot(*mesh.p)))
    temperature = np.full(basis.N, models.INITIAL)
    setup = time.perf_counter() - started
    probe, step_times = [temperature[centre]], []
    for _ in range(steps):
        t0 = time.perf_counter()
        temperature = lu.solve(right @ temperature + load)
        step_times.append(time.perf_counter() - t0)
        probe.append(temperature[centre])
    times = step * np.arange(steps + 1)
    return _result(setup, step_times, times, probe, basis.N)


def run_fipy(cells: int, end_time: float, steps: int) -> dict:
    """Finite volumes on a uniform grid with about ``cells`` cells (FiPy)."""
    from fipy import CellVariable, Grid2D, ImplicitSourceTerm, TransientTerm
    from fipy import DiffusionTerm as Diffusion

    started = time.perf_counter()
    per_side = max(2, round(cells**0.5))
    dx = models.HALF_SIDE / per_side
    grid = Grid2D(dx=dx, dy=dx, nx=per_side, ny=per_side)
    temperature = CellVariable(mesh=grid, value=models.INITIAL)
    # the half cell in series with the film: the flux leaving a boundary cell's face
    effective = 1.0 / (1.0 / models.HEAT_TRANSFER + 0.5 * dx / models.CONDUCTIVITY)
    x, y = grid.cellCenters
    faces = (x > models.HALF_SIDE - dx).astype(float) + (y > models.HALF_SIDE - dx).astype(float)
    coefficient = CellVariable(mesh=grid, value=effective * faces / dx)  # W/(m³·K)
    equation = (
        TransientTerm(coeff=models.DENSITY * models.SPECIFIC_HEAT)
        == Diffusion(coeff=models.CONDUCTIVITY)
        - ImplicitSourceTerm(coeff=coefficient)
        + coefficient * models.AMBIENT
    )
    step = end_time / steps
    centre = int(np.argmin(np.asarray(x) ** 2 + np.asarray(y) ** 2))
    setup = time.perf_counter() - started
    probe, step_times = [models.INITIAL], []
    for _ in range(steps):
        t0 = time.perf_counter()
        equation.solve(var=temperature, dt=step)
        step_times.append(time.perf_counter() - t0)
        probe.append(float(temperature.value[centre]))
    times = step * np.arange(steps + 1)
    return _result(
        setup,
        step_times,
        times,
        probe,
        per_side**2,
        probe_at=(float(x[centre]), float(y[centre])),
        scheme="backward Euler, finite volumes",
    )


def task_peer(params: dict, reporter) -> dict:
    """One peer on the plunge: params peer, mesh (a pickled section), nodes, end_time,
    steps."""
    from .cases import _load_section

    peer, end, steps = params["peer"], params["end_time"], params["steps"]
    reason = missing(peer)
    if reason or peer == "SfePy":
        # SfePy has no script here yet: an installed SfePy is named, not run
        return {"skipped": reason or "sfepy is installed but no script is written for it"}
    if peer == "FiPy":
        return run_fipy(params["nodes"], end, steps)
    section = _load_section(params["mesh"])
    if peer == "soakwise":
        return run_soakwise(section, end, steps)
    return run_skfem_script(section, end, steps)


def peer_rows(outcomes) -> list[dict]:
    """One row per peer run (or skip), with its per-step time against soakwise's."""
    rows = []
    for outcome in outcomes:
        if outcome.meta.get("task") != "peer":
            continue
        d = outcome.data
        skipped = d.get("skipped") or d.get("reason")
        failure = d.get("error") if isinstance(d.get("error"), str) else ""
        rows.append(
            {
                "case": outcome.meta.get("case"),
                "peer": outcome.meta.get("variant"),
                "status": "skipped" if skipped else outcome.status,
                "reason": skipped or failure.strip()[-120:] or None,
                "unknowns": d.get("unknowns"),
                "steps": d.get("steps"),
                "setup_seconds": d.get("setup_seconds"),
                "per_step_seconds": d.get("steps_seconds", 0) / d["steps"]
                if d.get("steps")
                else None,
                "total_seconds": d.get("total_seconds"),
                "peak_rss_bytes": d.get("peak_rss_bytes") or outcome.ru_maxrss_bytes,
                "error": d.get("error") if isinstance(d.get("error"), float) else None,
            }
        )
    ours = {r["case"]: r for r in rows if r["peer"] == "soakwise" and r["per_step_seconds"]}
    for r in rows:
        base = ours.get(r["case"])
        if base and r["per_step_seconds"]:
            r["per_step_over_soakwise"] = r["per_step_seconds"] / base["per_step_seconds"]
    return rows


def print_peers(rows: list[dict]) -> None:
    """The side-by-side table."""
    if not rows:
        return

    def ms(x):
        return "-" if x is None else f"{x * 1e3:.3g}"

    def seconds(x):
        return "-" if x is None else f"{x:.3g}"

    header = ("case", "tool", "unknowns", "steps", "set-up s", "ms/step", "x soakwise")
    header += ("total s", "peak MB", "centre error %", "status")
    lines = [header]
    for r in rows:
        ratio = r.get("per_step_over_soakwise")
        lines.append(
            (
                r["case"],
                r["peer"],
                "-" if r["unknowns"] is None else f"{r['unknowns']:,}",
                "-" if r["steps"] is None else str(r["steps"]),
                seconds(r["setup_seconds"]),
                ms(r["per_step_seconds"]),
                "-" if ratio is None else f"{ratio:.3g}",
                seconds(r["total_seconds"]),
                "-" if r["peak_rss_bytes"] is None else f"{r['peak_rss_bytes'] / 1e6:.0f}",
                "-" if r["error"] is None else f"{100 * r['error']:.3f}",
                r["status"] + (f" ({r['reason']})" if r.get("reason") else ""),
            )
        )
    widths = [max(len(str(line[i])) for line in lines) for i in range(len(header) - 1)]
    print("\nthe plunge by soakwise and by what a user would pick instead (one run each):")
    for line in lines:
        print(
            "  ".join(str(v).ljust(w) for v, w in zip(line[:-1], widths, strict=True))
            + "  "
            + line[-1]
        )
