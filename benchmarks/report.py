"""Turn the run's outcomes into rows, ratios and targets; print them; shape the JSON."""

from __future__ import annotations

import json
import math
import time

from .peers import peer_rows, print_peers

SHIPPED, WHAT_IF = "soakwise", "soakwise, SuperLU"
SCRIPT, IVP = "(a) spsolve script", "(b) solve_ivp BDF"


def _per_step(outcome) -> tuple[float | None, bool]:
    """Per-step seconds and whether it comes from a partial (timed-out) run."""
    d = outcome.data
    if outcome.status == "done" and d.get("per_step_seconds") is not None:
        return d["per_step_seconds"], False
    progress = d.get("progress")
    if progress and progress.get("steps_since_first", 0) > 0:
        return progress["seconds_since_first"] / progress["steps_since_first"], True
    return None, False


def _rss(outcome) -> float | None:
    d = outcome.data
    value = d.get("peak_rss_solve_bytes") or d.get("peak_rss_bytes")
    if value is None and outcome.meta.get("task") == "demo":
        value = outcome.ru_maxrss_bytes
    return value


def best_bandwidth(outcomes) -> dict | None:
    found = [o.data for o in outcomes if o.meta.get("case") == "bandwidth" and o.status == "done"]
    if not found:
        return None
    return {
        "read_bytes_per_s": max(d["read_bytes_per_s"] for d in found),
        "copy_bytes_per_s": max(d["copy_bytes_per_s"] for d in found),
        "array_bytes": found[0]["array_bytes"],
        "passes": len(found),
    }


def solver_rows(suite, bandwidth) -> list[dict]:
    runner = suite.r
    rows = []
    for key in runner.order:
        outcome = runner.outcomes[key]
        meta, d = outcome.meta, outcome.data
        if meta.get("task") not in ("soakwise", "script", "ivp"):
            continue
        per_step, partial = _per_step(outcome)
        row = {
            "key": key,
            "case": meta.get("case", key),
            "variant": meta.get("variant"),
            "method": meta.get("method", "fixed" if meta.get("task") != "ivp" else "ivp"),
            "status": outcome.status,
            "nodes": d.get("nodes"),
            "steps": d.get("steps") if not partial else d.get("progress", {}).get("steps"),
            "per_step_seconds": per_step,
            "per_step_partial": partial,
            "total_seconds": d.get("wall_seconds", d.get("total_seconds")),
            "cpu_seconds": (d.get("timers") or {}).get("cpu_seconds"),
            "factorisations": d.get("factorisations", d.get("factors", {}).get("factorisations")),
            "peak_rss_bytes": _rss(outcome),
            "error": d.get("error") if isinstance(d.get("error"), float) else None,
            "reason": d.get("reason"),
        }
        if outcome.status == "timed out":
            row["reason"] = f"time limit {d.get('timeout_seconds', 0):.0f} s"
        elif outcome.status not in ("done", "skipped") and isinstance(d.get("error"), str):
            row["reason"] = d["error"].strip().splitlines()[-1][:120]
        factor = d.get("factor")
        if factor:
            row["factor_bytes"] = factor["factor_bytes"]
            row["factor_nnz"] = factor["nnz_L"] + factor["nnz_U"]
            row["factor_estimated"] = bool(factor.get("estimated"))
            row["symmetric_solver"] = d.get("symmetric_solver")
            row["solve_only_seconds"] = factor["solve_only_seconds"]
        factors = d.get("factors") or {}
        row["solves"] = (d.get("stats") or {}).get("solves")  # the solver's own count
        if factors.get("solves"):
            row["triangular_solve_per_step_seconds"] = factors["solve_seconds"] / max(
                d.get("steps") or factors["solves"], 1
            )
        timers = d.get("timers") or {}
        if timers.get("record_seconds") is not None and d.get("steps"):
            row["record_per_step_seconds"] = timers["record_seconds"] / d["steps"]
        if d.get("vtk"):
            row["vtk"] = d["vtk"]
        if bandwidth and row.get("factor_bytes"):
            _floors(row, per_step, bandwidth["read_bytes_per_s"])
        rows.append(row)
    # ratios against (a) of the same case
    scripts = {r["case"]: r for r in rows if r["variant"] == SCRIPT and r["per_step_seconds"]}
    for r in rows:
        base = scripts.get(r["case"])
        if base and r["per_step_seconds"] and r["variant"] != SCRIPT:
            r["speed_up_vs_script"] = base["per_step_seconds"] / r["per_step_seconds"]
    return rows


