"""summary.json: the inputs, the advisor's answers and the run's own checks, machine-readable.

Every number carries its unit in its key (``_s``, ``_degC``, ``_K``, ``_m``, ...).
"""

from __future__ import annotations

import json
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

from fem import Convection

from ..assessment import Assessment
from ..caution import CAUTION
from .atomic import write_text


def summary(assessment: Assessment, files: list[str]) -> dict:
    """The summary as plain JSON-ready data; ``files`` are the results folder's files."""
    solution = assessment.solution
    model = solution.model
    facts = model.section.facts
    material = model.material
    stats, checks = solution.stats, solution.checks
    return {
        "soakwise_version": _version(),
        "caution": CAUTION,
        "inputs": {
            "section": {
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
            },
            "material": {
                "name": material.name,
                "conductivity_W_per_m_K": material.conductivity,
                "density_kg_per_m3": material.density,
                "specific_heat_J_per_kg_K": material.specific_heat,
            },
            "boundaries": {name: _boundary(c) for name, c in model.boundaries.items()},
            "initial_temperature_degC": model.initial_temperature,
            "probes_m": {name: list(point) for name, point in model.probes.items()},
            "end_time_s": float(solution.times[-1]),
            "target_degC": assessment.target,
            "tolerance_fraction": assessment.verdict.tolerance,
        },
        "biot_numbers": [
            {
                "name": b.name,
                "value": b.value,
                "length_m": b.length,
                "heat_transfer_coefficient_W_per_m2_K": b.heat_transfer_coefficient,
                "explanation": b.explanation,
            }
            for b in assessment.biot
        ],
        "lumped": {
            "time_constant_s": assessment.lumped.time_constant,
            "ambient_degC": assessment.lumped.ambient,
        },
        "lumped_errors": {
            name: {
                "largest_K": e.largest,
                "fraction_of_initial_difference": e.fraction,
                "time_s": e.time,
                "lumped_ahead": e.lumped_ahead,
            }
            for name, e in assessment.errors.items()
        },
        "peak_internal_difference_K": assessment.peak_internal_difference,
        "peak_internal_difference_time_s": assessment.peak_internal_difference_time,
        "time_to_target_s": assessment.time_to_target,
        "verdict": {
            "lumped_adequate": assessment.verdict.adequate,
            "quantity": assessment.verdict.quantity,
            "reasons": list(assessment.verdict.reasons),
        },
        "final": {
            "mean_degC": float(solution.mean[-1]),
            "minimum_degC": float(solution.minimum[-1]),
            "maximum_degC": float(solution.maximum[-1]),
        },
        "output_times_s": solution.output_times.tolist(),
        "checks": {
            "energy_balance_error": checks.energy_balance_error,
            "temperature_excursion_K": checks.temperature_excursion,
            "step_to_surface_diffusion": checks.step_to_surface_diffusion,
            "warnings": list(checks.warnings),
        },
        "solver": {
            "method": stats.method,
            "steps": stats.steps,
            "startup_steps": stats.startup_steps,
            "time_step_s": stats.time_step,
            "factorisations": stats.factorisations,
            "unknowns": stats.unknowns,
            "assembly_s": stats.assembly_seconds,
            "factorisation_s": stats.factorisation_seconds,
            "stepping_s": stats.stepping_seconds,
        },
        "files": files,
    }


def write_summary_json(assessment: Assessment, path: Path, files: list[str]) -> None:
    """Write :func:`summary` to ``path`` atomically."""
    write_text(Path(path), json.dumps(summary(assessment, files), indent=2) + "\n")


def _boundary(condition) -> dict:
    if isinstance(condition, Convection):
        return {
            "kind": "convection",
            "heat_transfer_coefficient_W_per_m2_K": condition.heat_transfer_coefficient,
            "ambient_degC": condition.ambient,
        }
    return {"kind": condition.reason}


def _version() -> str:
    try:
        return version("soakwise")
    except PackageNotFoundError:
        return "unknown"
