"""Where the lumped estimate holds: validity maps and design rules from a study's table.

A study's table has one row per case: the swept inputs (columns named by their case-file key
paths, SI values) and the answers (Biot numbers, the largest lumped errors as fractions of the
driving difference, ...). A validity map puts the lumped errors of a model against one swept
input or a Biot number and rates each case as :func:`advisor.analysis.verdict.rating` does
(adequate within the tolerance, marginal within twice it). A design rule is the value of that
input where the error reaches the tolerance, found by monotone piecewise-cubic (PCHIP) or
piecewise-linear interpolation of log(error) against log(input) between cases, and refined by
bisection with one more case at a time on request.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field, replace

import numpy as np

from ..analysis.verdict import SUBJECTS, rating
from ..errors import AdvisorError

DEFAULT_ERRORS = {"classical": "lumped_error_classical", "corrected": "lumped_error_corrected"}
FAILED_STATUSES = ("failed", "error")
INTERPOLATIONS = ("pchip", "linear")
# How inputs are named in words: (end of the column name, symbol, unit, scale from SI).
VARIABLE_WORDS = (
    ("convection.coefficient", "h", "W/(m²·K)", 1.0),
    ("heat_transfer_coefficient", "h", "W/(m²·K)", 1.0),
    ("mesh_size", "mesh size", "mm", 1e3),
    ("conductivity", "k", "W/(m·K)", 1.0),
    ("density", "ρ", "kg/m³", 1.0),
    ("specific_heat", "c", "J/(kg·K)", 1.0),
    ("emissivity", "ε", "", 1.0),
    ("ambient", "ambient", "°C", 1.0),
    ("temperature", "temperature", "°C", 1.0),
    ("width", "width", "mm", 1e3),
    ("height", "height", "mm", 1e3),
    ("radius", "radius", "mm", 1e3),
    ("diameter", "diameter", "mm", 1e3),
    ("thickness", "thickness", "mm", 1e3),
)


def variable_words(column: str) -> tuple[str, str, float]:
    """The symbol, unit and scale from SI of a column (``"h"``, ``"W/(m²·K)"``, 1.0).

    Biot numbers (columns starting ``biot``) read ``Bi``; an unknown column keeps its name.
    """
    if column.startswith("biot"):
        return "Bi", "", 1.0
    for ending, symbol, unit, scale in VARIABLE_WORDS:
        if column.endswith(ending):
            return symbol, unit, scale
    return column, "", 1.0


def quantity_text(column: str, value: float) -> str:
    """``"h = 412 W/(m²·K)"``: a value of a column in words, three significant figures."""
    symbol, unit, scale = variable_words(column)
    return f"{symbol} = {value * scale:.3g}{' ' + unit if unit else ''}"


@dataclass(frozen=True)
class ValidityMap:
    """The lumped errors of each model against one input, cases sorted by that input.

    Attributes
    ----------
    variable : str
        The column on the horizontal axis (a case key path or a Biot number's column).
    values : ndarray
        Its values, increasing, in SI units; one per distinct value among the finished cases.
    errors : dict of str to ndarray
        For each lumped model, its largest error at each value as a fraction of the driving
        difference (the worst over cases that share the value).
    tolerance : float
        The acceptable error, a fraction.
    subject : str
        What the errors are about, in words (``"the slowest point"``).
    """

    variable: str
    values: np.ndarray
    errors: dict[str, np.ndarray]
    tolerance: float
    subject: str = SUBJECTS["slowest"]
    ratings: dict[str, tuple[str, ...]] = field(init=False, repr=False)

    def __post_init__(self) -> None:
        rated = {
            model: tuple(rating(float(e), self.tolerance) for e in errors)
            for model, errors in self.errors.items()
        }
        object.__setattr__(self, "ratings", rated)


def _finished(table, columns: Sequence[str], status: str | None):
    """The rows of ``table`` that finished and have finite values in ``columns``."""
    missing = [c for c in columns if c not in table.columns]
    if missing:
        raise AdvisorError(
            f"the study table has no column(s) {missing}; it has {list(table.columns)}"
        )
    keep = np.ones(len(table), dtype=bool)
    if status is not None and status in table.columns:
        keep &= ~table[status].astype(str).str.lower().isin(FAILED_STATUSES).to_numpy()
    for column in columns:
        keep &= np.isfinite(table[column].to_numpy(dtype=float))
    return table[keep]


def validity_map(
    table,
    variable: str = "biot_volume_to_surface",
    *,
    errors: Mapping[str, str] = DEFAULT_ERRORS,
    tolerance: float = 0.05,
    subject: str = SUBJECTS["slowest"],
    status: str | None = "status",
) -> ValidityMap:
    """The lumped errors of each model against ``variable``, from a study's table.

    Parameters
    ----------
    table : pandas.DataFrame
        One row per case.
    variable : str
        The column for the horizontal axis: a swept input (its case key path) or a Biot
        number's column; positive values.
    errors : mapping of str to str
        Lumped model name → the column of its largest error (a fraction).
    tolerance : float
        Acceptable error, a fraction in (0, 1).
    subject : str
        What the errors judge, in words, for the design rule's sentence.
    status : str or None
        The column of each case's status; rows marked failed are left out.

    Returns
    -------
    ValidityMap
        Failed cases and cases without a value are left out; cases that share a value of
        ``variable`` (a grid over other inputs) count by their largest error.

    Examples
    --------
    >>> import pandas as pd
    >>> table = pd.DataFrame({"biot_volume_to_surface": [0.01, 0.1, 1.0],
    ...     "lumped_error_classical": [0.004, 0.04, 0.3]})
    >>> vmap = validity_map(table, errors={"classical": "lumped_error_classical"})
    >>> vmap.ratings["classical"]
    ('adequate', 'adequate', 'inadequate')
    """
    if not 0 < tolerance < 1:
        raise AdvisorError(f"the tolerance must be a fraction in (0, 1); got {tolerance!r}")
    if not errors:
        raise AdvisorError("a validity map needs at least one lumped model's error column")
    rows = _finished(table, [variable, *errors.values()], status)
    if len(rows) == 0:
        raise AdvisorError(f"no finished case has values for {variable!r} and the errors")
    grouped = rows.groupby(variable, sort=True)[list(errors.values())].max()
    values = grouped.index.to_numpy(dtype=float)
    if np.any(values <= 0):
        raise AdvisorError(f"{variable!r} must be positive for a validity map; got {values}")
    found = {model: grouped[column].to_numpy(dtype=float) for model, column in errors.items()}
    return ValidityMap(variable, values, found, float(tolerance), subject)


@dataclass(frozen=True)
class DesignRule:
    """Up to which value of an input a lumped model stays within a tolerance.

    Attributes
    ----------
    variable, model : str
        The input (column) and the lumped model.
    tolerance : float
        A fraction.
    limit : float or None
        Where the error first reaches the tolerance, in SI units (None if it never does in
        the range studied, or is above it from the start).
    bracket : tuple of float
        The two neighbouring values the limit lies between (cases run), SI units.
    status : str
        ``"limit"``, ``"everywhere"`` (within the tolerance over the whole range) or
        ``"nowhere"`` (above it already at the smallest value).
    text : str
        The rule in words.
    subject, where : str
        What the error judges and where the rule holds, in words (they make ``text``).
    """

    variable: str
    model: str
    tolerance: float
    limit: float | None
    bracket: tuple[float, float]
    status: str
    text: str
    subject: str = SUBJECTS["slowest"]
    where: str = "for this section"


def _log_interpolant(values: np.ndarray, errors: np.ndarray, interpolation: str):
    """log(error) as a function of log(value): PCHIP or piecewise linear, monotone-preserving."""
    x, y = np.log(values), np.log(np.maximum(errors, 1e-300))
    if interpolation == "linear" or len(x) < 3:
        return lambda s: np.interp(s, x, y)
    from scipy.interpolate import PchipInterpolator

    return PchipInterpolator(x, y, extrapolate=False)


def _crossing(values, errors, level, interpolation) -> tuple[float | None, tuple[float, float]]:
    """The first value where the interpolated error reaches ``level`` going up in value."""
    above = np.flatnonzero(errors >= level)
    if len(above) == 0:
        return None, (float(values[-1]), float(values[-1]))
    first = int(above[0])
    if first == 0:
        return None, (float(values[0]), float(values[0]))
    lower, upper = float(values[first - 1]), float(values[first])
    curve = _log_interpolant(values, errors, interpolation)
    from scipy.optimize import brentq

    target = math.log(level)
    root = brentq(lambda s: float(curve(s)) - target, math.log(lower), math.log(upper), xtol=1e-13)
    return math.exp(root), (lower, upper)


def design_rule(
    vmap: ValidityMap,
    model: str = "classical",
    *,
    tolerance: float | None = None,
    interpolation: str = "pchip",
    where: str = "for this section",
) -> DesignRule:
    """The largest value of the map's input up to which ``model`` is within the tolerance.

    Parameters
    ----------
    vmap : ValidityMap
    model : str
        One of the map's lumped models.
    tolerance : float, optional
        A fraction; the map's tolerance by default.
    interpolation : str
        ``"pchip"`` (monotone cubic in log–log) or ``"linear"`` (piecewise linear in log–log).
    where : str
        Closes the sentence (``"for this section"``).

    Returns
    -------
    DesignRule
        The first crossing of the tolerance as the input grows, between the two cases around
        it.
    """
    if model not in vmap.errors:
        raise AdvisorError(f"no lumped model {model!r} in the map; it has {list(vmap.errors)}")
    if interpolation not in INTERPOLATIONS:
        raise AdvisorError(f"interpolation must be one of {INTERPOLATIONS}; got {interpolation!r}")
    level = vmap.tolerance if tolerance is None else float(tolerance)
    if not 0 < level < 1:
        raise AdvisorError(f"the tolerance must be a fraction in (0, 1); got {level!r}")
    errors = vmap.errors[model]
    limit, bracket = _crossing(vmap.values, errors, level, interpolation)
    status = "limit" if limit is not None else "nowhere" if errors[0] >= level else "everywhere"
    return DesignRule(
        vmap.variable,
        model,
        level,
        limit,
        bracket,
        status,
        _rule_text(vmap, model, level, limit, status, where),
        vmap.subject,
        where,
    )


def _limit_text(model, level, subject, variable, limit, where) -> str:
    return (
        f"The {model} lumped estimate is within {100 * level:.3g} % for {subject} up to "
        f"{quantity_text(variable, limit)} {where}."
    )


def _rule_text(vmap, model, level, limit, status, where) -> str:
    lead = f"The {model} lumped estimate is within {100 * level:.3g} % for {vmap.subject}"
    low, high = float(vmap.values[0]), float(vmap.values[-1])
    if status == "limit":
        return _limit_text(model, level, vmap.subject, vmap.variable, limit, where)
    if status == "everywhere":
        span = f"{quantity_text(vmap.variable, low)} to {quantity_text(vmap.variable, high)}"
        return f"{lead} over the whole range studied ({span}) {where}."
    return (
        f"The {model} lumped estimate is not within {100 * level:.3g} % for {vmap.subject} "
        f"anywhere in the range studied (from {quantity_text(vmap.variable, low)}) {where}."
    )


def refine_rule(
    rule: DesignRule,
    evaluate: Callable[[float], float],
    *,
    relative_width: float = 1e-3,
    max_cases: int = 12,
) -> tuple[DesignRule, list[tuple[float, float]]]:
    """Narrow a design rule's bracket by bisection, one more case at a time.

    Parameters
    ----------
    rule : DesignRule
        With ``status == "limit"``.
    evaluate : callable
        ``evaluate(value)`` runs one case at that input value (SI) and returns the model's
        error, a fraction.
    relative_width : float
        Stop when upper/lower − 1 is below this.
    max_cases : int
        At most this many extra cases.

    Returns
    -------
    rule : DesignRule
        With the narrowed bracket and the limit interpolated in log–log inside it.
    cases : list of (value, error)
        The cases run, in order.
    """
    if rule.status != "limit":
        raise AdvisorError(f"only a rule with a limit can be refined; this one is {rule.status!r}")
    lower, upper = rule.bracket
    error_lower = error_upper = None
    cases: list[tuple[float, float]] = []
    while upper / lower - 1 > relative_width and len(cases) < max_cases:
        middle = math.sqrt(lower * upper)  # bisection in log space
        error = float(evaluate(middle))
        if not math.isfinite(error):
            raise AdvisorError(f"the case at {middle:g} gave no error ({error!r})")
        cases.append((middle, error))
        if error < rule.tolerance:
            lower, error_lower = middle, error
        else:
            upper, error_upper = middle, error
    limit = _within(lower, upper, error_lower, error_upper, rule.tolerance)
    text = _limit_text(rule.model, rule.tolerance, rule.subject, rule.variable, limit, rule.where)
    return replace(rule, limit=limit, bracket=(lower, upper), text=text), cases


def _within(lower, upper, error_lower, error_upper, level) -> float:
    """The crossing inside [lower, upper]: log–log linear when both ends were run, else the
    geometric middle."""
    if error_lower and error_upper and error_upper > error_lower:
        fraction = math.log(level / error_lower) / math.log(error_upper / error_lower)
        return math.exp(math.log(lower) + fraction * math.log(upper / lower))
    return math.sqrt(lower * upper)


def rating_regions(
    vmap: ValidityMap, model: str = "classical", *, interpolation: str = "pchip"
) -> list[tuple[float, float, str]]:
    """Intervals of the input, (from, to, rating), over the map's range, for shading a plot.

    The boundaries are where the interpolated error crosses the tolerance and twice it.
    """
    if model not in vmap.errors:
        raise AdvisorError(f"no lumped model {model!r} in the map; it has {list(vmap.errors)}")
    values, errors = vmap.values, vmap.errors[model]
    if len(values) == 1:
        return [(float(values[0]), float(values[0]), rating(float(errors[0]), vmap.tolerance))]
    curve = _log_interpolant(values, errors, interpolation)
    grid = np.exp(np.linspace(math.log(values[0]), math.log(values[-1]), 801))
    rated = [rating(float(math.exp(curve(math.log(x)))), vmap.tolerance) for x in grid]
    edges, labels = [float(grid[0])], [rated[0]]
    for i in range(1, len(grid)):
        if rated[i] != labels[-1]:  # the boundary at the geometric middle of two grid points
            edges.append(math.sqrt(float(grid[i - 1]) * float(grid[i])))
            labels.append(rated[i])
    edges.append(float(grid[-1]))
    return [(edges[k], edges[k + 1], label) for k, label in enumerate(labels)]