def _floors(row: dict, per_step: float | None, read_bytes_per_s: float) -> None:
    """The factor's bytes read once, and the bytes a forward and a backward solve read (a
    Cholesky solve reads L twice: L·y = b runs down its columns, Lᵀ·x = y back up them, and
    L does not stay in the cache between them; an LU solve reads L and U once each), over
    the read bandwidth: the two floors, and the step and the solve against each."""
    bound = row["factor_bytes"] / read_bytes_per_s
    reads = 2 if row.get("symmetric_solver") == "cholesky" else 1
    row["bound_seconds"] = bound
    row["solve_bound_seconds"] = reads * bound
    row["solve_only_over_bound"] = row["solve_only_seconds"] / bound
    row["solve_only_over_solve_bound"] = row["solve_only_seconds"] / (reads * bound)
    if per_step:
        row["per_step_over_bound"] = per_step / bound
        row["per_step_over_solve_bound"] = per_step / (reads * bound)


def _final_plunge(rows, method, variant) -> dict | None:
    """The last (tightest) rung run for a method: the one after any retries."""
    found = [
        r
        for r in rows
        if r["case"].startswith("plunge") and r["method"] == method and r["variant"] == variant
    ]
    return found[-1] if found else None


def _find(rows, case, variant) -> dict | None:
    for r in rows:
        if r["case"] == case and r["variant"] == variant:
            return r
    return None


def _target(name, required, measured, met, detail, what_if=None) -> dict:
    return {
        "target": name,
        "required": required,
        "measured": measured,
        "met": met,
        "detail": detail,
        "what_if": what_if,
    }


def _fmt_ratio(x) -> str:
    return "-" if x is None else f"{x:.3g}x"


