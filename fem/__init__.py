"""Transient heat conduction in 2-D sections by the finite-element method (scikit-fem).

This package knows heat and numerics only: no lumped models, no reports.
"""

from .boundary import BoundaryCondition, Convection, Insulated
from .errors import ModelError
from .materials import Material
from .model import ThermalModel
from .solution import RunChecks, Solution, SolverStats
from .system import ConductionSystem, assemble
from .transient import solve

__all__ = [
    "BoundaryCondition",
    "ConductionSystem",
    "Convection",
    "Insulated",
    "Material",
    "ModelError",
    "RunChecks",
    "Solution",
    "SolverStats",
    "ThermalModel",
    "assemble",
    "solve",
]
