"""What an assessment finds: the :class:`Assessment` of one solution and the
:class:`LumpedError` of one lumped model against one field quantity."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from fem import Solution

from .biot import BiotNumber
from .error_estimate import ErrorEstimate
from .freezing import FreezingComparison
from .lumped import FittedExponential, LumpedModel, TwoNodeModel
from .modes import SlowestMode
from .quench import QuenchOutputs
from .stages import StageResult
from .verdict import Verdict


@dataclass(frozen=True)
class LumpedError:
    """The largest gap between a lumped model and one field quantity over the run.

    Attributes
    ----------
    quantity : str
        ``"mean"``, ``"slowest"`` (the point farthest from the ambient), ``"hottest"``,
        ``"coldest"`` or ``"probe:<name>"``.
    model : str
        Which lumped model (``"classical"``, ``"corrected"``, ...).
    largest : float
        Largest |lumped − field| in K.
    fraction : float
        ``largest`` divided by the initial driving difference |T0 − T∞|.
    time : float
        When it occurs, s.
    lumped_ahead : bool
        True when, at that time, the lumped model is nearer the ambient than the field: it has
        heated or cooled the part faster than it really goes.
    """

    quantity: str
    model: str
    largest: float
    fraction: float
    time: float
    lumped_ahead: bool


@dataclass(frozen=True)
class Assessment:
    """The advisor's answers for one solution.

    Attributes
    ----------
    solution : fem.Solution
    biot : tuple of BiotNumber
    lumped : LumpedModel
        The classical lumped model.
    corrected : LumpedModel
        The model with h_eff = h / (1 + h·s/k) = h / (1 + Bi/β), Bi on the conduction distance.
    correction_shape : float
        The β used (d/s), and how it was found in ``correction_note``.
    correction_length : float
        s in m, the section's correction length from one steady solve
        (:func:`advisor.analysis.lumped_correction.correction_factor`).
    fitted : FittedExponential or None
        A single exponential fitted to the late field mean (None if the run ends too early).
    two_node : TwoNodeModel or None
        Core and skin fitted to the field (None for conditions that change in time).
    mode : SlowestMode
    lumped_temperature : ndarray
        Classical lumped estimate in °C at ``solution.times``.
    model_temperatures : dict of str to ndarray
        Every lumped model's mean temperature at ``solution.times``.
    errors : dict of str to LumpedError
        Keyed ``"<model> vs <quantity>"``.
    peak_internal_difference, peak_internal_difference_time : float
        Largest max − min temperature in the section (K) and when (s).
    energy_error : float
        Largest |lumped stored energy − field stored energy| over the run, as a fraction of the
        energy a full approach to the ambient exchanges (sensible and latent heat).
    target : float or None
    time_to_target : dict of str to float or None
        When each model and field quantity reaches the target, s.
    verdict : Verdict
    quench : QuenchOutputs or None
        Cooling rates against temperature, the largest rate, times to temperatures and the
        time through a range at the slowest point and the probes, when asked for.
    freezing : FreezingComparison or None
        The field's freezing time beside Plank's and Pham's, when a product was given.
    stages : tuple of StageResult
        A staged target judged stage by stage (empty when none was given).
    ending : str
        How the run ended, in plain words: the stop condition met, or the end time reached,
        and whether the slowest point reached the target.
    error_estimate : ErrorEstimate or None
        The run's own estimate of the discretisation error of its key answers, when asked
        for (:mod:`advisor.analysis.error_estimate`).
    """

    solution: Solution
    biot: tuple[BiotNumber, ...]
    lumped: LumpedModel
    corrected: LumpedModel
    correction_shape: float
    correction_note: str
    correction_length: float
    fitted: FittedExponential | None
    two_node: TwoNodeModel | None
    mode: SlowestMode
    lumped_temperature: np.ndarray
    model_temperatures: dict[str, np.ndarray]
    errors: dict[str, LumpedError]
    peak_internal_difference: float
    peak_internal_difference_time: float
    energy_error: float
    target: float | None
    time_to_target: dict[str, float | None]
    verdict: Verdict = field(repr=False)
    quench: QuenchOutputs | None = field(default=None, repr=False)
    freezing: FreezingComparison | None = field(default=None, repr=False)
    stages: tuple[StageResult, ...] = field(default=(), repr=False)
    ending: str = ""
    error_estimate: ErrorEstimate | None = field(default=None, repr=False)

    @property
    def heating(self) -> bool:
        """True when the part warms up towards the ambient."""
        return self.lumped.equilibrium > self.lumped.initial_temperature

    @property
    def slowest(self) -> np.ndarray:
        """Temperature history of the point farthest from the ambient, °C."""
        return self.solution.minimum if self.heating else self.solution.maximum

    @property
    def lumped_energy(self) -> np.ndarray:
        """Heat the classical lumped model has stored since the start at ``solution.times``,
        J (planar: J/m)."""
        return self.lumped.stored_energy(self.lumped_temperature)

    @property
    def error_histories(self) -> dict[tuple[str, str], np.ndarray]:
        """(field − lumped) / (T0 − T∞) at ``solution.times`` for the classical and corrected
        models (first key) against the field mean and the slowest point (second key);
        positive where the lumped estimate is nearer its equilibrium than the field (it runs
        ahead). T∞ is the lumped equilibrium: the ambient, raised by any sources and fluxes."""
        drive = self.lumped.initial_temperature - self.lumped.equilibrium
        quantities = {"field mean": self.solution.mean, "slowest point": self.slowest}
        return {
            (model, quantity): (history - self.model_temperatures[model]) / drive
            for model in ("classical", "corrected")
            for quantity, history in quantities.items()
        }

    @property
    def recommended_error_histories(self) -> dict[str, np.ndarray]:
        """As :attr:`error_histories` for the fitted model the advice recommends (key: the
        field quantity), the two-node model's core node standing for the slowest point; empty
        when the advice recommends the classical or corrected model (drawn already) or the
        field."""
        drive = self.lumped.initial_temperature - self.lumped.equilibrium
        times, key = self.solution.times, self.verdict.recommended
        if key == "two-node" and self.two_node is not None:
            core, _, mean = self.two_node.states(times)
        elif key == "fitted exponential" and self.fitted is not None:
            core = mean = self.model_temperatures["fitted exponential"]
        else:
            return {}
        return {
            "field mean": (self.solution.mean - mean) / drive,
            "slowest point": (self.slowest - core) / drive,
        }

    @property
    def effective_coefficient(self) -> float:
        """h_eff of the corrected lumped model at the start, W/(m²·K)."""
        return self.corrected.surface_coefficient