def evaluate_targets(suite, rows, outcomes, bandwidth) -> list[dict]:
    a = suite.args
    targets = []
    big = min(a.sizes, key=lambda n: abs(math.log(n / 1e5)))  # the size nearest 100k
    case = f"square-{_short(big)}"

    # 1. per step at 100k ≥ 30× faster than (a)
    script = _find(rows, case, SCRIPT)
    for_variant = {}
    for variant in (SHIPPED, WHAT_IF):
        r = _find(rows, case, variant)
        if r and script and r.get("per_step_seconds") and script.get("per_step_seconds"):
            for_variant[variant] = script["per_step_seconds"] / r["per_step_seconds"]
    shipped = _find(rows, case, SHIPPED)
    value = for_variant.get(SHIPPED)
    targets.append(
        _target(
            f"per step at {_short(big)} nodes >= 30x faster than (a)",
            ">= 30x",
            _fmt_ratio(value),
            _verdict(value, lambda v: v >= 30, shipped),
            _why(shipped) if value is None else f"{value / 30:.2f} of the target ratio",
            _fmt_ratio(for_variant.get(WHAT_IF)),
        )
    )

    # 2. within 2× of factor bytes ÷ bandwidth
    def bound_ratio(variant):
        r = _find(rows, case, variant)
        return None if not r else r.get("per_step_over_bound")

    value = bound_ratio(SHIPPED)
    targets.append(
        _target(
            f"per step at {_short(big)} nodes within 2x of factor bytes / bandwidth",
            "<= 2x",
            _fmt_ratio(value),
            _verdict(value, lambda v: v <= 2, shipped),
            _why(shipped)
            if value is None
            else (
                f"triangular solve alone {shipped.get('solve_only_over_bound', math.nan):.2f}x; "
                "against the bytes a forward and backward solve read: step "
                f"{shipped.get('per_step_over_solve_bound', math.nan):.2f}x, solve "
                f"{shipped.get('solve_only_over_solve_bound', math.nan):.2f}x"
            ),
            _fmt_ratio(bound_ratio(WHAT_IF)),
        )
    )

    # 3. plunge: ≥ 10× faster than (b), ≥ 10× fewer steps than the fixed step. Judged on
    # exponential steps (what soakwise uses for a linear model with constant conditions),
    # with adaptive Crank–Nicolson beside them.
    ivp = _final_plunge(rows, "ivp", IVP)
    found: dict = {}
    for label, variant in (("shipped", SHIPPED), ("what-if", WHAT_IF)):
        fixed = _final_plunge(rows, "fixed", variant)
        for method in ("exponential", "adaptive"):
            run = _final_plunge(rows, method, variant)
            speed = steps = solves = None
            if run and ivp and run.get("total_seconds") and ivp.get("total_seconds"):
                speed = ivp["total_seconds"] / run["total_seconds"]
            if (
                run
                and fixed
                and run.get("steps")
                and fixed.get("steps")
                and (run["status"] == fixed["status"] == "done")
            ):
                steps = fixed["steps"] / run["steps"]
                if run.get("solves") and fixed.get("solves"):
                    solves = fixed["solves"] / run["solves"]
            found[label, method] = (speed, steps, solves, run)
    chosen = "exponential" if found["shipped", "exponential"][3] else "adaptive"
    shipped_speed, shipped_steps, shipped_solves, shipped_run = found["shipped", chosen]
    what_if_speed, what_if_steps, _, _ = found["what-if", chosen]
    other = "adaptive" if chosen == "exponential" else "exponential"
    other_speed, other_steps, _, other_run = found["shipped", other]
    accuracy = f"{a.accuracy:.2%}"
    beside = (
        f"; {other} steps: {_fmt_ratio(other_speed)} and {_fmt_ratio(other_steps)} fewer steps, "
        f"error {_pct(other_run.get('error'))}"
        if other_run
        else ""
    )
    detail = (
        _why(shipped_run)
        if shipped_speed is None
        else (
            f"{chosen} steps, errors: soakwise {_pct(shipped_run.get('error'))}, (b) "
            f"{_pct(ivp.get('error') if ivp else None)}" + beside
        )
    )
    targets.append(
        _target(
            f"plunge to 99 % at {_short(a.plunge_nodes)} nodes to {accuracy}: "
            ">= 10x faster than (b)",
            ">= 10x",
            _fmt_ratio(shipped_speed),
            _verdict(shipped_speed, lambda v: v >= 10, shipped_run),
            detail,
            _fmt_ratio(what_if_speed),
        )
    )
    targets.append(
        _target(
            f"plunge: >= 10x fewer steps than the fixed step reaching {accuracy}",
            ">= 10x",
            _fmt_ratio(shipped_steps),
            _verdict(shipped_steps, lambda v: v >= 10, shipped_run),
            _why(shipped_run)
            if shipped_steps is None
            else f"{chosen} steps; triangular solves {_fmt_ratio(shipped_solves)} fewer",
            _fmt_ratio(what_if_steps),
        )
    )

    # 4. 1M × 1000 steps < 5 min and < 6 GB
    largest = max(a.sizes)
    case = f"square-{_short(largest)}"
    for label, limit, unit, field_name in (
        ("wall", 180.0, "s", "total_seconds"),
        ("peak RSS", 4e9, "GB", "peak_rss_bytes"),
    ):
        values = {}
        for variant in (SHIPPED, WHAT_IF):
            r = _find(rows, case, variant)
            if r and r["status"] == "done" and r.get(field_name):
                values[variant] = r[field_name]
        shown = {v: (x if unit == "s" else x / 1e9) for v, x in values.items()}
        r = _find(rows, case, SHIPPED)
        value = shown.get(SHIPPED)
        targets.append(
            _target(
                f"{_short(largest)} nodes x {a.steps} steps with fields on disk: {label} < "
                f"{limit if unit == 's' else limit / 1e9:g} {unit}",
                f"< {limit if unit == 's' else limit / 1e9:g} {unit}",
                "-" if value is None else f"{value:.3g} {unit}",
                _verdict(values.get(SHIPPED), (lambda v, cap=limit: v < cap), r),
                _why(r)
                if value is None
                else f"{values[SHIPPED] / limit:.2f} of the limit"
                + (
                    f"; CPU time of the solve {r['cpu_seconds']:.3g} s"
                    if unit == "s" and r.get("cpu_seconds")
                    else ""
                ),
                "-" if WHAT_IF not in shown else f"{shown[WHAT_IF]:.3g} {unit}",
            )
        )

    # 5. meshing
    meshing = [o for o in outcomes if o.meta.get("case") == "meshing"]
    if meshing:
        o = meshing[-1]
        s = o.data.get("mesh_seconds")
        targets.append(
            _target(
                f"meshing {_short(a.mesh_triangles)} triangles through geometries < 30 s",
                "< 30 s",
                "-" if s is None else f"{s:.3g} s ({o.data.get('triangles', 0):,} triangles)",
                None if s is None else s < 30,
                ""
                if s is None
                else (
                    f"gmsh generate {o.data.get('gmsh_generate_seconds', math.nan):.3g} s of it"
                ),
            )
        )
    # 6. demo
    demos = [o for o in outcomes if o.meta.get("case") == "demo"]
    if demos:
        first = demos[0]
        targets.append(
            _target(
                "soakwise demo from a cold start < 10 s",
                "< 10 s",
                f"{first.process_seconds:.3g} s",
                first.status == "done" and first.process_seconds < 10,
                ", ".join(
                    f"run {o.meta.get('run')}: {o.process_seconds:.3g} s ({o.status})"
                    for o in demos
                ),
            )
        )
    # 7. field writing
    for r in rows:
        if r.get("vtk") and r.get("total_seconds"):
            share = r["vtk"]["seconds"] / r["total_seconds"]
            targets.append(
                _target(
                    f"VTK writing at {_short(r['nodes'])} nodes < 10 % of the solve",
                    "< 10 %",
                    f"{share:.1%}",
                    share < 0.10,
                    f"{r['vtk']['frames']} frames, {r['vtk']['per_frame_seconds']:.3g} s each, "
                    f"solve {r['total_seconds']:.3g} s ({r['variant']})",
                )
            )
    # 8. start-up of the small commands, and what importing the packages loads
    from .startup import startup_targets
    from .study import study_targets
    from .whole_run import whole_run_targets

    return (
        targets
        + startup_targets(outcomes, _target)
        + study_targets(outcomes, _target)
        + whole_run_targets(outcomes, _target)
    )


