"""summary.json: the inputs, the advisor's answers and the run's own checks, machine-readable.

Every number carries its unit in its key (``_s``, ``_degC``, ``_K``, ``_m``, ...).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

from fem import RunChecks, SolverStats, ThermalModel
from fem.interfaces import largest_jumps
from fem.schedules import schedule_data as _schedule

from ..analysis.assessment import Assessment
from ..analysis.surface_band import curve_conditions, surface_band
from ..caution import CAUTION
from .atomic import write_text
from .version import soakwise_version


def summary(assessment: Assessment, files: list[str]) -> dict:
    """The summary as plain JSON-ready data; ``files`` are the results folder's files."""
    solution = assessment.solution
    return {
        "soakwise_version": soakwise_version(),
        "caution": CAUTION,
        "inputs": _inputs(assessment),
        "biot_numbers": _biot_numbers(assessment),
        "lumped_models": _models(assessment),
        "slowest_mode": _slowest_mode(assessment),
        "lumped_errors": _lumped_errors(assessment),
        "energy_error_fraction": assessment.energy_error,
        "peak_internal_difference_K": assessment.peak_internal_difference,
        "peak_internal_difference_time_s": assessment.peak_internal_difference_time,
        "time_to_target_s": assessment.time_to_target,
        "stop_time_s": solution.stop_time,
        "run_ending": assessment.ending,
        "stop_reason": solution.stop_reason,
        "stages": _stages(assessment),
        "error_estimate": _error_estimate(assessment),
        "verdict": _verdict(assessment),
        "quench": _quench(assessment),
        "freezing": _freezing(assessment),
        "surface_curves": _surface_curves(assessment),
        "interfaces": _interfaces(assessment),
        "final": {
            "mean_degC": float(solution.mean[-1]),
            "minimum_degC": float(solution.minimum[-1]),
            "maximum_degC": float(solution.maximum[-1]),
        },
        "output_times_s": solution.output_times.tolist(),
        "checks": _checks(solution.checks),
        "solver": _solver(solution.stats),
        "files": files,
    }


def _inputs(assessment: Assessment) -> dict:
    """The section, materials, conditions, sources, probes and the run's settings."""
    model = assessment.solution.model
    return {
        "section": _section(model),
        "materials": {region: _material(m) for region, m in model.materials.items()},
        "boundaries": {name: _boundary(c) for name, c in model.boundaries.items()},
        "initial_temperature_degC": _initial(model.initial_temperature),
        "heat_sources_W_per_m3": {r: _schedule(q) for r, q in model.heat_sources.items()},
        "probes_m": {name: list(point) for name, point in model.probes.items()},
        "end_time_s": float(assessment.solution.times[-1]),
        "target_degC": assessment.target,
        "tolerance_fraction": assessment.verdict.tolerance,
    }


def _section(model: ThermalModel) -> dict:
    """The section's kind, sizes and mesh."""
    facts = model.section.facts
    return {
        "kind": "axisymmetric, whole solid of revolution"
        if facts.axisymmetric
        else "planar, per metre of depth",
        "area_m2": facts.area,
        "centroid_m": list(facts.centroid),
        "edge_lengths_m": facts.edge_lengths,
        "region_areas_m2": facts.region_areas,
        "volume_m3": facts.volume,
        "surface_areas_m2": facts.surface_areas,
        "symmetry_multiplier": facts.symmetry_multiplier,
        "mesh_nodes": int(model.section.mesh.p.shape[1]),
        "mesh_triangles": int(model.section.mesh.t.shape[1]),
        "element_order": model.element_order,
    }


def _biot_numbers(assessment: Assessment) -> list[dict]:
    return [
        {
            "name": b.name,
            "value": b.value,
            "range_over_run": [b.low, b.high],
            "length_m": b.length,
            "heat_transfer_coefficient_W_per_m2_K": b.heat_transfer_coefficient,
            "explanation": b.explanation,
            "per_region": b.regions,
        }
        for b in assessment.biot
    ]


def _slowest_mode(assessment: Assessment) -> dict:
    mode = assessment.mode
    return {
        "rate_per_s": mode.rate,
        "lumped_rate_per_s": mode.lumped_rate,
        "ratio": mode.ratio,
        "equivalent_coefficient_W_per_m2_K": mode.equivalent_coefficient,
        "core_to_mean": mode.core_to_mean,
    }


