"""The benchmark tasks. Each runs inside a fresh worker process (:mod:`benchmarks.worker`),
takes a dict of parameters and returns a dict of measurements; times are wall-clock seconds
from ``time.perf_counter`` around the measured call only (imports, mesh loading and the
exact solution are outside)."""

from __future__ import annotations

import contextlib
import cProfile
import dataclasses
import pickle
import pstats
import shutil
import tempfile
import time
from pathlib import Path

from . import models
from .exact import SquareBarExact, largest_error
from .machine import (
    FactorSpy,
    cholesky_size,
    factor_size,
    peak_rss,
    read_bandwidth,
    time_solves,
)
from .peers import task_peer
from .startup import task_startup
from .study import task_study
from .whole_run import task_whole_run

PLUNGE_REMAINING = 0.01  # the run ends when the centre is 99 % of the way to the fluid
TEMPERATURE_DROP = models.INITIAL - models.AMBIENT


def plunge_end_time() -> float:
    """t at which the exact centre temperature is 99 % of the way to equilibrium, s."""
    fourier = SquareBarExact(models.BIOT).centre_fourier(PLUNGE_REMAINING)
    return fourier * models.DIFFUSION_TIME


def output_times(end_time: float, count: int) -> list[float]:
    return [end_time * k / count for k in range(count + 1)]


# ---------------------------------------------------------------------------------------------
# Helpers
# ---------------------------------------------------------------------------------------------


def _load_section(path: str):
    with open(path, "rb") as stream:
        return pickle.load(stream)


@contextlib.contextmanager
def _timed_methods(targets: dict[str, tuple[type, str]], buckets: dict[str, float]):
    """Time calls of ``cls.name`` into ``buckets[key]`` while active (skips missing ones)."""
    originals = []
    for key, (cls, name) in targets.items():
        original = getattr(cls, name, None)
        if original is None:
            continue
        buckets[key] = 0.0

        def timed(*args, _original=original, _key=key, **kwargs):
            started = time.perf_counter()
            try:
                return _original(*args, **kwargs)
            finally:
                buckets[_key] += time.perf_counter() - started

        setattr(cls, name, timed)
        originals.append((cls, name, original))
    try:
        yield buckets
    finally:
        for cls, name, original in originals:
            setattr(cls, name, original)


def _recorder_targets() -> dict[str, tuple[type, str]]:
    try:
        from fem.recorder import HistoryRecorder
    except ImportError:
        return {}
    return {
        "record_seconds": (HistoryRecorder, "record"),
        "store_field_seconds": (HistoryRecorder, "store_field"),
    }


def _vtk_writer():
    """The VTK series writer of the advisor, wherever it lives now."""
    import importlib

    for module in ("advisor.writers.vtk_series", "advisor.writers.vtk", "advisor.vtk"):
        with contextlib.suppress(ImportError):
            found = importlib.import_module(module)
            if hasattr(found, "write_vtk_series"):
                return found.write_vtk_series
    raise ImportError("no write_vtk_series in advisor.writers")


def _square_error(section, times, fields) -> float:
    return largest_error(
        SquareBarExact(models.BIOT),
        section.vertices,
        models.HALF_SIDE,
        models.DIFFUSION_TIME,
        times,
        fields,
        models.INITIAL,
        models.AMBIENT,
    )


def _solve(model, params: dict, spy: FactorSpy, reporter=None, field_folder=None):
    """fem.solve with the task's controls; returns (solution, wall seconds, timers)."""
    import fem

    end = params["end_time"]
    kwargs = {
        "method": params.get("method", "crank-nicolson"),
        "output_interval": end / params.get("outputs", 50),
        "field_folder": field_folder,
    }
    if kwargs["method"] == "exponential":
        kwargs["tolerance"] = params["tolerance"]
    elif params.get("adaptive"):
        kwargs.update(adaptive=True, tolerance=params["tolerance"])
    else:
        kwargs["time_step"] = end / params["steps"]
    state: dict = {}

    def progress(t: float, end_time: float, steps: int) -> None:
        now = time.perf_counter()
        if "first" not in state:
            state["first"] = (now, steps)
            state["written"] = 0.0
        if reporter is not None and now - state["written"] > 2.0:
            state["written"] = now
            first_time, first_steps = state["first"]
            reporter.update(
                force=True,
                progress={
                    "time": t,
                    "steps": steps,
                    "steps_since_first": steps - first_steps,
                    "seconds_since_first": now - first_time,
                },
                factors=spy.summary(),
            )

    timers: dict[str, float] = {}
    with spy.active(), _timed_methods(_recorder_targets(), timers):
        started, cpu = time.perf_counter(), time.process_time()
        solution = fem.solve(model, end, progress=progress, **kwargs)
        wall = time.perf_counter() - started
        timers["cpu_seconds"] = time.process_time() - cpu  # this process, all its threads
    return solution, wall, timers


# ---------------------------------------------------------------------------------------------
# Tasks
# ---------------------------------------------------------------------------------------------


def task_bandwidth(params: dict, reporter) -> dict:
    return read_bandwidth(params.get("gigabytes", 1.0), params.get("repeats", 7))


