"""The benchmark suite's command line: plan the tasks, run each in a fresh process, print the
table and the targets, write ``benchmarks/results.json``.

Every task runs as ``python -m benchmarks.worker`` in its own process (peak memory is that
process's own VmHWM), under a time limit that scales with its size and an address-space limit
(so a runaway factorisation fails with MemoryError instead of starving the machine). Figures
are compared only with figures from the same run.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import signal
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

from .machine import describe_machine, source_state

ROOT = Path(__file__).resolve().parent.parent
DEFAULT_OUTPUT = Path(__file__).resolve().parent / "results.json"
GROUPS = (
    "startup",
    "bandwidth",
    "demo",
    "meshing",
    "square",
    "plunge",
    "radiation",
    "angle",
    "profile",
    "study",
    "peers",
    "whole_run",
)
SHIPPED, WHAT_IF = "soakwise", "soakwise, SuperLU"
SCRIPT, IVP = "(a) spsolve script", "(b) solve_ivp BDF"


def count(text: str) -> int:
    """'10k' → 10000, '1M' → 1000000, '2500' → 2500."""
    match = re.fullmatch(r"\s*([0-9.]+)\s*([kKmM]?)\s*", text)
    if not match:
        raise argparse.ArgumentTypeError(f"expected a count like 10k, 1M or 2500, got {text!r}")
    scale = {"": 1, "k": 1_000, "m": 1_000_000}[match.group(2).lower()]
    return int(round(float(match.group(1)) * scale))


def counts(text: str) -> list[int]:
    return [count(part) for part in text.split(",") if part.strip()]


def short(n: int | None) -> str:
    if n is None:
        return "-"
    if n >= 1_000_000 and n % 100_000 == 0:
        return f"{n / 1e6:g}M"
    if n >= 1000:
        return f"{n / 1e3:.0f}k"
    return str(n)


def parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="python -m benchmarks",
        description="soakwise's benchmark suite: run it from the repository root.",
    )
    p.add_argument(
        "--only",
        default=",".join(GROUPS),
        help=f"comma-separated groups to run, from: {', '.join(GROUPS)}",
    )
    p.add_argument(
        "--quick",
        action="store_true",
        help="a smoke run of a few seconds: tiny sizes, in this process",
    )
    p.add_argument(
        "--sizes",
        type=counts,
        default=None,
        help="node counts of the square's fixed-step runs (default 10k,100k,1M)",
    )
    p.add_argument("--steps", type=int, default=None, help="fixed steps per run (1000)")
    p.add_argument("--plunge-nodes", type=count, default=None, help="plunge-to-99%% run (100k)")
    p.add_argument(
        "--calibration-nodes",
        type=count,
        default=None,
        help="mesh on which each method's accuracy setting is found (10k)",
    )
    p.add_argument(
        "--accuracy",
        type=float,
        default=1e-3,
        help="plunge accuracy, fraction of the initial difference (0.001)",
    )
    p.add_argument("--angle-nodes", type=count, default=None, help="L-profile with bore (200k)")
    p.add_argument("--radiation-nodes", type=count, default=None, help="radiating square (100k)")
    p.add_argument("--radiation-steps", type=int, default=None, help="its steps (20)")
    p.add_argument(
        "--mesh-triangles",
        type=count,
        default=None,
        help="triangles of the meshing benchmark (1M)",
    )
    p.add_argument(
        "--fields-nodes",
        type=count,
        default=None,
        help="size at which VTK writing is timed; one of --sizes (100k)",
    )
    p.add_argument("--profile-nodes", type=count, default=None, help="profiled run (100k)")
    p.add_argument("--profile-steps", type=int, default=None, help="its steps (200)")
    p.add_argument(
        "--script-steps",
        type=int,
        default=None,
        help="steps of (a) at 100k nodes, scaled inversely with size (5)",
    )
    p.add_argument("--bandwidth-gb", type=float, default=None, help="array size (1.0 GB)")
    p.add_argument(
        "--timeout",
        type=float,
        default=300.0,
        help="seconds allowed per task per 100k nodes (at least 120 s) (300)",
    )
    p.add_argument(
        "--memory-limit-gb",
        type=float,
        default=14.0,
        help="address-space limit of each task process, GB (14)",
    )
    p.add_argument(
        "--no-what-if",
        action="store_true",
        help="skip the same runs factorised by SuperLU (the what-if)",
    )
    p.add_argument(
        "--in-process",
        action="store_true",
        help="run tasks in this process (no per-task peak memory); --quick does",
    )
    p.add_argument("--output", type=Path, default=DEFAULT_OUTPUT, help="the JSON file")
    p.add_argument(
        "--peer-sizes",
        type=counts,
        default=None,
        help="node counts of the side-by-side plunge with other tools (10k,100k)",
    )
    p.add_argument("--peer-steps", type=int, default=None, help="their steps (100)")
    p.add_argument(
        "--rerender",
        type=Path,
        default=None,
        help="rebuild the table and --output from an earlier results(.raw).json (no runs)",
    )
    return p


FULL = {
    "sizes": [10_000, 100_000, 1_000_000],
    "steps": 1000,
    "plunge_nodes": 100_000,
    "calibration_nodes": 10_000,
    "angle_nodes": 200_000,
    "radiation_nodes": 100_000,
    "radiation_steps": 20,
    "mesh_triangles": 1_000_000,
    "fields_nodes": 100_000,
    "profile_nodes": 100_000,
    "profile_steps": 200,
    "script_steps": 5,
    "bandwidth_gb": 1.0,
    "peer_sizes": [10_000, 100_000],
    "peer_steps": 100,
}
QUICK = {
    "sizes": [1_000, 3_000],
    "steps": 40,
    "plunge_nodes": 2_000,
    "calibration_nodes": 1_000,
    "angle_nodes": 2_000,
    "radiation_nodes": 1_000,
    "radiation_steps": 3,
    "mesh_triangles": 10_000,
    "fields_nodes": 3_000,
    "profile_nodes": 1_000,
    "profile_steps": 20,
    "script_steps": 1,
    "bandwidth_gb": 0.2,
    "peer_sizes": [1_000],
    "peer_steps": 10,
}


# ---------------------------------------------------------------------------------------------
# Running tasks
# ---------------------------------------------------------------------------------------------


@dataclass
class Outcome:
    status: str
    data: dict = field(default_factory=dict)
    process_seconds: float = 0.0
    ru_maxrss_bytes: int | None = None
    meta: dict = field(default_factory=dict)


def run_process(command, timeout, memory_limit, log_path, cwd=ROOT) -> tuple[str, float, int]:
    """Run ``command``; return (status, wall seconds, ru_maxrss bytes of that child alone)."""
    limit = int(memory_limit) if memory_limit else None

    def limits():
        if limit:
            import resource  # Unix only: imported where it is used

            resource.setrlimit(resource.RLIMIT_AS, (limit, limit))

    with open(log_path, "wb") as log:
        started = time.perf_counter()
        process = subprocess.Popen(
            command,
            cwd=cwd,
            stdout=log,
            stderr=subprocess.STDOUT,
            stdin=subprocess.DEVNULL,
            preexec_fn=limits,
            start_new_session=True,
        )
        status = None
        while True:
            pid, code, usage = os.wait4(process.pid, os.WNOHANG)
            if pid:
                break
            if time.perf_counter() - started > timeout:
                os.killpg(process.pid, signal.SIGKILL)
                pid, code, usage = os.wait4(process.pid, 0)
                status = "timed out"
                break
            time.sleep(0.02)
        seconds = time.perf_counter() - started
    process.returncode = os.waitstatus_to_exitcode(code)  # keep Popen from waiting again
    if status is None:
        status = "done" if process.returncode == 0 else f"exit {process.returncode}"
    return status, seconds, int(usage.ru_maxrss) * 1024


class Runner:
    def __init__(self, args, workdir: Path):
        self.args = args
        self.workdir = workdir
        self.outcomes: dict[str, Outcome] = {}
        self.order: list[str] = []

    def timeout(self, nodes: int | None) -> float:
        return max(120.0, self.args.timeout * (nodes or 0) / 1e5)

    def run(self, key: str, task: str, params: dict, nodes: int | None = None, **meta) -> Outcome:
        params = {**params, "scratch": str(self.workdir)}
        note = f"[{time.strftime('%H:%M:%S')}] {key} ..."
        print(note, end=" ", flush=True, file=sys.stderr)
        if self.args.in_process:
            outcome = self._in_process(task, params)
        else:
            outcome = self._subprocess(key, task, params, self.timeout(nodes))
        outcome.meta = {"task": task, **meta}
        print(f"{outcome.status} ({outcome.process_seconds:.1f} s)", flush=True, file=sys.stderr)
        if outcome.status not in ("done",) and outcome.data.get("error"):
            print(outcome.data["error"].strip().splitlines()[-1], file=sys.stderr)
        self.outcomes[key] = outcome
        self.order.append(key)
        return outcome

    def _in_process(self, task: str, params: dict) -> Outcome:
        from .worker import Reporter, run_task

        started = time.perf_counter()
        reporter = Reporter(None)
        try:
            data = run_task(task, params, reporter)
            status = "done"
        except MemoryError:
            data, status = reporter.data, "out of memory"
        except Exception as error:  # a failed task is a row in the table, not the end
            data, status = {**reporter.data, "error": repr(error)}, "failed"
        for name in ("peak_rss_bytes", "peak_rss_solve_bytes"):
            data.pop(name, None)  # the parent's, not the task's
        return Outcome(status, data, time.perf_counter() - started)

    def _subprocess(self, key: str, task: str, params: dict, timeout: float) -> Outcome:
        out = self.workdir / f"{key}.json"
        command = [sys.executable, "-m", "benchmarks.worker", task, json.dumps(params), str(out)]
        status, seconds, maxrss = run_process(
            command, timeout, self.args.memory_limit_gb * 1e9, self.workdir / f"{key}.log"
        )
        data = json.loads(out.read_text()) if out.exists() else {}
        if status == "done" or data.get("status") in ("failed", "out of memory"):
            status = data.get("status", status)
        elif status == "timed out":
            data["timeout_seconds"] = timeout
        if status not in ("done", "timed out") and "error" not in data:
            log = (self.workdir / f"{key}.log").read_text(errors="replace")
            data["error"] = log[-2000:]
        return Outcome(status, data, seconds, maxrss)

    def run_command(self, key: str, command: list[str], timeout: float) -> Outcome:
        print(f"[{time.strftime('%H:%M:%S')}] {key} ...", end=" ", flush=True, file=sys.stderr)
        status, seconds, maxrss = run_process(
            command, timeout, None, self.workdir / f"{key}.log", cwd=self.workdir
        )
        print(f"{status} ({seconds:.1f} s)", flush=True, file=sys.stderr)
        outcome = Outcome(status, {"command": command}, seconds, maxrss)
        self.outcomes[key] = outcome
        self.order.append(key)
        return outcome


# ---------------------------------------------------------------------------------------------
# The plan
# ---------------------------------------------------------------------------------------------


def _used_cholesky(done: dict) -> bool:
    """Whether the shipped run factorised by Cholesky (then the what-if runs the same case
    with SuperLU, the path used before)."""
    shipped = done.get(SHIPPED)
    if shipped is None:
        return False
    # a run that timed out has reported its factorisations with its progress
    return bool(shipped.data.get("factors", {}).get("kinds", {}).get("cholesky"))


def script_steps(base: int, nodes: int) -> int:
    return int(min(50, max(1 if base <= 1 else 2, round(base * 1e5 / nodes))))


class Suite:
    def __init__(self, args, runner: Runner):
        from .cases import plunge_end_time

        self.args = args
        self.r = runner
        self.groups = set(args.only.split(","))
        self.what_if = not args.no_what_if
        self.end = plunge_end_time()
        self.meshes: dict[tuple[str, int], tuple[str, int]] = {}  # → (path, actual nodes)
        self.blocked_at: int | None = None  # shipped solver could not finish at this size

    # -- shared pieces -----------------------------------------------------------------------
    def mesh(self, shape: str, nodes: int) -> tuple[str, int] | None:
        key = (shape, nodes)
        if key not in self.meshes:
            path = self.r.workdir / f"{shape}-{nodes}.pickle"
            outcome = self.r.run(
                f"mesh-{shape}-{short(nodes)}",
                "mesh",
                {"shape": shape, "nodes": nodes, "out": str(path)},
                nodes,
                case=f"mesh-{shape}",
            )
            if outcome.status != "done":
                return None
            self.meshes[key] = (str(path), outcome.data["nodes"])
        return self.meshes[key]

    def shipped_allowed(self, nodes: int) -> bool:
        return self.blocked_at is None or nodes < self.blocked_at

    def note_shipped(self, outcome: Outcome, nodes: int) -> None:
        if outcome.status in ("timed out", "out of memory"):
            self.blocked_at = min(nodes, self.blocked_at or nodes)

    def soakwise(
        self, key: str, params: dict, nodes: int, variants=None, case=None, **meta
    ) -> dict:
        """Run the shipped solver (unless a smaller run already could not finish) and the
        ordering what-if; returns {variant: Outcome}."""
        done = {}
        for variant in variants or (SHIPPED, WHAT_IF):
            if variant == WHAT_IF and (not self.what_if or not _used_cholesky(done)):
                continue  # no what-if, or the shipped code already factorises by SuperLU
            if variant == SHIPPED and not self.shipped_allowed(nodes):
                done[variant] = Outcome(
                    "skipped",
                    {
                        "reason": f"the shipped solver did not finish at "
                        f"{short(self.blocked_at)} nodes"
                    },
                    meta={"task": "soakwise", "case": case or key, "variant": variant, **meta},
                )
                self.r.outcomes[f"{key}-{variant}"] = done[variant]
                self.r.order.append(f"{key}-{variant}")
                continue
            wrote_vtk = any(o.status == "done" and o.data.get("vtk") for o in done.values())
            outcome = self.r.run(
                f"{key}-{variant}",
                "soakwise",
                {
                    **params,
                    "what_if": variant == WHAT_IF,
                    "write_vtk": params.get("write_vtk", False) and not wrote_vtk,
                },
                nodes,
                case=case or key,
                variant=variant,
                **meta,
            )
            if variant == SHIPPED:
                self.note_shipped(outcome, nodes)
            done[variant] = outcome
        return done

    # -- groups ------------------------------------------------------------------------------
    def execute(self) -> None:
        a = self.args
        if "startup" in self.groups:  # first, while the machine is quiet
            self.r.run("startup", "startup", {"runs": 3 if a.quick else 5}, case="startup")
        if "whole_run" in self.groups:  # early too: the commands' wall times want a quiet machine
            starters = {"starters": ["quench-bar"]} if a.quick else {}
            self.r.run("whole-run", "whole_run", {"runs": 1, **starters}, case="whole_run")
        if "bandwidth" in self.groups:
            self.r.run(
                "bandwidth-1",
                "bandwidth",
                {"gigabytes": a.bandwidth_gb, "repeats": 3 if a.quick else 7},
                case="bandwidth",
            )
        if "demo" in self.groups:
            self.demo()
        if "meshing" in self.groups:
            self.r.run(
                f"meshing-{short(a.mesh_triangles)}-triangles",
                "mesh",
                {"shape": "square", "triangles": a.mesh_triangles},
                a.mesh_triangles // 2,
                case="meshing",
            )
        square_sizes = sorted(a.sizes)
        if "square" in self.groups:
            for nodes in square_sizes:
                if nodes > 200_000:
                    continue  # the largest runs come last
                self.square(nodes)
        if "plunge" in self.groups:
            self.plunge()
        if "radiation" in self.groups:
            self.radiation()
        if "angle" in self.groups:
            self.angle()
        if "profile" in self.groups:
            self.profile()
        if "study" in self.groups:
            quick = {"cases": 8, "mesh_size": "4 mm"} if a.quick else {"cases": 64}
            self.r.run("study-sweep", "study", quick, case="study")
        if "peers" in self.groups:
            self.peers()
        if "square" in self.groups:
            for nodes in square_sizes:
                if nodes > 200_000:
                    self.square(nodes)
        if "bandwidth" in self.groups:
            self.r.run(
                "bandwidth-2",
                "bandwidth",
                {"gigabytes": a.bandwidth_gb, "repeats": 3 if a.quick else 7},
                case="bandwidth",
            )

    def demo(self) -> None:
        import shutil

        executable = shutil.which("soakwise")
        command = (
            [executable]
            if executable
            else [
                sys.executable,
                "-c",
                "import sys; from advisor.cli import main; sys.exit(main())",
            ]
        )
        for k in (1, 2) if not self.args.quick else (1,):
            target = self.r.workdir / f"demo-{k}"
            outcome = self.r.run_command(
                f"demo-{k}", [*command, "demo", "--out", str(target)], 300
            )
            outcome.meta = {"task": "demo", "case": "demo", "run": k}

    def square(self, nodes: int) -> None:
        a = self.args
        found = self.mesh("square", nodes)
        if found is None:
            return
        path, actual = found
        params = {
            "mesh": path,
            "model": "square",
            "end_time": self.end,
            "steps": a.steps,
            "outputs": 50,
            "field_folder": True,
            "exact": True,
            "factor_analysis": True,
        }
        key = f"square-{short(nodes)}"
        vtk = nodes == a.fields_nodes
        self.soakwise(key, {**params, "write_vtk": vtk}, actual)
        self.r.run(
            f"{key}-script",
            "script",
            {
                "mesh": path,
                "model": "square",
                "end_time": self.end,
                "steps_of_run": a.steps,
                "steps": script_steps(a.script_steps, actual),
            },
            actual,
            case=key,
            variant=SCRIPT,
        )

    def peers(self) -> None:
        """The plunge by soakwise and by the tools a user would pick instead; a tool that is
        not installed is a row saying so."""
        from .peers import PEERS, missing

        a = self.args
        for nodes in sorted(a.peer_sizes):
            found = self.mesh("square", nodes)
            if found is None:
                continue
            path, actual = found
            for peer in PEERS:
                key = f"peers-{short(nodes)}-{peer.split()[0].lower()}"
                meta = {"task": "peer", "case": f"peers-{short(nodes)}", "variant": peer}
                reason = missing(peer)
                if reason:
                    self.r.outcomes[key] = Outcome("skipped", {"reason": reason}, meta=meta)
                    self.r.order.append(key)
                    continue
                params = {
                    "peer": peer,
                    "mesh": path,
                    "nodes": actual,
                    "end_time": self.end,
                    "steps": a.peer_steps,
                }
                self.r.run(key, "peer", params, actual, case=meta["case"], variant=peer)

    def plunge(self) -> None:
        a = self.args
        calibration = self.mesh("square", a.calibration_nodes)
        found = self.mesh("square", a.plunge_nodes)
        if calibration is None or found is None:
            return
        cal = self.r.run(
            "plunge-calibration",
            "calibrate",
            {"mesh": calibration[0], "end_time": self.end, "target": a.accuracy},
            max(calibration[1] * 50, 100_000),
        )
        if cal.status != "done":
            return
        from .cases import ADAPTIVE_LADDER, FIXED_LADDER, IVP_LADDER

        path, actual = found
        key = f"plunge-{short(a.plunge_nodes)}"
        base = {
            "mesh": path,
            "model": "square",
            "end_time": self.end,
            "outputs": 50,
            "exact": True,
            "factor_analysis": True,
        }

        def chosen(method) -> int | None:
            tried = cal.data.get(method) or []
            passing = [t["rung"] for t in tried if t["error"] <= a.accuracy]
            return passing[0] if passing else None

        def with_retries(method, run_rung, ladder_length) -> None:
            rung = chosen(method)
            if rung is None:
                return
            for _ in range(3):  # tighten when the full-size run misses the accuracy
                outcomes = run_rung(rung)
                errors = [o.data.get("error") for o in outcomes if o.status == "done"]
                if not errors or min(errors) <= a.accuracy or rung + 1 >= ladder_length:
                    return
                rung += 1

        def adaptive(rung):
            fraction = ADAPTIVE_LADDER[rung]
            from .cases import TEMPERATURE_DROP

            return list(
                self.soakwise(
                    f"{key}-adaptive-r{rung}",
                    {**base, "adaptive": True, "tolerance": fraction * TEMPERATURE_DROP},
                    actual,
                    case=key,
                    method="adaptive",
                    rung=rung,
                ).values()
            )

        def exponential(rung):
            fraction = ADAPTIVE_LADDER[rung]
            from .cases import TEMPERATURE_DROP

            return list(
                self.soakwise(
                    f"{key}-exponential-r{rung}",
                    {**base, "method": "exponential", "tolerance": fraction * TEMPERATURE_DROP},
                    actual,
                    case=key,
                    method="exponential",
                    rung=rung,
                ).values()
            )

        def fixed(rung):
            return list(
                self.soakwise(
                    f"{key}-fixed-r{rung}",
                    {**base, "steps": FIXED_LADDER[rung]},
                    actual,
                    case=key,
                    method="fixed",
                    rung=rung,
                ).values()
            )

        def ivp(rung):
            return [
                self.r.run(
                    f"{key}-ivp-r{rung}",
                    "ivp",
                    {"mesh": path, "end_time": self.end, "rtol": IVP_LADDER[rung], "outputs": 50},
                    actual * 4,
                    case=key,
                    variant=IVP,
                    method="ivp",
                    rung=rung,
                )
            ]

        with_retries("exponential", exponential, len(ADAPTIVE_LADDER))
        with_retries("adaptive", adaptive, len(ADAPTIVE_LADDER))
        with_retries("fixed", fixed, len(FIXED_LADDER))
        with_retries("ivp", ivp, len(IVP_LADDER))

    def radiation(self) -> None:
        a = self.args
        found = self.mesh("square", a.radiation_nodes)
        if found is None:
            return
        path, actual = found
        self.soakwise(
            f"radiation-{short(a.radiation_nodes)}",
            {
                "mesh": path,
                "model": "radiating",
                "end_time": 30.0 * a.radiation_steps,
                "steps": a.radiation_steps,
                "outputs": 1,
                "factor_analysis": True,
            },
            actual,
        )

    def angle(self) -> None:
        a = self.args
        found = self.mesh("angle", a.angle_nodes)
        if found is None:
            return
        path, actual = found
        key = f"angle-{short(a.angle_nodes)}"
        end = 2.0 * a.steps
        self.soakwise(
            key,
            {
                "mesh": path,
                "model": "angle",
                "end_time": end,
                "steps": a.steps,
                "outputs": 50,
                "field_folder": True,
                "factor_analysis": True,
            },
            actual,
        )
        self.r.run(
            f"{key}-script",
            "script",
            {
                "mesh": path,
                "model": "angle",
                "end_time": end,
                "steps_of_run": a.steps,
                "steps": script_steps(a.script_steps, actual),
            },
            actual,
            case=key,
            variant=SCRIPT,
        )

    def profile(self) -> None:
        a = self.args
        found = self.mesh("square", a.profile_nodes)
        if found is None:
            return
        path, actual = found
        steps = a.profile_steps
        variant = SHIPPED if self.shipped_allowed(actual) or not self.what_if else WHAT_IF
        self.r.run(
            f"profile-{short(a.profile_nodes)}-{variant}",
            "profile",
            {
                "mesh": path,
                "model": "square",
                "end_time": self.end * steps / a.steps,
                "steps": steps,
                "outputs": max(1, steps // 20),
                "field_folder": True,
                "what_if": variant == WHAT_IF,
            },
            actual,
            case="profile",
            variant=variant,
        )


# ---------------------------------------------------------------------------------------------
# Entry point
# ---------------------------------------------------------------------------------------------


def main(argv: list[str] | None = None) -> int:
    args = parser().parse_args(argv)
    unknown = set(args.only.split(",")) - set(GROUPS)
    if unknown:
        parser().error(f"--only: unknown group(s) {sorted(unknown)}; choose from {GROUPS}")
    defaults = QUICK if args.quick else FULL
    for name, value in defaults.items():
        if getattr(args, name) is None:
            setattr(args, name, value)
    if args.quick:
        args.in_process = True
    from .report import build_report, print_report, raw_outcomes, reload_suite

    if args.rerender is not None:
        try:
            earlier = json.loads(args.rerender.read_text())
        except OSError as error:
            parser().error(f"--rerender: cannot read {args.rerender}: {error.strerror}")
        except json.JSONDecodeError as error:
            parser().error(
                f"--rerender: {args.rerender} line {error.lineno} column {error.colno}: "
                f"not JSON ({error.msg})"
            )
        suite = reload_suite(earlier, Outcome)
        source = earlier.get("source") or {**source_state(ROOT), "recorded": "at --rerender"}
        report = build_report(suite.args, suite, earlier["machine"], source, 0.0)
        report.update(started=earlier["started"], seconds=earlier["seconds"])
        report["command"] = earlier["command"]
        print_report(report)
        if args.output.resolve() != args.rerender.resolve() or "rows" in earlier:
            args.output.write_text(json.dumps(report, indent=1, default=str) + "\n")
            print(f"\nwritten: {args.output}")
        return 0
    started = time.time()
    with tempfile.TemporaryDirectory(prefix="soakwise-benchmarks-") as work:
        runner = Runner(args, Path(work))
        suite = Suite(args, runner)
        machine = describe_machine()
        try:
            suite.execute()
        finally:  # keep what was measured even if a later step breaks
            args.output.parent.mkdir(parents=True, exist_ok=True)
            raw = args.output.with_suffix(".raw.json")
            record = raw_outcomes(args, suite, machine, started)
            record["source"] = source_state(ROOT)
            raw.write_text(json.dumps(record, default=str))
        report = build_report(args, suite, machine, source_state(ROOT), started)
    print_report(report)
    args.output.parent.mkdir(parents=True, exist_ok=True)
    args.output.write_text(json.dumps(report, indent=1, default=str) + "\n")
    print(f"\nwritten: {args.output}")
    return 0