def _lumped_errors(assessment: Assessment) -> dict:
    return {
        key: {
            "largest_K": e.largest,
            "fraction_of_initial_difference": e.fraction,
            "time_s": e.time,
            "lumped_ahead": e.lumped_ahead,
        }
        for key, e in assessment.errors.items()
    }


def _error_estimate(assessment: Assessment) -> dict | None:
    """The run's own discretisation-error estimate: each answer ± its estimate, the space
    and time parts, the tolerance it is held to, and how it was found."""
    estimate = assessment.error_estimate
    if estimate is None:
        return None
    return {
        "method": estimate.method,
        "space_order": estimate.space_order,
        "time_order": estimate.time_order,
        "mesh_size_ratio": estimate.size_ratio,
        "seconds": estimate.seconds,
        "answers": {
            name: {
                "value": a.value,
                "unit": a.unit,
                "plus_minus": a.estimate,
                "space_part": a.space,
                "time_part": a.time,
                "allowed": a.allowed,
                "exceeds_tolerance": a.exceeds,
            }
            for name, a in estimate.answers.items()
        },
        "warnings": list(estimate.warnings),
    }


def _stages(assessment: Assessment) -> list[dict]:
    """Each stage of a staged target: its request, the field's arrival, pass or fail, the
    margin (s to spare; negative: late) and each lumped model's arrival and pass."""
    return [
        {
            "reach_degC": r.stage.reach,
            "at": r.stage.at,
            "by_s": r.stage.by,
            "within_s": r.stage.within,
            "start_s": r.start,
            "deadline_s": r.deadline,
            "reached_s": r.reached,
            "status": r.status,
            "passed": r.passed,
            "margin_s": r.margin,
            "lumped_reached_s": r.lumped,
            "lumped_passed": r.lumped_passed,
        }
        for r in assessment.stages
    ]


def _verdict(assessment: Assessment) -> dict:
    verdict = assessment.verdict
    return {
        "rating": verdict.rating,
        "lumped_adequate": verdict.adequate,
        "quantity": verdict.quantity,
        "error_fraction": verdict.error,
        "direction": verdict.direction,
        "advice": verdict.advice,
        "reasons": list(verdict.reasons),
        "recommended_model": verdict.recommended,
        "process": verdict.process,
        "process_inferred": verdict.process_inferred,
    }


def _quench(assessment: Assessment) -> dict | None:
    """The quench readings at the slowest point and the probes (None when not asked for);
    rates are cooling rates when ``cooling``, heating rates otherwise."""
    quench = assessment.quench
    if quench is None:
        return None
    return {
        "cooling": quench.cooling,
        "times_to_degC": list(quench.times_to),
        "cooling_range_degC": None if quench.cooling_range is None else list(quench.cooling_range),
        "histories": {
            name: {
                "largest_rate_K_per_s": curve.largest_rate,
                "largest_rate_temperature_degC": curve.largest_rate_temperature,
                "largest_rate_time_s": curve.largest_rate_time,
                "times_to_s": [
                    {"temperature_degC": t, "time_s": curve.times_to[t]} for t in quench.times_to
                ],
                "range_time_s": curve.range_time,
            }
            for name, curve in quench.curves.items()
        },
    }


def _freezing(assessment: Assessment) -> dict | None:
    """The field's freezing time beside Plank's and Pham's (None when not asked for); errors
    are (hand − field)/field."""
    f = assessment.freezing
    if f is None:
        return None
    return {
        "end_temperature_degC": f.end_temperature,
        "field_time_s": f.field_time,
        "plank_s": f.plank,
        "pham_s": f.pham,
        "plank_error_fraction": f.error("plank"),
        "pham_error_fraction": f.error("pham"),
        "half_thickness_m": f.half_thickness,
        "shape_number": f.shape_number,
        "heat_transfer_coefficient_W_per_m2_K": f.heat_transfer_coefficient,
        "medium_temperature_degC": f.medium_temperature,
        "wording": f.wording,
    }


