"""Transient heat conduction in 2-D sections by the finite-element method (scikit-fem).

This package knows heat and numerics only: no lumped models, no reports.
"""

from . import solids
from .arguments import check_run_options
from .conditions import (
    BoundaryCondition,
    Convection,
    FixedTemperature,
    HeatFlux,
    Insulated,
    Radiation,
)
from .errors import ModelError, SolverError
from .exponential_run import check_exponential_parts
from .fields import FieldSeries
from .materials import Material, PropertyRangeWarning, PropertyTable
from .model import ThermalModel
from .schedules import Constant, Periodic, PiecewiseLinear, Sinusoid, Steps
from .solution import RunChecks, Solution, SolverStats
from .system import ConductionSystem, assemble
from .transient import StopWhen, solve

__all__ = [
    "BoundaryCondition",
    "ConductionSystem",
    "Constant",
    "Convection",
    "FieldSeries",
    "FixedTemperature",
    "HeatFlux",
    "Insulated",
    "Material",
    "ModelError",
    "Periodic",
    "PiecewiseLinear",
    "PropertyRangeWarning",
    "PropertyTable",
    "Radiation",
    "RunChecks",
    "Sinusoid",
    "Solution",
    "SolverError",
    "SolverStats",
    "Steps",
    "StopWhen",
    "ThermalModel",
    "assemble",
    "check_exponential_parts",
    "check_run_options",
    "solids",
    "solve",
]
