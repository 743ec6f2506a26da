"""Boundary conditions, one module per kind; each knows its own physics.

Heat flows are positive *into* the part. Every coefficient, ambient, flux and temperature may be
a number or a schedule of time (see :mod:`fem.schedules`). ``KINDS`` maps the name case files
use to the class. Every module of this package is imported here, so a new kind registers by
being a module with a ``@register`` class: no list to extend.
"""

from importlib import import_module
from pkgutil import iter_modules

from .base import KINDS, Condition, Linearised, SurfaceEdge, conditions, register

# Kinds register in import order, the order messages list them in.
# isort: off
from .convection import Convection
from .radiation import STEFAN_BOLTZMANN, Radiation
from .surface_convection import SurfaceTemperatureConvection
from .correlation import CorrelationConvection
from .flux import HeatFlux
from .fixed import FixedTemperature
from .insulated import Insulated

# isort: on
from .correlation_binding import bind_correlations
from .surface_curve import SurfaceCurve

for _module in iter_modules(__path__):
    import_module(f".{_module.name}", __name__)

BoundaryCondition = Condition | tuple[Condition, ...]

__all__ = [
    "KINDS",
    "STEFAN_BOLTZMANN",
    "BoundaryCondition",
    "Condition",
    "Convection",
    "CorrelationConvection",
    "FixedTemperature",
    "HeatFlux",
    "Insulated",
    "Linearised",
    "Radiation",
    "SurfaceCurve",
    "SurfaceEdge",
    "SurfaceTemperatureConvection",
    "bind_correlations",
    "conditions",
    "register",
]