def _verdict(value, passes, row) -> bool | None:
    """True/False when measured; False when the shipped run could not finish; else None."""
    if value is not None:
        return bool(passes(value))
    if row and row.get("status") in ("timed out", "out of memory", "failed", "skipped"):
        return False
    return None


def _why(row) -> str:
    if not row:
        return "not run"
    if row.get("status") == "done":
        return ""
    return f"{row.get('status')}: {row.get('reason') or ''}".strip()


def _pct(x) -> str:
    return "-" if x is None else f"{100 * x:.3g} %"


def _short(n) -> str:
    from .cli import short

    return short(n)


def build_report(args, suite, machine, source, started) -> dict:
    outcomes = [suite.r.outcomes[k] for k in suite.r.order]
    bandwidth = best_bandwidth(outcomes)
    rows = solver_rows(suite, bandwidth)
    targets = evaluate_targets(suite, rows, outcomes, bandwidth)
    profile = next((o for o in outcomes if o.meta.get("case") == "profile"), None)
    calibration = suite.r.outcomes.get("plunge-calibration")
    return {
        "command": "python -m benchmarks " + " ".join(_argv_of(args)),
        "started": time.strftime("%Y-%m-%d %H:%M:%S", time.localtime(started)),
        "seconds": time.time() - started,
        "settings": {k: v for k, v in vars(args).items() if k != "output"},
        "machine": machine,
        "source": source,
        "plunge_end_time_seconds": suite.end,
        "bandwidth": bandwidth,
        "rows": rows,
        "peers": peer_rows(outcomes),
        "targets": targets,
        "profile": None
        if profile is None
        else {"status": profile.status, "variant": profile.meta.get("variant"), **profile.data},
        "calibration": None if calibration is None else calibration.data,
        "order": list(suite.r.order),
        "tasks": {
            k: {
                "status": o.status,
                "process_seconds": o.process_seconds,
                "ru_maxrss_bytes": o.ru_maxrss_bytes,
                "meta": o.meta,
                "data": o.data,
            }
            for k, o in suite.r.outcomes.items()
        },
    }


def raw_outcomes(args, suite, machine, started) -> dict:
    """Everything measured, before any table is made (for --rerender after a crash)."""
    return {
        "started": time.strftime("%Y-%m-%d %H:%M:%S", time.localtime(started)),
        "seconds": time.time() - started,
        "command": "python -m benchmarks " + " ".join(_argv_of(args)),
        "settings": {k: v for k, v in vars(args).items() if k != "output"},
        "machine": machine,
        "source": {},
        "plunge_end_time_seconds": suite.end,
        "tasks": {
            k: {
                "status": o.status,
                "process_seconds": o.process_seconds,
                "ru_maxrss_bytes": o.ru_maxrss_bytes,
                "meta": o.meta,
                "data": o.data,
            }
            for k, o in suite.r.outcomes.items()
        },
        "order": list(suite.r.order),
    }


