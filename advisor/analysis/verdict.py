"""The verdict's wording: the rating, the direction of the lumped error in plain words, the
figures behind it, and what to use instead."""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import AdvisorError
from ..time_words import duration_text
from .process_words import check_process, infer_process, process_words

COMMON_LIMIT = 0.1  # common practice: lumped estimates are usually accepted below Bi = 0.1

QUANTITIES = ("slowest", "mean", "peak_difference", "time_to_target")
RATINGS = ("adequate", "marginal", "inadequate")
SUBJECTS = {
    "slowest": "the slowest point",
    "mean": "the field mean",
    "peak_difference": "the internal temperature difference",
    "time_to_target": "the slowest point's time to target",
}
BIOT_NAMES = {  # a Biot number's length scale in words
    "volume_to_surface": "L = V/A_s",
    "four_area_over_perimeter": "L = 4A/P",
    "conduction_distance": "L = largest conduction distance",
}
ADVICE_CANDIDATES = (
    ("corrected", "the corrected lumped model"),
    ("two-node", "the fitted two-node model"),
    ("fitted exponential", "the fitted single exponential"),
)


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
    recommended : str or None
        The model the advice recommends, a key of :attr:`Assessment.model_temperatures`
        (``"classical"`` when adequate, ``"corrected"``, ``"two-node"``, ``"fitted
        exponential"``), or None when only the field will do.
    process : str
        The kind of process the words are chosen for (:data:`.process_words.PROCESSES`).
    process_inferred : bool
        True when the process was inferred from the model rather than named by the case.
    """

    rating: str
    quantity: str
    tolerance: float
    error: float
    direction: str
    advice: str
    reasons: tuple[str, ...]
    recommended: str | None = None
    process: str = "general"
    process_inferred: bool = True

    @property
    def adequate(self) -> bool:
        return self.rating == "adequate"

    @property
    def subject(self) -> str:
        """The judged quantity in words."""
        return SUBJECTS[self.quantity]


def rating(error: float, tolerance: float) -> str:
    """``adequate`` within the tolerance, ``marginal`` within twice it, else ``inadequate``."""
    if error <= tolerance:
        return "adequate"
    return "marginal" if error <= 2 * tolerance else "inadequate"


def judge(
    findings: dict,
    quantity: str,
    tolerance: float,
    drive: float,
    process: str | None = None,
) -> Verdict:
    """The verdict on ``quantity`` from the assessment's ``findings`` (its fields by name);
    ``drive`` = T0 − T_eq in K (> 0 cooling, < 0 heating); the words chosen for ``process``
    (None: inferred by :func:`.process_words.infer_process`)."""
    check_process(process)
    inferred = process is None
    if process is None:
        lumped = findings["lumped"]
        process = infer_process(
            findings["solution"].model,
            lumped.initial_temperature,
            lumped.equilibrium,
            findings["target"],
        )
    if quantity in ("slowest", "mean"):
        error, direction, reasons = _temperature_error(
            findings, quantity, tolerance, drive, process
        )
    elif quantity == "peak_difference":
        error, direction, reasons = _difference_error(findings, drive, process)
    else:
        error, direction, reasons = _time_error(findings, tolerance)
    rated = rating(error, tolerance)
    reasons += _context(findings, quantity)
    advice, recommended = _advice(findings, rated, quantity, tolerance)
    return Verdict(
        rated,
        quantity,
        float(tolerance),
        float(error),
        direction,
        advice,
        tuple(reasons),
        recommended,
        process,
        inferred,
    )


def _temperature_error(
    findings, quantity, tolerance, drive, process
) -> tuple[float, str, list[str]]:
    heating = drive < 0
    verb = "heats" if heating else "cools"
    subject = SUBJECTS[quantity]
    e = findings["errors"][f"classical vs {quantity}"]
    reasons = [
        f"largest lumped error against {subject}: {e.largest:.3g} K, "
        f"{100 * e.fraction:.2f} % of the driving difference of {abs(drive):.4g} K (at "
        f"t = {duration_text(e.time)}); the tolerance is {100 * tolerance:.3g} %"
    ]
    if e.lumped_ahead:
        direction = (
            f"the lumped estimate runs ahead of {subject}: it says the part "
            f"{verb} faster than it does — "
            + process_words(process, "heating" if heating else "cooling")
        )
    else:
        direction = (
            f"the lumped estimate lags behind {subject}: the part {verb} faster "
            "than it says — conservative for the time to get there"
        )
    return e.fraction, direction, reasons


def _difference_error(findings, drive, process) -> tuple[float, str, list[str]]:
    peak = findings["peak_internal_difference"]
    error = peak / abs(drive)
    reasons = [
        f"the section's largest internal temperature difference is "
        f"{peak:.3g} K ({100 * error:.2f} % of the driving "
        f"difference of {abs(drive):.4g} K) at t = "
        f"{duration_text(findings['peak_internal_difference_time'])}; a lumped model has none"
    ]
    direction = (
        "the lumped estimate says the part stays uniform: it hides the internal temperature "
        f"difference {process_words(process, 'difference')}"
    )
    return error, direction, reasons


def _time_error(findings, tolerance) -> tuple[float, str, list[str]]:
    times_to = findings["time_to_target"]
    lumped_time, field_time = times_to.get("classical"), times_to.get("slowest")
    if field_time is None or lumped_time is None or field_time <= 0:
        raise AdvisorError(
            "the time to target cannot be judged: the slowest point or the lumped model "
            "does not reach the target within the run; run longer"
        )
    error = abs(lumped_time - field_time) / field_time
    early = lumped_time < field_time
    reasons = [
        f"the lumped estimate reaches {findings['target']:g} °C at {duration_text(lumped_time)}, "
        f"the slowest point at {duration_text(field_time)} ({100 * error:.1f} % "
        f"{'early' if early else 'late'}); the tolerance is {100 * tolerance:.3g} %"
    ]
    direction = (
        "the lumped estimate says the part is through too early — non-conservative"
        if early
        else "the lumped estimate says the part is through later than it is — conservative"
    )
    return error, direction, reasons


def biot_spread_words(bi) -> str:
    """How a Biot number varies: across regions (each region's own conductivity) and over
    the run (coefficients and conductivity over time and temperature), kept apart."""
    words = []
    if bi.regions:
        least = max(bi.regions, key=bi.regions.get, default="")
        each = ", ".join(f"{r} {v:.3g}" for r, v in bi.regions.items())
        words.append(f"with the least conductive region's k ({least}); per region {each}")
    if f"{bi.low:.3g}" == f"{bi.high:.3g}":
        words.append("constant over the run")
    else:
        words.append(f"over the run {bi.low:.3g} to {bi.high:.3g}")
    return " (" + "; ".join(words) + ")"


def _context(findings, quantity) -> list[str]:
    """The Biot number, the slowest mode and (when judged on something else) the time to
    target: the figures that explain the rating."""
    bi, mode = findings["biot"][0], findings["mode"]
    if bi.high < COMMON_LIMIT:
        against = f"below the common-practice limit of {COMMON_LIMIT} throughout"
    elif bi.value < COMMON_LIMIT:
        against = (
            f"below the common-practice limit of {COMMON_LIMIT} at the start, above it "
            "during the run"
        )
    else:
        against = f"not below the common-practice limit of {COMMON_LIMIT}"
    reasons = [
        f"Biot number (V/A_s) = {bi.value:.3g}{biot_spread_words(bi)}: {against}",
        f"slowest-mode ratio {mode.ratio:.3g}: the part's last temperature difference decays "
        f"at {100 * mode.ratio:.3g} % of the lumped rate (a lumped model would need h = "
        f"{mode.equivalent_coefficient:.4g} W/(m²·K))",
    ]
    target = findings["target"]
    if target is not None and quantity != "time_to_target":
        times_to = findings["time_to_target"]
        lumped_time, field_time = times_to.get("classical"), times_to.get("slowest")
        if field_time is None:
            reasons.append("the slowest point does not reach the target within the run")
        elif lumped_time is not None and field_time > 0:
            change = 100 * (lumped_time - field_time) / field_time
            reasons.append(
                f"the lumped estimate reaches {target:g} °C at {duration_text(lumped_time)}, "
                f"{abs(change):.1f} % {'earlier' if change < 0 else 'later'} than the slowest "
                f"point ({duration_text(field_time)})"
            )
    return reasons


def _advice(findings: dict, rated: str, quantity: str, tolerance: float) -> tuple[str, str | None]:
    """The advice in words and the key of the model it recommends (None: the field)."""
    tail = (
        " The run's own checks flagged problems (see the checks): refine the mesh or the "
        "step before relying on these figures."
        if findings["solution"].checks.warnings
        else ""
    )
    if rated == "adequate":
        return "The classical lumped estimate will do for this quantity." + tail, "classical"
    if quantity in ("slowest", "mean"):
        for key, label in ADVICE_CANDIDATES:
            e = findings["errors"].get(f"{key} vs {quantity}")
            if e is not None and e.fraction <= tolerance:
                extra = ""
                if key == "corrected":
                    h = findings["corrected"].surface_coefficient
                    extra = f", h_eff = {h:.4g} W/(m²·K)"
                return (
                    f"Use {label} ({100 * e.fraction:.2f} % error{extra}) or the field "
                    "result." + tail,
                    key,
                )
    return "Use the field result: no lumped model is within the tolerance." + tail, None
