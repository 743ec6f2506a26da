"""Start-up: how long the small commands take to answer, and what importing the packages loads.

Each command runs as ``python -m advisor.cli ...`` from the repository root (so this checkout
is measured, not an installed copy) once to warm the file cache, then ``runs`` times; the
figure is the median wall time of those runs, interpreter start included, with the median CPU
time (user + system) of the child beside it (what the command costs without the other jobs of
a loaded machine). One more run under ``python -X importtime`` names the imports that took the
longest. ``show`` reads a results folder made once beforehand by ``run`` (not timed); ``check``
reads the quench-bar starter. The import footprint is read from a fresh interpreter's
``sys.modules`` after ``import PACKAGE``.
"""

from __future__ import annotations

import json
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
LIMIT_SECONDS = 0.3
STARTER = ROOT / "examples" / "quench-bar.toml"
# name → arguments after ``soakwise``; {out} is a scratch folder, {results} a results folder
COMMANDS = {
    "soakwise --help": ["--help"],
    "soakwise new": ["new", "quench-bar", "--out", "{out}/case.toml", "--force"],
    "soakwise materials": ["materials"],
    "soakwise show": ["show", "{results}"],
    "soakwise check": ["check", str(STARTER)],
}
PACKAGES = ("fem", "advisor", "advisor.cli")
# Third-party packages that take a noticeable time to import (or drag in a GUI toolkit).
HEAVY = ("gmsh", "matplotlib", "PIL", "scipy", "skfem", "meshio", "pint", "tqdm")
FORBIDDEN = {"fem": ("gmsh", "matplotlib"), "advisor": ("matplotlib", "PIL", "gmsh")}

_FOOTPRINT = (
    "import sys, time, json; started = time.perf_counter(); import {package}; "
    "seconds = time.perf_counter() - started; "
    "print(json.dumps([seconds, sorted({{m.split('.')[0] for m in sys.modules}})]))"
)


def command_seconds(arguments: list[str], runs: int, results: str = "") -> dict:
    """Median, fastest and slowest wall time in s of ``runs`` runs of the command, the median
    CPU time of the child, and the slowest imports of one run under ``-X importtime``."""
    with tempfile.TemporaryDirectory(prefix="soakwise-startup-") as scratch:
        command = [sys.executable, "-m", "advisor.cli"]
        command += [a.format(out=scratch, results=results) for a in arguments]
        times, cpu = [], []
        for run in range(runs + 1):  # the first run warms the file cache and is not counted
            import resource  # Unix only: imported where it is used

            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            started = time.perf_counter()
            done = subprocess.run(command, cwd=ROOT, capture_output=True, text=True, timeout=120)
            seconds = time.perf_counter() - started
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            if done.returncode != 0:
                raise RuntimeError(f"{' '.join(command)} failed: {done.stderr.strip()}")
            if run:
                times.append(seconds)
                cpu.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
        traced = subprocess.run(
            [sys.executable, "-X", "importtime", *command[1:]],
            cwd=ROOT,
            capture_output=True,
            text=True,
            timeout=120,
        )
    return {
        "median": statistics.median(times),
        "fastest": min(times),
        "slowest": max(times),
        "cpu_median": statistics.median(cpu),
        "slowest_imports": slowest_imports(traced.stderr),
    }


def slowest_imports(trace: str, count: int = 5) -> list[tuple[str, float]]:
    """The top-level imports (as ``-X importtime`` prints them) with the largest cumulative
    times, in s."""
    found = []
    for line in trace.splitlines():
        if not line.startswith("import time:") or "cumulative" in line:
            continue
        _, cumulative, name = line[len("import time:") :].split("|")
        if not name.startswith(" ") or name.startswith("  "):
            continue  # nested: counted in its parent
        found.append((name.strip(), int(cumulative) / 1e6))
    return sorted(found, key=lambda item: item[1], reverse=True)[:count]


def results_folder(scratch: str) -> str:
    """A results folder of the quench-bar starter for ``show`` (made by ``run``)."""
    folder = str(Path(scratch) / "results")
    subprocess.run(
        [sys.executable, "-m", "advisor.cli", "run", str(STARTER), "--out", folder],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=600,
        check=True,
    )
    return folder


def import_footprint(package: str) -> dict:
    """Import wall time in s and the heavy packages a fresh ``import package`` loads."""
    done = subprocess.run(
        [sys.executable, "-c", _FOOTPRINT.format(package=package)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    seconds, loaded = json.loads(done.stdout.strip().splitlines()[-1])
    return {"seconds": seconds, "heavy": [name for name in HEAVY if name in loaded]}


def task_startup(params: dict, reporter) -> dict:
    runs = params.get("runs", 5)
    commands = {}
    with tempfile.TemporaryDirectory(prefix="soakwise-startup-") as scratch:
        results = results_folder(scratch)
        for name, arguments in COMMANDS.items():
            commands[name] = command_seconds(arguments, runs, results)
            reporter.update(commands=commands)
    imports = {package: import_footprint(package) for package in PACKAGES}
    return {"runs": runs, "commands": commands, "imports": imports}


def startup_targets(outcomes, target) -> list[dict]:
    """The start-up targets from the ``startup`` task; ``target`` builds one row."""
    found = [o for o in outcomes if o.meta.get("case") == "startup"]
    if not found:
        return []
    outcome = found[-1]
    data = outcome.data
    rows = []
    for name in COMMANDS:
        measured = (data.get("commands") or {}).get(name)
        rows.append(
            target(
                f"{name} starts in < {LIMIT_SECONDS} s (median of {data.get('runs', '?')})",
                f"< {LIMIT_SECONDS} s",
                "-" if measured is None else f"{measured['median']:.3g} s",
                None if measured is None else measured["median"] < LIMIT_SECONDS,
                ""
                if measured is None
                else (
                    f"fastest {measured['fastest']:.3g} s, slowest {measured['slowest']:.3g} s, "
                    f"CPU {measured.get('cpu_median', float('nan')):.3g} s; slowest imports: "
                    + ", ".join(
                        f"{name} {seconds:.3g} s"
                        for name, seconds in measured.get("slowest_imports", [])[:3]
                    )
                ),
            )
        )
    for package, forbidden in FORBIDDEN.items():
        footprint = (data.get("imports") or {}).get(package)
        loaded = None if footprint is None else [m for m in forbidden if m in footprint["heavy"]]
        rows.append(
            target(
                f"import {package} loads none of {', '.join(forbidden)}",
                "none",
                "-" if loaded is None else (", ".join(loaded) or "none"),
                None if loaded is None else not loaded,
                ""
                if footprint is None
                else f"{footprint['seconds']:.3g} s; heavy: {', '.join(footprint['heavy'])}",
            )
        )
    return rows


def describe(data: dict) -> str:
    """One line for the table of other tasks."""
    commands = data.get("commands") or {}
    imports = data.get("imports") or {}
    parts = [
        f"{name} {value['median']:.3g} s (CPU {value.get('cpu_median', float('nan')):.3g} s)"
        for name, value in commands.items()
    ]
    parts += [
        f"import {package} {value['seconds']:.3g} s [{' '.join(value['heavy']) or '-'}]"
        for package, value in imports.items()
    ]
    return "; ".join(parts)