def _surface_curves(assessment: Assessment) -> dict | None:
    """For each edge group whose coefficient follows the surface temperature, the surface
    temperatures the run passed through (the stored fields at the output times); None
    without such a group. The curves themselves are under ``inputs.boundaries``."""
    solution = assessment.solution
    groups = [g for groups, _ in curve_conditions(solution.model) for g in groups]
    if not groups:
        return None
    bands = {group: surface_band(solution, group) for group in groups}
    return {
        group: {
            "lowest_degC": band.low,
            "highest_degC": band.high,
            "output_times_s": band.times,
            "lowest_at_outputs_degC": band.lowest,
            "highest_at_outputs_degC": band.highest,
        }
        for group, band in bands.items()
    }


def _interfaces(assessment: Assessment) -> dict:
    """Each contact interface: its conductance and the largest jump across it, and when."""
    return {
        name: {
            "regions": list(j.interface.regions),
            "conductance_W_per_m2K": j.interface.conductance,
            "resistance_m2K_per_W": j.interface.resistance,
            "largest_jump_K": j.jump,
            "largest_jump_time_s": j.time,
            "heat_flow_at_largest_jump_W": j.heat_flow,
            "largest_heat_flow_W": j.largest_heat_flow,
        }
        for name, j in largest_jumps(assessment.solution).items()
    }


def _checks(checks: RunChecks) -> dict:
    """The run's own checks."""
    return {
        "energy_balance_error": checks.energy_balance_error,
        "temperature_excursion_K": checks.temperature_excursion,
        "step_to_surface_diffusion": checks.step_to_surface_diffusion,
        "warnings": list(checks.warnings),
        "notes": list(checks.notes),
    }


def _solver(stats: SolverStats) -> dict:
    """How the solver stepped and how long it took."""
    return {
        "method": stats.method,
        "steps": stats.steps,
        "startup_steps": stats.startup_steps,
        "adaptive": stats.adaptive,
        "rejected_steps": stats.rejected_steps,
        "time_step_s": stats.time_step,
        "smallest_step_s": stats.smallest_step,
        "largest_step_s": stats.largest_step,
        "newton_iterations": stats.newton_iterations,
        "retried_steps": stats.retried_steps,
        "subdivided_steps": stats.subdivided_steps,
        "damped_iterations": stats.damped_iterations,
        "factorisations": stats.factorisations,
        "triangular_solves": stats.solves,
        "krylov_dimension": stats.krylov_dimension,
        "error_estimate_K": stats.error_estimate,
        "unknowns": stats.unknowns,
        "assembly_s": stats.assembly_seconds,
        "factorisation_s": stats.factorisation_seconds,
        "stepping_s": stats.stepping_seconds,
    }


def write_summary_json(assessment: Assessment, path: Path, files: list[str]) -> None:
    """Write :func:`summary` to ``path`` atomically."""
    text = json.dumps(summary(assessment, files), indent=2, default=_plain, ensure_ascii=False)
    write_text(Path(path), text + "\n")


def _plain(value):
    """numpy numbers and arrays as plain JSON numbers and lists."""
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    raise TypeError(f"cannot write {type(value).__name__} to JSON")


def _boundary(conditions) -> list[dict]:
    """Each condition of an edge group as JSON data, schedules spelled out."""
    return [condition.summary() for condition in conditions]


def _models(assessment: Assessment) -> dict:
    models = {
        "classical": assessment.lumped.parameters(),
        "corrected": {
            **assessment.corrected.parameters(),
            "beta": assessment.correction_shape,
            "note": assessment.correction_note,
        },
    }
    if assessment.fitted is not None:
        models["fitted exponential"] = assessment.fitted.parameters()
    if assessment.two_node is not None:
        models["two-node"] = assessment.two_node.parameters()
    return models


def _material(material) -> dict:
    def value(v):
        if isinstance(v, float):
            return v
        return {"temperatures_degC": list(v.temperatures), "values": list(v.values)}

    return {
        "name": material.name,
        "source": material.source,
        "conductivity_W_per_m_K": value(material.conductivity),
        "density_kg_per_m3": material.density,
        "specific_heat_J_per_kg_K": value(material.specific_heat),
    }


def _initial(value):
    if isinstance(value, float | dict):
        return value
    return {
        "field of an earlier run": {"minimum": float(value.min()), "maximum": float(value.max())}
    }
