"""Transient heat conduction in 2-D sections by the finite-element method (scikit-fem).

This package knows heat and numerics only: no lumped models, no reports. The public names
below are loaded on first use, so ``import fem`` (and ``fem.solids`` for the material list)
does not load scipy, scikit-fem or the mesher until they are needed.
"""

from __future__ import annotations

from importlib import import_module
from typing import TYPE_CHECKING

from .errors import ModelError, SolverError

# Public name → the module that defines it.
_LAZY = {
    "check_run_options": ".arguments",
    "BoundaryCondition": ".conditions",
    "Convection": ".conditions",
    "CorrelationConvection": ".conditions",
    "bind_correlations": ".conditions",
    "FixedTemperature": ".conditions",
    "HeatFlux": ".conditions",
    "Insulated": ".conditions",
    "Radiation": ".conditions",
    "SurfaceCurve": ".conditions",
    "SurfaceTemperatureConvection": ".conditions",
    "check_exponential_parts": ".exponential_run",
    "FieldSeries": ".fields",
    "Interface": ".interfaces",
    "Material": ".materials",
    "PropertyRangeWarning": ".materials",
    "PropertyTable": ".materials",
    "Orthotropic": ".orthotropic",
    "EnthalpyTable": ".enthalpy",
    "ThermalModel": ".model",
    "Constant": ".schedules",
    "Periodic": ".schedules",
    "PiecewiseLinear": ".schedules",
    "Sinusoid": ".schedules",
    "Steps": ".schedules",
    "RunChecks": ".solution",
    "Solution": ".solution",
    "SolverStats": ".solution",
    "ConductionSystem": ".system",
    "assemble": ".assembly",
    "StopWhen": ".events",
    "solve": ".transient",
}
_SUBMODULES = ("solids",)

__all__ = [
    "assemble",
    "BoundaryCondition",
    "check_exponential_parts",
    "check_run_options",
    "ConductionSystem",
    "Constant",
    "Convection",
    "CorrelationConvection",
    "bind_correlations",
    "FieldSeries",
    "FixedTemperature",
    "HeatFlux",
    "Insulated",
    "Interface",
    "Material",
    "ModelError",
    "Orthotropic",
    "Periodic",
    "PiecewiseLinear",
    "PropertyRangeWarning",
    "PropertyTable",
    "Radiation",
    "RunChecks",
    "Sinusoid",
    "solids",
    "Solution",
    "solve",
    "SolverError",
    "SolverStats",
    "Steps",
    "StopWhen",
    "SurfaceCurve",
    "SurfaceTemperatureConvection",
    "EnthalpyTable",
    "ThermalModel",
]

if TYPE_CHECKING:
    from . import solids
    from .arguments import check_run_options
    from .assembly import assemble
    from .conditions import (
        BoundaryCondition,
        Convection,
        FixedTemperature,
        HeatFlux,
        Insulated,
        Radiation,
        SurfaceCurve,
        SurfaceTemperatureConvection,
    )
    from .enthalpy import EnthalpyTable
    from .events import StopWhen
    from .exponential_run import check_exponential_parts
    from .fields import FieldSeries
    from .interfaces import Interface
    from .materials import Material, PropertyRangeWarning, PropertyTable
    from .model import ThermalModel
    from .orthotropic import Orthotropic
    from .schedules import Constant, Periodic, PiecewiseLinear, Sinusoid, Steps
    from .solution import RunChecks, Solution, SolverStats
    from .system import ConductionSystem
    from .transient import solve


def __getattr__(name: str):
    if name in _SUBMODULES:
        value = import_module(f".{name}", __name__)
    elif name in _LAZY:
        value = getattr(import_module(_LAZY[name], __name__), name)
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value  # later look-ups skip this function
    return value


def __dir__() -> list[str]:
    return sorted({*globals(), *_LAZY, *_SUBMODULES})
