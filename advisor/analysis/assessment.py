"""Compare a finite-element field with the lumped family and say whether, by how much and in
which direction the lumped estimate is wrong — and what to use instead."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from fem import ConductionSystem, Solution, ThermalModel

from ..errors import AdvisorError
from .biot import BiotNumber, biot_numbers
from .freezing import FreezingComparison, FreezingProduct
from .lumped import (
    FittedExponential,
    LumpedModel,
    TwoNodeModel,
    correction,
    correction_factor,
    crossing_time,
    fit_exponential,
    fit_two_node,
)
from .modes import SlowestMode, slowest_mode
from .process_readings import check_outputs, freezing_comparison, freezing_product
from .quench import QuenchOutputs, quench_outputs
from .verdict import QUANTITIES, RATINGS, SUBJECTS, Verdict, judge

__all__ = [
    "QUANTITIES",
    "RATINGS",
    "SUBJECTS",
    "Assessment",
    "LumpedError",
    "Verdict",
    "assess",
    "check_request",
    "correction",
]


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
        (:func:`advisor.analysis.lumped.correction_factor`).
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
    def effective_coefficient(self) -> float:
        """h_eff of the corrected lumped model at the start, W/(m²·K)."""
        return self.corrected.surface_coefficient


def assess(
    solution: Solution,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
    system: ConductionSystem | None = None,
    cooling_rates: bool = False,
    times_to: Sequence[float] = (),
    cooling_range: Sequence[float] | None = None,
    freezing: FreezingProduct | None = None,
    freeze_to: float | None = None,
) -> Assessment:
    """Judge the lumped family against the field of ``solution``.

    Parameters
    ----------
    solution : fem.Solution
        A finished run.
    target : float, optional
        Temperature in °C the part must reach; strictly between the initial temperature and
        the ambient.
    tolerance : float
        Largest acceptable error as a fraction: of the initial driving difference |T0 − T∞|
        for temperatures and ΔT, of the field's time for time to target; in (0, 1).
    quantity : str
        What the verdict is about: ``"slowest"`` (the point farthest from the ambient, the one
        that decides when a part is through), ``"mean"`` (the stored heat),
        ``"peak_difference"`` (the internal ΔT, distortion and cracking) or
        ``"time_to_target"`` (needs ``target``).
    system : fem.ConductionSystem, optional
        The run's assembled system, so the slowest mode does not assemble again.
    cooling_rates : bool
        Also read the quench outputs (:class:`QuenchOutputs` in ``Assessment.quench``):
        cooling rate against temperature and its largest value at the slowest point and the
        probes. Implied by ``times_to`` or ``cooling_range``.
    times_to : sequence of float
        Temperatures in °C whose first arrival at the slowest point and the probes is wanted.
    cooling_range : (float, float), optional
        From and to in °C (for example 800, 500 for a steel): the time to pass through it.
    freezing : FreezingProduct, optional
        The product's properties for Plank's equation and Pham's method; the comparison goes
        in ``Assessment.freezing``. Needs ``freeze_to``. Without it, ``freeze_to`` takes them
        from the model's material with latent heat (:meth:`FreezingProduct.of_material`).
    freeze_to : float, optional
        The temperature in °C the slowest point must pass through to count as frozen.

    Returns
    -------
    Assessment

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel, solve
    >>> air = Convection(heat_transfer_coefficient=20.0, ambient=25.0)
    >>> model = ThermalModel(Rectangle(0.02, 0.01).mesh(size=0.002),
    ...     Material(200.0, 2700.0, 900.0),
    ...     boundaries={s: air for s in ("left", "right", "top", "bottom")},
    ...     initial_temperature=180.0)
    >>> result = assess(solve(model, end_time=3600.0), target=50.0)
    >>> result.verdict.rating
    'adequate'
    """
    model = solution.model
    lumped = LumpedModel.of(model)
    drive = lumped.initial_temperature - lumped.equilibrium  # > 0 cooling, < 0 heating
    _check_arguments(lumped, drive, target, tolerance, quantity)
    check_outputs(drive, cooling_range, freezing, freeze_to)
    times = solution.times
    biot = biot_numbers(
        model,
        end_time=float(times[-1]),
        temperature_range=(float(solution.minimum.min()), float(solution.maximum.max())),
    )
    found = correction_factor(model, biot)
    family = _lumped_family(solution, lumped, found.scale, drive)
    curves = family["model_temperatures"]
    spread = solution.internal_difference
    peak = int(np.argmax(spread))
    findings = dict(
        solution=solution,
        biot=biot,
        lumped=lumped,
        correction_shape=found.shape,
        correction_note=found.note,
        correction_length=found.length,
        mode=slowest_mode(model, system),
        lumped_temperature=curves["classical"],
        errors=_errors(solution, family, drive),
        peak_internal_difference=float(spread[peak]),
        peak_internal_difference_time=float(times[peak]),
        energy_error=_energy_error(solution, lumped, curves["classical"], drive),
        target=target,
        time_to_target=_times_to_target(solution, lumped, family, target, drive),
        **family,
    )
    verdict = judge(findings, quantity, tolerance, drive)
    slowest = solution.minimum if drive < 0 else solution.maximum
    quench = None
    if cooling_rates or times_to or cooling_range is not None:
        histories = {"slowest": slowest} | {f"probe:{n}": h for n, h in solution.probes.items()}
        quench = quench_outputs(
            times, histories, drive=drive, times_to=times_to, cooling_range=cooling_range
        )
    frozen = None
    product = freezing_product(model, lumped, freezing, freeze_to)
    if product is not None:
        frozen = freezing_comparison(solution, lumped, biot, product, freeze_to, slowest)
    return Assessment(**findings, verdict=verdict, quench=quench, freezing=frozen)


def _energy_error(solution: Solution, lumped: LumpedModel, curve, drive: float) -> float:
    """Largest |lumped − field stored energy| as a fraction of a full approach's exchange."""
    gap = np.abs(lumped.stored_energy(curve) - solution.stored_energy).max()
    full_approach = abs(float(lumped.stored_energy(np.array([lumped.equilibrium]))[0]))
    return float(gap / full_approach)  # latent heat included; C·|T0 − T_eq| for constant c