def task_mesh(params: dict, reporter) -> dict:
    """Mesh a benchmark shape through geometries and keep it for the other tasks."""
    import gmsh

    size = models.size_for(params["shape"], params.get("nodes"), params.get("triangles"))
    reporter.update(force=True, size=size)
    timers: dict[str, float] = {}
    with _timed_methods({"gmsh_generate_seconds": (gmsh.model.mesh, "generate")}, timers):
        started = time.perf_counter()
        section = models.mesh(params["shape"], size)
        seconds = time.perf_counter() - started
    if params.get("out"):
        with open(params["out"], "wb") as stream:
            pickle.dump(section, stream, protocol=pickle.HIGHEST_PROTOCOL)
    return {
        "size": size,
        "nodes": int(section.mesh.p.shape[1]),
        "triangles": int(section.mesh.t.shape[1]),
        "mesh_seconds": seconds,
        **timers,
    }


def task_soakwise(params: dict, reporter) -> dict:
    """fem.solve on a stored mesh: cost counters, timers, accuracy, factor size, VTK writing."""
    section = _load_section(params["mesh"])
    model = models.MODELS[params["model"]](section)
    spy = FactorSpy("superlu" if params.get("what_if") else None)
    scratch = Path(tempfile.mkdtemp(prefix="soakwise-bench-", dir=params.get("scratch")))
    try:
        folder = scratch / "fields" if params.get("field_folder") else None
        solution, wall, timers = _solve(model, params, spy, reporter, folder)
        rss = peak_rss()
        stats = dataclasses.asdict(solution.stats)
        result = {
            "nodes": int(section.mesh.p.shape[1]),
            "wall_seconds": wall,
            "peak_rss_solve_bytes": rss,
            "stats": stats,
            "steps": stats["steps"],
            "factorisations": stats["factorisations"],
            # everything a step costs once the run is set up: the wall time less assembly and
            # the first factorisation (refactorisations and Newton iterations stay in)
            "per_step_seconds": (wall - stats["assembly_seconds"] - spy.first_factor_seconds)
            / max(stats["steps"], 1),
            "factors": spy.summary(),
            "timers": timers,
            "warnings": list(solution.checks.warnings),
            "outputs": len(solution.fields),
        }
        reporter.update(force=True, **result)
        if folder is not None:
            result["field_bytes_on_disk"] = sum(p.stat().st_size for p in folder.iterdir())
        if params.get("exact"):
            result["error"] = _square_error(section, solution.output_times, solution.fields)
        if params.get("factor_analysis") and spy.last is not None:
            if spy.last_matrix is not None and spy.kinds.get("cholesky"):
                points = section.mesh.p  # in the numbering the steps factorised in
                if spy.numbering is not None:
                    points = points[:, spy.numbering]
                result["factor"] = cholesky_size(spy.last_matrix, points)
                result["step_numbering"] = "local" if spy.numbering is not None else "mesh"
            else:
                result["factor"] = factor_size(spy.last)
            result["factor"]["solve_only_seconds"] = time_solves(spy.last)
            result["symmetric_solver"] = "cholesky" if spy.kinds.get("cholesky") else "superlu"
        if params.get("write_vtk"):
            write = _vtk_writer()
            started = time.perf_counter()
            write(solution, scratch / "vtk")
            seconds = time.perf_counter() - started
            result["vtk"] = {
                "frames": len(solution.fields),
                "seconds": seconds,
                "per_frame_seconds": seconds / max(len(solution.fields), 1),
                "bytes": sum(p.stat().st_size for p in (scratch / "vtk").iterdir()),
            }
        return result
    finally:
        shutil.rmtree(scratch, ignore_errors=True)


def task_script(params: dict, reporter) -> dict:
    """(a): spsolve every step on soakwise's matrices."""
    from .baselines import script_steps

    section = _load_section(params["mesh"])
    model = models.MODELS[params["model"]](section)
    result = script_steps(model, params["end_time"] / params["steps_of_run"], params["steps"])
    result["nodes"] = int(section.mesh.p.shape[1])
    return result


def task_ivp(params: dict, reporter) -> dict:
    """(b): solve_ivp BDF on the lumped system, error against the exact solution."""
    from .baselines import ivp_bdf

    section = _load_section(params["mesh"])
    model = models.square_model(section)
    end = params["end_time"]
    rtol = params["rtol"]
    result = ivp_bdf(
        model, end, output_times(end, params.get("outputs", 50)), rtol, rtol * TEMPERATURE_DROP
    )
    result["error"] = _square_error(section, result.pop("times"), result.pop("fields"))
    result["nodes"] = int(section.mesh.p.shape[1])
    result["rtol"] = rtol
    return result


# adaptive and exponential: tolerance × initial ΔT (K); fixed: steps to the end; ivp: rtol
ADAPTIVE_LADDER = (1e-1, 3e-2, 1e-2, 3e-3, 1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6, 1e-6)
FIXED_LADDER = (50, 100, 200, 400, 800, 1600, 3200, 6400, 12800)
IVP_LADDER = (1e-2, 3e-3, 1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6, 1e-6, 3e-7, 1e-7)