def reload_suite(earlier: dict, outcome_type):
    """A stand-in for the Suite of an earlier run, rebuilt from its JSON."""
    from types import SimpleNamespace

    outcomes = {
        k: outcome_type(
            t["status"], t["data"], t["process_seconds"], t["ru_maxrss_bytes"], t["meta"]
        )
        for k, t in earlier["tasks"].items()
    }
    order = earlier.get("order") or list(outcomes)
    args = SimpleNamespace(**earlier["settings"])
    runner = SimpleNamespace(outcomes=outcomes, order=order)
    return SimpleNamespace(args=args, r=runner, end=earlier["plunge_end_time_seconds"])


def _argv_of(args) -> list[str]:
    import sys

    return sys.argv[1:]


def _s(x, digits=3) -> str:
    if x is None:
        return "-"
    if x >= 100:
        return f"{x:.0f}"
    return f"{x:.{digits}g}"


def _ms(x) -> str:
    return "-" if x is None else f"{x * 1e3:.3g}"


def _mb(x) -> str:
    return "-" if x is None else f"{x / 1e6:.0f}"


def print_report(report: dict) -> None:
    m, bw = report["machine"], report["bandwidth"]
    print(
        f"\nsoakwise benchmarks — {report['started']}, {report['seconds']:.0f} s, "
        f"{m.get('cpu_model', '?')}, {m.get('cpus')} cpus, load {m['load_average_1min']:.2f}"
    )
    print(f"thread variables: {m['thread_variables']}")
    print(f"source: {report['source']}")
    if bw:
        print(
            f"memory bandwidth, one core: read {bw['read_bytes_per_s'] / 1e9:.2f} GB/s, "
            f"copy {bw['copy_bytes_per_s'] / 1e9:.2f} GB/s "
            f"({bw['array_bytes'] / 1e9:.2f} GB array, best of {bw['passes']} passes)"
        )
    digests = {
        json.dumps(t["data"].get("source_digest"), sort_keys=True)
        for t in report["tasks"].values()
        if t["data"].get("source_digest")
    }
    if len(digests) > 1:
        print(f"NOTE: the solver's files changed during the run ({len(digests)} versions seen)")
    print(f"plunge end (centre 99 % of the way): {report['plunge_end_time_seconds']:.1f} s\n")

    header = (
        "case",
        "variant",
        "nodes",
        "steps",
        "ms/step",
        "total s",
        "LU",
        "RSS MB",
        "error %",
        "vs (a)",
        "factor MB",
        "solve ms",
        "floor ms",
        "step/floor",
        "solve/floor",
        "read ms",
        "step/read",
        "solve/read",
        "status",
    )
    lines = [header]
    for r in report["rows"]:
        lines.append(
            (
                r["case"] + ("" if r["method"] in ("fixed", "ivp") else f" {r['method']}"),
                r["variant"] or "",
                _short(r["nodes"]),
                "-" if r["steps"] is None else str(r["steps"]),
                _ms(r["per_step_seconds"]) + ("*" if r["per_step_partial"] else ""),
                _s(r["total_seconds"]),
                "-" if r["factorisations"] is None else str(r["factorisations"]),
                _mb(r["peak_rss_bytes"]),
                "-" if r["error"] is None else f"{r['error'] * 100:.3f}",
                _fmt_ratio(r.get("speed_up_vs_script")),
                ("~" if r.get("factor_estimated") else "") + _mb(r.get("factor_bytes")),
                _ms(r.get("solve_only_seconds")),
                _ms(r.get("bound_seconds")),
                _fmt_ratio(r.get("per_step_over_bound")),
                _fmt_ratio(r.get("solve_only_over_bound")),
                _ms(r.get("solve_bound_seconds")),
                _fmt_ratio(r.get("per_step_over_solve_bound")),
                _fmt_ratio(r.get("solve_only_over_solve_bound")),
                r["status"] + (f" ({r['reason']})" if r.get("reason") else ""),
            )
        )
    widths = [max(len(str(line[i])) for line in lines) for i in range(len(header) - 1)]
    for line in lines:
        print(
            "  ".join(str(v).ljust(w) for v, w in zip(line[:-1], widths, strict=True))
            + "  "
            + line[-1]
        )
    print(
        "  * from the steps a run made before its time limit; ~ estimated (see README); floor:"
        " the factor's bytes read once; read: the bytes a forward and a backward solve read"
        " (a Cholesky factor twice), each at the read bandwidth"
    )

    others = [
        (k, t)
        for k, t in report["tasks"].items()
        if t["meta"].get("task") in ("startup", "mesh", "demo", "bandwidth", "study", "whole_run")
    ]
    if others:
        print()
        for k, t in others:
            d = t["data"]
            extra = ""
            if t["meta"].get("task") == "mesh" and "mesh_seconds" in d:
                extra = (
                    f"{d['nodes']:,} nodes, {d['triangles']:,} triangles in "
                    f"{d['mesh_seconds']:.3g} s (gmsh generate "
                    f"{d.get('gmsh_generate_seconds', math.nan):.3g} s)"
                )
            elif t["meta"].get("task") == "demo":
                extra = (
                    f"{t['process_seconds']:.3g} s, peak RSS "
                    f"{(t['ru_maxrss_bytes'] or 0) / 1e6:.0f} MB"
                )
            elif t["meta"].get("task") == "startup":
                from .startup import describe

                extra = describe(d)
            elif t["meta"].get("task") == "study":
                from .study import describe as describe_study

                extra = describe_study(d)
            elif t["meta"].get("task") == "whole_run":
                from .whole_run import describe as describe_whole_run

                extra = describe_whole_run(d)
            elif t["meta"].get("task") == "bandwidth" and "read_bytes_per_s" in d:
                extra = (
                    f"read {d['read_bytes_per_s'] / 1e9:.2f} GB/s, copy "
                    f"{d['copy_bytes_per_s'] / 1e9:.2f} GB/s"
                )
            print(f"{k:32s} {t['status']:10s} {extra}")

    print_peers(report.get("peers") or [])

    calibration = report.get("calibration")
    if calibration:
        print(
            f"\naccuracy settings found on {calibration.get('nodes')} nodes "
            f"(target {calibration.get('target'):.2%}):"
        )
        for method in ("exponential", "adaptive", "fixed", "ivp"):
            tried = calibration.get(method) or []
            text = ", ".join(
                f"{_setting(method, t)}: {t['error']:.3%} ({t['steps']} steps)" for t in tried
            )
            print(f"  {method:9s} {text}")

    profile = report.get("profile")
    if profile and profile.get("status") == "done":
        print(
            f"\nprofile of a step ({profile['variant']}, {profile['nodes']:,} nodes, "
            f"{profile['steps']} steps, cProfile): "
            f"{profile['profiled_per_step_seconds'] * 1e3:.3g} ms/step profiled"
        )
        for name, seconds in profile["categories_per_step_seconds"].items():
            share = seconds / profile["profiled_per_step_seconds"]
            print(f"  {name:45s} {seconds * 1e3:8.3f} ms  {share:6.1%}")
        print("  largest cumulative times in fem/ (include their callees):")
        for r in profile.get("top_fem_cumulative", [])[:12]:
            print(
                f"    {r['cumulative_seconds'] / profile['steps'] * 1e3:8.3f} ms/step  "
                f"{r['calls']:>8} calls  {r['function']}"
            )
        print("  largest own times:")
        for r in profile["top_own_time"][:10]:
            print(
                f"    {r['own_seconds'] / profile['steps'] * 1e3:8.3f} ms/step  "
                f"{r['calls']:>8} calls  {r['function']}"
            )

    print("\ntargets (the shipped code; what-if: the same run factorised by SuperLU):")
    for t in report["targets"]:
        verdict = {True: "MET", False: "NOT MET", None: "n/a"}[t["met"]]
        print(
            f"  [{verdict:7s}] {t['target']}: {t['measured']} (required {t['required']})"
            + (f"; {t['detail']}" if t["detail"] else "")
            + (f"; what-if {t['what_if']}" if t.get("what_if") not in (None, "-") else "")
        )


def _setting(method, t) -> str:
    if method in ("adaptive", "exponential"):
        return f"tol {t['fraction']:.0e}"
    if method == "fixed":
        return f"{t['steps']} steps"
    return f"rtol {t['rtol']:.0e}"