def _lumped_family(solution: Solution, lumped: LumpedModel, scale: float, drive: float) -> dict:
    """The corrected, fitted and two-node models and every model's curve at the run's
    times."""
    times = solution.times
    corrected = LumpedModel.of(solution.model, scale=scale, name="corrected")
    slowest = solution.minimum if drive < 0 else solution.maximum
    fitted = (
        fit_exponential(times, solution.mean, lumped.ambient, lumped.initial_temperature)
        if lumped.closed_form
        else None
    )
    two_node = fit_two_node(times, solution.mean, slowest, lumped)
    curves = {"classical": lumped.temperature(times), "corrected": corrected.temperature(times)}
    if fitted is not None:
        curves["fitted exponential"] = fitted.temperature(times)
    if two_node is not None:
        curves["two-node"] = two_node.temperature(times)
    return dict(corrected=corrected, fitted=fitted, two_node=two_node, model_temperatures=curves)


def _errors(solution: Solution, family: dict, drive: float) -> dict[str, LumpedError]:
    """Every model's largest gap to the field quantities it stands for."""
    times, curves = solution.times, family["model_temperatures"]
    fields = {
        "mean": solution.mean,
        "slowest": solution.minimum if drive < 0 else solution.maximum,
        "hottest": solution.maximum,
        "coldest": solution.minimum,
    }
    fields.update({f"probe:{n}": h for n, h in solution.probes.items()})
    errors = {
        f"classical vs {q}": _largest_error(q, "classical", h, curves["classical"], times, drive)
        for q, h in fields.items()
    }
    for name in ("corrected", "fitted exponential", "two-node"):
        if name not in curves:
            continue
        for q in ("mean", "slowest"):
            reference = curves[name]
            if name == "two-node" and q == "slowest":
                reference = family["two_node"].states(times)[0]
            errors[f"{name} vs {q}"] = _largest_error(q, name, fields[q], reference, times, drive)
    return errors


