"""The fit's model: parameter values in, probe temperatures at the measured times out.

The section is meshed and the system assembled once; every trial gives the solver
``system.with_boundaries(...)``, so a trial costs one transient solve and no assembly. The
steps are fixed (``time_step``), so the predicted temperatures are smooth functions of the
parameters and finite differences of them are sensitivities, not step-control noise;
nonlinear trials iterate each step to a tight Newton tolerance for the same reason.
"""

from __future__ import annotations

import dataclasses
from collections import OrderedDict
from collections.abc import Callable

import numpy as np

from .measured import MeasuredCurves
from .parameters import Parameters

STEPS_PER_RUN = 400  # default steps over the measured span when the case fixes none
NEWTON_TOLERANCE = 1e-8  # K: far below the change a finite-difference step makes
REMEMBERED = 64  # trials kept (least_squares asks for the same point again)


class FitProblem:
    """Residuals of a fit: predicted minus measured temperatures, K.

    Parameters
    ----------
    model : fem.ThermalModel
        The case's model; probes the readings name at given points are added to it.
    parameters : Parameters
    measured : MeasuredCurves
    time_step : float, optional
        Fixed step in s (default: the span of the readings / 400).
    method : str
        The time scheme (``"crank-nicolson"`` by default).
    progress : callable, optional
        Called as ``progress(trials)`` after every solve.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from geometries import Rectangle
    >>> from fem import Convection, Insulated, Material, ThermalModel
    >>> from advisor.fitting.measured import read_measured
    >>> from advisor.fitting.parameters import build_parameters, parse_request
    >>> section = Rectangle(0.01, 0.01, edge_names={"left": "cut", "bottom": "cut",
    ...     "right": "air", "top": "air"}).mesh(size=0.0025)
    >>> model = ThermalModel(section, Material(45.0, 7850.0, 475.0),
    ...     {"cut": Insulated("symmetry"), "air": Convection(50.0, 20.0)}, 300.0,
    ...     probes={"core": (0.0, 0.0)})
    >>> path = Path(tempfile.mkdtemp()) / "m.csv"
    >>> _ = path.write_text("time [s], core [degC]\\n60, 290\\n120, 280\\n180, 271\\n")
    >>> measured = read_measured(path, model.probes)
    >>> blocks = build_parameters([parse_request("h:air")], dict(model.boundaries),
    ...     end_time=180.0, temperature_range=(271.0, 300.0))
    >>> problem = FitProblem(model, blocks, measured)
    >>> problem.residuals(np.array([50.0])).shape
    (3,)
    """

    def __init__(
        self,
        model,
        parameters: Parameters,
        measured: MeasuredCurves,
        *,
        time_step: float | None = None,
        method: str = "crank-nicolson",
        progress: Callable[[int], None] | None = None,
    ) -> None:
        from fem import assemble
        from geometries import AXIS_GROUP

        probes = {**dict(model.probes), **measured.positions}
        # The axis of an axisymmetric section is added by the model itself (and refused back
        # as a tuple of conditions), so the groups handed on leave it out.
        self.given = {g: c for g, c in model.boundaries.items() if g != AXIS_GROUP}
        self.parameters = parameters
        self.measured = measured
        self.data = measured.stacked()
        self.end_time = float(measured.times[-1])
        start = parameters.boundaries(parameters.stacked("start"), self.given)
        self.model = dataclasses.replace(model, boundaries=start, probes=probes)
        self.system = assemble(self.model)
        step = time_step or self.end_time / STEPS_PER_RUN
        self.options = {
            "method": method,
            "time_step": min(step, self.end_time / 20),
            "adaptive": False,
            "output_times": (self.end_time,),
            "newton_tolerance": NEWTON_TOLERANCE,
        }
        self.progress = progress
        self.trials = 0
        self.solve_seconds = 0.0
        self._memory: OrderedDict[bytes, object] = OrderedDict()
        self._last_jacobian: tuple | None = None

    @property
    def nonlinear(self) -> bool:
        return self.parameters.nonlinear or not all(
            c.linear for group in self.model.boundaries.values() for c in group
        )

    def solution(self, values: np.ndarray):
        """The :class:`fem.Solution` of the model with ``values``, remembered."""
        import time

        from fem import solve

        values = np.asarray(values, dtype=float)
        key = values.tobytes()
        if key in self._memory:
            self._memory.move_to_end(key)
            return self._memory[key]
        system = self.system.with_boundaries(self.parameters.boundaries(values, self.given))
        started = time.perf_counter()
        solution = solve(system, self.end_time, **self.options)
        self.solve_seconds += time.perf_counter() - started
        self.trials += 1
        self._memory[key] = solution
        if len(self._memory) > REMEMBERED:
            self._memory.popitem(last=False)
        if self.progress is not None:
            self.progress(self.trials)
        return solution

    def predicted(self, values: np.ndarray) -> np.ndarray:
        """Probe temperatures at the measured times (times × probes), °C: the recorded
        histories (every step) interpolated linearly."""
        solution = self.solution(values)
        return np.column_stack(
            [
                np.interp(self.measured.times, solution.times, solution.probes[name])
                for name in self.measured.probes
            ]
        )

    def residuals(self, values: np.ndarray) -> np.ndarray:
        """Predicted minus measured, K, flattened time-major."""
        return (self.predicted(values) - self.data).ravel()

    def jacobian(self, values: np.ndarray, relative_step: float) -> np.ndarray:
        """∂(predicted)/∂(values) by forward differences, K per unit of each parameter; the
        last one is remembered (the estimate's covariance asks again where the fit ended)."""
        values = np.asarray(values, dtype=float)
        key = (values.tobytes(), relative_step)
        if self._last_jacobian is not None and self._last_jacobian[0] == key:
            return self._last_jacobian[1].copy()
        base = self.residuals(values)
        upper = self.parameters.stacked("upper")
        columns = []
        for j, value in enumerate(values):
            step = relative_step * max(abs(value), 1e-6)
            if value + step > upper[j]:  # at the upper bound (an emissivity of 1): backwards
                step = -step
            moved = np.array(values, dtype=float)
            moved[j] += step
            columns.append((self.residuals(moved) - base) / step)
        jacobian = np.column_stack(columns)
        self._last_jacobian = (key, jacobian)
        return jacobian.copy()

    @property
    def difference_step(self) -> float:
        """Relative step of the finite differences: a linear solve repeats to round-off, a
        Newton solve to its tolerance, which a larger step outweighs."""
        return 1e-4 if self.nonlinear else 1e-6