def task_calibrate(params: dict, reporter) -> dict:
    """On a smaller mesh, the loosest setting of each method that meets the accuracy target:
    soakwise adaptive (its local tolerance), soakwise fixed (its number of steps) and solve_ivp
    (rtol). The ordering what-if is used for speed; it changes results by round-off only."""
    from .baselines import ivp_bdf

    section = _load_section(params["mesh"])
    model = models.square_model(section)
    end, target = params["end_time"], params["target"]
    found: dict = {"nodes": int(section.mesh.p.shape[1]), "target": target}
    ladders = {
        "adaptive": [
            {"adaptive": True, "tolerance": f * TEMPERATURE_DROP, "fraction": f}
            for f in ADAPTIVE_LADDER
        ],
        "exponential": [
            {"method": "exponential", "tolerance": f * TEMPERATURE_DROP, "fraction": f}
            for f in ADAPTIVE_LADDER
        ],
        "fixed": [{"steps": n} for n in FIXED_LADDER],
        "ivp": [{"rtol": r} for r in IVP_LADDER],
    }
    for method in params.get("methods", list(ladders)):
        tried = []
        for rung, setting in enumerate(ladders[method]):
            started = time.perf_counter()
            if method == "ivp":
                run = ivp_bdf(
                    model,
                    end,
                    output_times(end, 50),
                    setting["rtol"],
                    setting["rtol"] * TEMPERATURE_DROP,
                )
                error = _square_error(section, run["times"], run["fields"])
                steps = run["steps"]
            else:
                solution, _, _ = _solve(model, {"end_time": end, **setting}, FactorSpy())
                error = _square_error(section, solution.output_times, solution.fields)
                steps = solution.stats.steps
            tried.append(
                {
                    **setting,
                    "rung": rung,
                    "error": error,
                    "steps": steps,
                    "seconds": time.perf_counter() - started,
                }
            )
            reporter.update(force=True, **{method: tried})
            if error <= target:
                break
        found[method] = tried
    return found


def task_profile(params: dict, reporter) -> dict:
    """cProfile of soakwise's steps; where a step's time goes."""
    section = _load_section(params["mesh"])
    model = models.MODELS[params["model"]](section)
    spy = FactorSpy("superlu" if params.get("what_if") else None)
    profiler = cProfile.Profile()
    profiler.enable()
    solution, wall, timers = _solve(model, params, spy)
    profiler.disable()
    stats = pstats.Stats(profiler)
    steps = max(solution.stats.steps, 1)
    rows = []
    for (filename, line, function), (_, calls, total, cumulative, _) in stats.stats.items():
        rows.append(
            {
                "function": f"{Path(filename).name}:{line}({function})",
                "in_fem": Path(filename).parent.name == "fem",
                "calls": calls,
                "own_seconds": total,
                "cumulative_seconds": cumulative,
            }
        )

    def own(predicate) -> float:
        return sum(r["own_seconds"] for r in rows if predicate(r["function"]))

    def cumulative(suffix: str) -> float:
        return sum(r["cumulative_seconds"] for r in rows if r["function"].endswith(suffix))

    categories = {
        "triangular solve (SuperLU.solve)": own(lambda f: "'solve' of 'SuperLU'" in f),
        "triangular solve (Cholesky)": own(lambda f: "'solve' of 'cholespy" in f),
        "factorisation (splu)": own(lambda f: "gstrf" in f or "'splu'" in f),
        "sparse mat-vec (csr_matvec)": own(lambda f: "_matvec" in f),
        "history recording (HistoryRecorder.record)": cumulative("(record)"),
        "output fields (store_field)": cumulative("(store_field)"),
        "energy ledger (_ledger)": cumulative("(_ledger)"),
        "step residuals (residual)": cumulative("(residual)"),
        "local error and predictor": cumulative("(local_error)") + cumulative("(predict)"),
    }
    total = max(
        (
            r["cumulative_seconds"]
            for r in rows
            if r["function"].endswith("(solve)") and "transient.py" in r["function"]
        ),
        default=wall,
    )
    fem_rows = sorted(
        (r for r in rows if r["in_fem"]), key=lambda r: r["cumulative_seconds"], reverse=True
    )
    rows.sort(key=lambda r: r["own_seconds"], reverse=True)
    return {
        "nodes": int(section.mesh.p.shape[1]),
        "steps": steps,
        "profiled_seconds": total,
        "profiled_per_step_seconds": total / steps,
        "factor_seconds": spy.factor_seconds,
        "categories_per_step_seconds": {k: v / steps for k, v in categories.items()},
        "top_own_time": rows[:15],
        "top_fem_cumulative": fem_rows[:15],
        "timers": timers,
    }


TASKS = {
    "bandwidth": task_bandwidth,
    "mesh": task_mesh,
    "soakwise": task_soakwise,
    "script": task_script,
    "ivp": task_ivp,
    "calibrate": task_calibrate,
    "profile": task_profile,
    "startup": task_startup,
    "study": task_study,
    "peer": task_peer,
    "whole_run": task_whole_run,
}