def _times_to_target(
    solution: Solution, lumped: LumpedModel, family: dict, target: float | None, drive: float
) -> dict[str, float | None]:
    """When each model and field quantity reaches ``target``, s (empty without a target)."""
    if target is None:
        return {}
    times = solution.times
    end = float(times[-1])
    fitted, two_node = family["fitted"], family["two_node"]
    found: dict[str, float | None] = {
        "classical": lumped.time_to(target, end),
        "corrected": family["corrected"].time_to(target, end),
    }
    if fitted is not None:
        found["fitted exponential"] = fitted.time_to(target)
    if two_node is not None:
        found["two-node (core)"] = two_node.time_to(target, end)
    slowest = solution.minimum if drive < 0 else solution.maximum
    found["mean"] = crossing_time(times, solution.mean, target, drive)
    found["slowest"] = crossing_time(times, slowest, target, drive)
    for name, history in solution.probes.items():
        found[f"probe:{name}"] = crossing_time(times, history, target, drive)
    return found


def check_request(
    model: ThermalModel,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
    cooling_rates: bool = False,
    times_to: Sequence[float] = (),
    cooling_range: Sequence[float] | None = None,
    freezing: FreezingProduct | None = None,
    freeze_to: float | None = None,
) -> None:
    """Refuse, before any solve, an assessment that :func:`assess` would refuse."""
    lumped = LumpedModel.of(model)
    drive = lumped.initial_temperature - lumped.equilibrium
    _check_arguments(lumped, drive, target, tolerance, quantity)
    check_outputs(drive, cooling_range, freezing, freeze_to)
    freezing_product(model, lumped, freezing, freeze_to)


def check_options(
    *, target: float | None = None, tolerance: float = 0.05, quantity: str = "slowest"
) -> None:
    """Refuse what :func:`assess` refuses of its options without a model (a case file checks
    them before meshing); :func:`check_request` adds what needs the model."""
    if quantity not in QUANTITIES:
        raise AdvisorError(
            f"quantity must be one of {QUANTITIES}, got {quantity!r}", argument="quantity"
        )
    if not (isinstance(tolerance, int | float) and 0 < tolerance < 1):
        raise AdvisorError(
            f"tolerance must be a fraction in (0, 1), got {tolerance!r}", argument="tolerance"
        )
    if target is None and quantity == "time_to_target":
        raise AdvisorError(
            "quantity 'time_to_target' needs a target temperature", argument="target"
        )


def _check_arguments(lumped, drive, target, tolerance, quantity) -> None:
    check_options(target=target, tolerance=tolerance, quantity=quantity)
    if abs(drive) <= 1e-9 * max(abs(lumped.initial_temperature), 1.0):
        raise AdvisorError(
            f"the initial temperature equals the lumped equilibrium ({lumped.equilibrium:.6g} "
            "degC): nothing heats or cools at the start, so there is nothing to assess"
        )
    if target is not None:
        low, high = sorted((lumped.initial_temperature, lumped.equilibrium))
        if not (isinstance(target, int | float) and low < target < high):
            raise AdvisorError(
                f"target must be a temperature strictly between the initial temperature and "
                f"where the part is heading, ({low:.6g}, {high:.6g}) degC, got {target!r}"
            )


def _largest_error(quantity, model, field_history, lumped, times, drive) -> LumpedError:
    gap = np.asarray(lumped) - np.asarray(field_history)
    i = int(np.argmax(np.abs(gap)))
    ahead = bool(gap[i] * drive < 0)  # nearer the ambient: below the field when cooling
    return LumpedError(
        quantity,
        model,
        float(abs(gap[i])),
        float(abs(gap[i]) / abs(drive)),
        float(times[i]),
        ahead,
    )
