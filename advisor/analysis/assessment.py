"""Compare a finite-element field with the lumped family and say whether, by how much and in
which direction the lumped estimate is wrong — and what to use instead."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from fem import Solution, ThermalModel

from ..errors import AdvisorError
from .biot import COMMON_LIMIT, BiotNumber, biot_numbers, mean_coefficient
from .lumped import (
    FittedExponential,
    LumpedModel,
    TwoNodeModel,
    crossing_time,
    fit_exponential,
    fit_two_node,
    heat_capacity,
)
from .modes import SlowestMode, slowest_mode

QUANTITIES = ("slowest", "mean", "peak_difference", "time_to_target")
RATINGS = ("adequate", "marginal", "inadequate")
SUBJECTS = {
    "slowest": "the slowest point",
    "mean": "the field mean",
    "peak_difference": "the internal temperature difference",
    "time_to_target": "the slowest point's time to target",
}


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
class Verdict:
    """How good the classical lumped estimate is for the chosen quantity, and why.

    Attributes
    ----------
    rating : str
        ``"adequate"`` (error within the tolerance), ``"marginal"`` (within twice it) or
        ``"inadequate"``.
    quantity : str
        What was judged: ``"slowest"``, ``"mean"``, ``"peak_difference"`` or
        ``"time_to_target"``.
    tolerance : float
        As a fraction (of the driving difference; of the field's time for time to target).
    error : float
        The judged error as the same kind of fraction.
    direction : str
        Which way the lumped estimate is wrong, in plain words.
    advice : str
        What to use instead (or that the lumped estimate will do).
    reasons : tuple of str
        The figures behind the rating.
    """

    rating: str
    quantity: str
    tolerance: float
    error: float
    direction: str
    advice: str
    reasons: tuple[str, ...]

    @property
    def adequate(self) -> bool:
        return self.rating == "adequate"

    @property
    def subject(self) -> str:
        """The judged quantity in words."""
        return SUBJECTS[self.quantity]


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
        The model with h_eff = h / (1 + Bi/β).
    correction_shape : float
        The β used, and why in ``correction_note``.
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
        energy a full approach to the ambient exchanges.
    target : float or None
    time_to_target : dict of str to float or None
        When each model and field quantity reaches the target, s.
    verdict : Verdict
    """

    solution: Solution
    biot: tuple[BiotNumber, ...]
    lumped: LumpedModel
    corrected: LumpedModel
    correction_shape: float
    correction_note: str
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

    @property
    def heating(self) -> bool:
        """True when the part warms up towards the ambient."""
        return self.lumped.equilibrium > self.lumped.initial_temperature

    @property
    def slowest(self) -> np.ndarray:
        """Temperature history of the point farthest from the ambient, °C."""
        return self.solution.minimum if self.heating else self.solution.maximum


def correction(model: ThermalModel, biot: tuple[BiotNumber, ...]) -> tuple[float, float, str]:
    """β and the coefficient scale 1/(1 + Bi/β) of the corrected lumped model, with why.

    β = 3, 4, 5 for a slab, long cylinder and sphere, with Bi on the half-thickness or radius:
    exactly d/(V/A_s) + 2 with d the largest conduction distance (1, 2, 3 for those shapes),
    which is the rule used for any section.
    """
    by_name = {b.name: b for b in biot}
    ratio = by_name["conduction_distance"].length / by_name["volume_to_surface"].length
    beta = ratio + 2.0
    bi = by_name["conduction_distance"].value
    note = (
        f"β = d/(V/A_s) + 2 = {beta:.3g} (slab 3, long cylinder 4, sphere 5), Bi on the "
        f"conduction distance d = {1000 * by_name['conduction_distance'].length:.4g} mm: "
        f"h_eff = h/(1 + {bi:.3g}/{beta:.3g})"
    )
    return beta, 1.0 / (1.0 + bi / beta), note


def assess(
    solution: Solution,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
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
    times = solution.times
    end = float(times[-1])

    biot = biot_numbers(
        model,
        end_time=end,
        temperature_range=(float(solution.minimum.min()), float(solution.maximum.max())),
    )
    beta, scale, note = correction(model, biot)
    corrected = LumpedModel.of(model, scale=scale, name="corrected")
    mode = slowest_mode(model)
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

    fields = {
        "mean": solution.mean,
        "slowest": slowest,
        "hottest": solution.maximum,
        "coldest": solution.minimum,
    }
    fields.update({f"probe:{n}": h for n, h in solution.probes.items()})
    errors = {
        f"classical vs {q}": _largest_error(q, "classical", h, curves["classical"], times, drive)
        for q, h in fields.items()
    }
    for name in ("corrected", "fitted exponential", "two-node"):
        if name in curves:
            for q in ("mean", "slowest"):
                reference = (
                    curves[name]
                    if not (name == "two-node" and q == "slowest")
                    else (two_node.states(times)[0])
                )
                errors[f"{name} vs {q}"] = _largest_error(
                    q, name, fields[q], reference, times, drive
                )

    spread = solution.internal_difference
    peak = int(np.argmax(spread))
    capacity = heat_capacity(model, lumped.initial_temperature)
    lumped_energy = capacity * (curves["classical"] - lumped.initial_temperature)
    energy_error = float(
        np.abs(lumped_energy - solution.stored_energy).max() / (capacity * abs(drive))
    )

    time_to_target: dict[str, float | None] = {}
    if target is not None:
        time_to_target["classical"] = lumped.time_to(target, end)
        time_to_target["corrected"] = corrected.time_to(target, end)
        if fitted is not None:
            time_to_target["fitted exponential"] = fitted.time_to(target)
        if two_node is not None:
            time_to_target["two-node (core)"] = two_node.time_to(target, end)
        time_to_target["mean"] = crossing_time(times, solution.mean, target, drive)
        time_to_target["slowest"] = crossing_time(times, slowest, target, drive)
        for name, history in solution.probes.items():
            time_to_target[f"probe:{name}"] = crossing_time(times, history, target, drive)

    partial = dict(
        solution=solution,
        biot=biot,
        lumped=lumped,
        corrected=corrected,
        correction_shape=beta,
        correction_note=note,
        fitted=fitted,
        two_node=two_node,
        mode=mode,
        lumped_temperature=curves["classical"],
        model_temperatures=curves,
        errors=errors,
        peak_internal_difference=float(spread[peak]),
        peak_internal_difference_time=float(times[peak]),
        energy_error=energy_error,
        target=target,
        time_to_target=time_to_target,
    )
    verdict = _verdict(partial, quantity, tolerance, drive)
    return Assessment(**partial, verdict=verdict)


def check_request(
    model: ThermalModel,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
) -> None:
    """Refuse, before any solve, an assessment that :func:`assess` would refuse."""
    lumped = LumpedModel.of(model)
    _check_arguments(
        lumped, lumped.initial_temperature - lumped.equilibrium, target, tolerance, quantity
    )


def _check_arguments(lumped, drive, target, tolerance, quantity) -> None:
    if quantity not in QUANTITIES:
        raise AdvisorError(f"quantity must be one of {QUANTITIES}, got {quantity!r}")
    if not (isinstance(tolerance, int | float) and 0 < tolerance < 1):
        raise AdvisorError(f"tolerance must be a fraction in (0, 1), got {tolerance!r}")
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
    elif quantity == "time_to_target":
        raise AdvisorError("quantity 'time_to_target' needs a target temperature")


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


def _rating(error: float, tolerance: float) -> str:
    if error <= tolerance:
        return "adequate"
    return "marginal" if error <= 2 * tolerance else "inadequate"


def _verdict(a: dict, quantity: str, tolerance: float, drive: float) -> Verdict:
    heating = drive < 0
    verb = "heats" if heating else "cools"
    errors, times_to = a["errors"], a["time_to_target"]
    bi = a["biot"][0]
    subject = SUBJECTS[quantity]
    reasons = []

    if quantity in ("slowest", "mean"):
        e = errors[f"classical vs {quantity}"]
        error = e.fraction
        reasons.append(
            f"largest lumped error against {subject}: {e.largest:.3g} K, "
            f"{100 * e.fraction:.2f} % of the driving difference of {abs(drive):.4g} K (at "
            f"t = {e.time:.4g} s); the tolerance is {100 * tolerance:.3g} %"
        )
        if e.lumped_ahead:
            direction = (
                f"the lumped estimate runs ahead of {subject}: it says the part "
                f"{verb} faster than it does — "
                + (
                    "non-conservative for a soak or hold time"
                    if heating
                    else "non-conservative for the end of a quench or a safe-to-handle time"
                )
            )
        else:
            direction = (
                f"the lumped estimate lags behind {subject}: the part {verb} faster "
                "than it says — conservative for the time to get there"
            )
    elif quantity == "peak_difference":
        error = a["peak_internal_difference"] / abs(drive)
        reasons.append(
            f"the section's largest internal temperature difference is "
            f"{a['peak_internal_difference']:.3g} K ({100 * error:.2f} % of the driving "
            f"difference of {abs(drive):.4g} K) at t = {a['peak_internal_difference_time']:.4g} "
            "s; a lumped model has none"
        )
        direction = (
            "the lumped estimate says the part stays uniform: it hides the "
            "internal temperature difference that drives distortion and cracking"
        )
    else:
        lumped_time, field_time = times_to.get("classical"), times_to.get("slowest")
        if field_time is None or lumped_time is None or field_time <= 0:
            raise AdvisorError(
                "the time to target cannot be judged: the slowest point or the lumped model "
                "does not reach the target within the run; run longer"
            )
        error = abs(lumped_time - field_time) / field_time
        early = lumped_time < field_time
        reasons.append(
            f"the lumped estimate reaches {a['target']:g} degC at {lumped_time:.4g} s, the "
            f"slowest point at {field_time:.4g} s ({100 * error:.1f} % "
            f"{'early' if early else 'late'}); the tolerance is {100 * tolerance:.3g} %"
        )
        direction = (
            "the lumped estimate says the part is through too early — non-conservative"
            if early
            else "the lumped estimate says the part is through later than it is — conservative"
        )

    rating = _rating(error, tolerance)
    reasons.append(
        f"Biot number (V/A_s) = {bi.value:.3g} (over the run {bi.low:.3g} to "
        f"{bi.high:.3g}): "
        + ("below" if bi.high < COMMON_LIMIT else "not below")
        + f" the common-practice limit of {COMMON_LIMIT}"
    )
    mode = a["mode"]
    reasons.append(
        f"slowest-mode ratio {mode.ratio:.3g}: the part's last temperature difference decays "
        f"at {100 * mode.ratio:.3g} % of the lumped rate (a lumped model would need h = "
        f"{mode.equivalent_coefficient:.4g} W/(m^2*K))"
    )
    if a["target"] is not None and quantity != "time_to_target":
        lumped_time, field_time = times_to.get("classical"), times_to.get("slowest")
        if field_time is None:
            reasons.append("the slowest point does not reach the target within the run")
        elif lumped_time is not None and field_time > 0:
            change = 100 * (lumped_time - field_time) / field_time
            reasons.append(
                f"the lumped estimate reaches {a['target']:g} degC at {lumped_time:.4g} s, "
                f"{abs(change):.1f} % {'earlier' if change < 0 else 'later'} than the slowest "
                f"point ({field_time:.4g} s)"
            )

    advice = _advice(a, rating, quantity, tolerance)
    return Verdict(
        rating, quantity, float(tolerance), float(error), direction, advice, tuple(reasons)
    )


def _advice(a: dict, rating: str, quantity: str, tolerance: float) -> str:
    warnings = a["solution"].checks.warnings
    tail = (
        (
            " The run's own checks flagged problems (see the checks): refine the mesh or the "
            "step before relying on these figures."
        )
        if warnings
        else ""
    )
    if rating == "adequate":
        return "The classical lumped estimate will do for this quantity." + tail
    if quantity in ("slowest", "mean"):
        candidates = [
            ("corrected", "the corrected lumped model"),
            ("two-node", "the fitted two-node model"),
            ("fitted exponential", "the fitted single exponential"),
        ]
        for key, label in candidates:
            e = a["errors"].get(f"{key} vs {quantity}")
            if e is not None and e.fraction <= tolerance:
                extra = ""
                if key == "corrected":
                    h = mean_coefficient(a["lumped"].model, a["lumped"].initial_temperature, 0.0)
                    extra = f", h_eff = {a['corrected'].coefficient_scale * h:.4g} W/(m^2*K)"
                return (
                    f"Use {label} ({100 * e.fraction:.2f} % error{extra}) or the field "
                    "result." + tail
                )
    return "Use the field result: no lumped model is within the tolerance." + tail
