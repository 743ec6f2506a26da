"""A whole run against its solve: ``soakwise run`` on every starter, wall time of the command
(interpreter start, loading, meshing, solve, assessment and every default output) against the
solve time the run itself records (``summary.json``: assembly + factorisation + stepping).

Each starter is written with ``soakwise new`` into a scratch folder and run as
``python -m advisor.cli run CASE --out DIR`` from the repository root (this checkout is
measured), after one untimed warm-up run of the first starter; ``runs`` timed runs each, the
median kept. Target: wall ≤ solve + 2 s on a warm machine. Beside the wall time, the CPU time
of the command and its processes (user + system, from ``getrusage``): on a loaded machine
the wall time stretches while the CPU time barely moves, so it tells how far a quiet
machine's wall time could be from the target (it counts a forked writer's time too, so on
a quiet machine the wall time can be below it).

Run alone: ``python -m benchmarks.whole_run [--runs N] [--only quench-bar,...]``.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
ALLOWANCE_SECONDS = 2.0  # beyond the solve


def _starters() -> list[str]:
    from advisor.casefile.starters import SCENARIOS

    return list(SCENARIOS)


def _cpu_of_children() -> float:
    import resource  # Unix only: imported where it is used

    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def _run_once(case: Path, out: Path) -> tuple[float, float, list[str], float]:
    """Wall time of one ``soakwise run``, the run's solve time (s), its files and the CPU
    time of the command and its processes (s)."""
    command = [sys.executable, "-m", "advisor.cli", "run", str(case), "--out", str(out)]
    command.append("--force")
    cpu = _cpu_of_children()
    started = time.perf_counter()
    done = subprocess.run(command, cwd=ROOT, capture_output=True, text=True, timeout=900)
    wall = time.perf_counter() - started
    cpu = _cpu_of_children() - cpu
    if done.returncode != 0:
        raise RuntimeError(f"{' '.join(command)} failed: {done.stderr.strip()[-2000:]}")
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    stats = _find(summary, "stepping_s")
    solve = stats["assembly_s"] + stats["factorisation_s"] + stats["stepping_s"]
    return wall, solve, list(summary.get("files", [])), cpu


def _find(tree, key: str) -> dict:
    """The innermost mapping of ``tree`` that holds ``key``."""
    if isinstance(tree, dict):
        if key in tree:
            return tree
        for value in tree.values():
            found = _find(value, key)
            if found:
                return found
    return {}


def measure(starters: list[str], runs: int) -> dict:
    """Median wall and solve times in s of ``runs`` runs of each starter."""
    results = {}
    with tempfile.TemporaryDirectory(prefix="soakwise-whole-run-") as scratch:
        folder = Path(scratch)
        cases = {}
        for name in starters:
            case = folder / f"{name}.toml"
            subprocess.run(
                [sys.executable, "-m", "advisor.cli", "new", name, "--out", str(case)],
                cwd=ROOT,
                capture_output=True,
                check=True,
                timeout=120,
            )
            cases[name] = case
        _run_once(cases[starters[0]], folder / "warm-up")  # file cache, font cache
        for name, case in cases.items():
            load = os.getloadavg()[0]
            walls, solves, cpus = [], [], []
            for _ in range(runs):
                wall, solve, files, cpu = _run_once(case, folder / f"{name}-results")
                walls.append(wall)
                solves.append(solve)
                cpus.append(cpu)
            wall, solve = statistics.median(walls), statistics.median(solves)
            results[name] = {
                "wall_seconds": wall,
                "solve_seconds": solve,
                "beyond_solve_seconds": wall - solve,
                "walls": walls,
                "cpu_seconds": statistics.median(cpus),
                "files": len(files),
                "load_average": [load, os.getloadavg()[0]],
            }
    return results


def task_whole_run(params: dict, reporter) -> dict:
    starters = params.get("starters") or _starters()
    runs = params.get("runs", 1)
    return {"runs": runs, "starters": measure(starters, runs)}


def whole_run_targets(outcomes, target) -> list[dict]:
    """One row per starter: the command's wall time against its solve + 2 s."""
    found = [o for o in outcomes if o.meta.get("case") == "whole_run"]
    if not found or "starters" not in found[-1].data:
        return []
    rows = []
    for name, run in found[-1].data["starters"].items():
        beyond = run["beyond_solve_seconds"]
        rows.append(
            target(
                f"soakwise run {name}: wall beyond its solve",
                f"<= {ALLOWANCE_SECONDS:g} s",
                f"{beyond:.3g} s",
                beyond <= ALLOWANCE_SECONDS,
                f"wall {run['wall_seconds']:.3g} s, solve {run['solve_seconds']:.3g} s, "
                f"CPU {run.get('cpu_seconds', float('nan')):.3g} s, {run['files']} files, "
                f"load {run['load_average'][0]:.1f}",
            )
        )
    return rows


def describe(data: dict) -> str:
    """One line for the table of other tasks."""
    return "; ".join(
        f"{name} {run['wall_seconds']:.3g} s (solve {run['solve_seconds']:.3g} s)"
        for name, run in (data.get("starters") or {}).items()
    )


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m benchmarks.whole_run", description=__doc__)
    parser.add_argument("--runs", type=int, default=1, help="timed runs per starter")
    parser.add_argument("--only", default="", help="comma-separated starters")
    args = parser.parse_args(argv)
    starters = [s for s in args.only.split(",") if s] or _starters()
    print(f"load average {os.getloadavg()[0]:.2f}")
    data = measure(starters, args.runs)
    print(f"{'starter':20s} {'wall s':>8s} {'solve s':>8s} {'beyond':>8s} {'CPU s':>8s}  files")
    for name, run in data.items():
        print(
            f"{name:20s} {run['wall_seconds']:8.2f} {run['solve_seconds']:8.2f} "
            f"{run['beyond_solve_seconds']:8.2f} {run['cpu_seconds']:8.2f}  {run['files']}"
        )
    print(f"load average {os.getloadavg()[0]:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
