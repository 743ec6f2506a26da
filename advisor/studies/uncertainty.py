"""What a sampled study says about the spread of its answers and which input drives it.

For a study whose inputs were drawn from distributions (random or Latin-hypercube samples),
:func:`spread` gives an answer's mean, standard deviation and 5/50/95 % values, each quantile
with a bootstrap confidence interval (scipy's percentile bootstrap). :func:`rank_influence`
ranks the inputs by Spearman's rank correlation with the answer (scipy), which needs no model
and holds for any monotone dependence. On request, :func:`sobol_influence` estimates
first-order Sobol indices by random-balance-design FAST on the same sample (SALib, the optional
``uncertainty`` extra), the share of the answer's variance each input explains alone, and
:func:`chaos_influence` the same shares from a polynomial-chaos surrogate (chaospy, same
extra).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError

LEVELS = (0.05, 0.5, 0.95)
DEFAULT_ANSWERS = ("time_to_target_slowest_s", "peak_difference_K")
FAILED_STATUSES = ("failed", "error")


@dataclass(frozen=True)
class Spread:
    """The distribution of one answer over a sampled study.

    Attributes
    ----------
    column : str
        The answer's column.
    count : int
        Cases with a finite value (failed cases and those that never reached the target are
        left out; see ``missing``).
    missing : int
        Cases left out.
    mean, standard_deviation : float
        In the answer's unit (sample standard deviation, n − 1).
    quantiles : dict of float to float
        Level (0.05, 0.5, 0.95) → value, by linear interpolation of the order statistics.
    intervals : dict of float to (float, float)
        Level → bootstrap confidence interval of that quantile.
    confidence : float
        Confidence level of the intervals.
    values : ndarray
        The finite values, sorted.
    """

    column: str
    count: int
    missing: int
    mean: float
    standard_deviation: float
    quantiles: dict[float, float]
    intervals: dict[float, tuple[float, float]]
    confidence: float
    values: np.ndarray


def _column(table, column: str, status: str | None) -> tuple[np.ndarray, int]:
    if column not in table.columns:
        raise AdvisorError(
            f"the study table has no column {column!r}; it has {list(table.columns)}"
        )
    values = table[column].to_numpy(dtype=float)
    keep = np.isfinite(values)
    if status is not None and status in table.columns:
        keep &= ~table[status].astype(str).str.lower().isin(FAILED_STATUSES).to_numpy()
    return values[keep], int(len(values) - keep.sum())


def spread(
    table,
    column: str = "time_to_target_slowest_s",
    *,
    levels: Sequence[float] = LEVELS,
    confidence: float = 0.95,
    resamples: int = 2000,
    seed: int | None = 0,
    status: str | None = "status",
) -> Spread:
    """The mean, standard deviation and quantiles of an answer, with bootstrap intervals.

    Parameters
    ----------
    table : pandas.DataFrame
        One row per case.
    column : str
        The answer (e.g. ``"time_to_target_slowest_s"`` in s, ``"peak_difference_K"`` in K).
    levels : sequence of float
        Quantile levels in (0, 1).
    confidence : float
        Level of the bootstrap intervals, in (0, 1).
    resamples : int
        Bootstrap resamples.
    seed : int or None
        Seed of the bootstrap's random generator (reproducible intervals by default).
    status : str or None
        The status column; failed cases are left out.

    Returns
    -------
    Spread

    Examples
    --------
    >>> import pandas as pd
    >>> table = pd.DataFrame({"peak_difference_K": [10.0, 11.0, 12.0, 13.0, 14.0]})
    >>> s = spread(table, "peak_difference_K", resamples=200)
    >>> s.quantiles[0.5], s.mean
    (12.0, 12.0)
    """
    if any(not 0 < q < 1 for q in levels) or not 0 < confidence < 1:
        raise AdvisorError(
            f"quantile levels and the confidence must be in (0, 1); got {list(levels)}, "
            f"{confidence!r}"
        )
    values, missing = _column(table, column, status)
    if len(values) < 2:
        raise AdvisorError(
            f"{column!r}: a spread needs two or more finished cases with a value; "
            f"got {len(values)} ({missing} left out)"
        )
    values = np.sort(values)
    quantiles = {float(q): float(np.quantile(values, q)) for q in levels}
    intervals = _bootstrap(values, levels, confidence, resamples, seed)
    return Spread(
        column,
        len(values),
        missing,
        float(values.mean()),
        float(values.std(ddof=1)),
        quantiles,
        intervals,
        float(confidence),
        values,
    )


def _bootstrap(values, levels, confidence, resamples, seed) -> dict[float, tuple[float, float]]:
    """Percentile-bootstrap intervals of each quantile (scipy.stats.bootstrap)."""
    from scipy.stats import bootstrap

    if np.ptp(values) == 0:  # every case gave the same value: no spread to resample
        return {float(q): (float(values[0]), float(values[0])) for q in levels}
    rng = np.random.default_rng(seed)
    found = {}
    for q in levels:
        result = bootstrap(
            (values,),
            lambda sample, axis, q=q: np.quantile(sample, q, axis=axis),
            n_resamples=resamples,
            confidence_level=confidence,
            method="percentile",
            random_state=rng,
            vectorized=True,
        )
        interval = result.confidence_interval
        found[float(q)] = (float(interval.low), float(interval.high))
    return found


def varied_inputs(table, answers: Sequence[str] = ()) -> list[str]:
    """The columns that look like case key paths (they contain a dot) and take more than one
    value: a study's varied inputs."""
    return [
        c
        for c in table.columns
        if "." in str(c) and c not in answers and table[c].nunique(dropna=True) > 1
    ]


@dataclass(frozen=True)
class Influence:
    """How much one input moves one answer.

    Attributes
    ----------
    input, output : str
        Columns.
    method : str
        ``"spearman"`` (rank correlation in [−1, 1]; its sign is the direction) or
        ``"sobol first order (RBD-FAST)"`` (share of the variance in [0, 1]).
    value : float
    p_value : float or None
        For the rank correlation, the probability of so large a value without dependence.
    """

    input: str
    output: str
    method: str
    value: float
    p_value: float | None = None


def _paired(table, inputs, output, status) -> tuple[np.ndarray, np.ndarray]:
    missing = [c for c in [*inputs, output] if c not in table.columns]
    if missing:
        raise AdvisorError(f"the study table has no column(s) {missing}")
    rows = table
    if status is not None and status in table.columns:
        rows = rows[~rows[status].astype(str).str.lower().isin(FAILED_STATUSES)]
    x = rows[list(inputs)].to_numpy(dtype=float)
    y = rows[output].to_numpy(dtype=float)
    keep = np.isfinite(y) & np.all(np.isfinite(x), axis=1)
    if keep.sum() < max(3, len(inputs) + 1):
        raise AdvisorError(
            f"{output!r}: too few finished cases ({int(keep.sum())}) to rank {len(inputs)} inputs"
        )
    return x[keep], y[keep]


def rank_influence(
    table,
    output: str = "time_to_target_slowest_s",
    inputs: Sequence[str] | None = None,
    *,
    status: str | None = "status",
) -> list[Influence]:
    """Spearman's rank correlation of each input with ``output``, strongest first.

    Parameters
    ----------
    table : pandas.DataFrame
    output : str
        The answer's column.
    inputs : sequence of str, optional
        The input columns; by default :func:`varied_inputs`.
    status : str or None
        The status column; failed cases are left out.

    Returns
    -------
    list of Influence
        Sorted by |ρ| descending.
    """
    from scipy.stats import spearmanr

    inputs = list(inputs) if inputs is not None else varied_inputs(table, (output,))
    if not inputs:
        raise AdvisorError("no varied inputs (columns named by case key paths) in the table")
    x, y = _paired(table, inputs, output, status)
    found = []
    for k, name in enumerate(inputs):
        rho, p_value = spearmanr(x[:, k], y)
        value = 0.0 if math.isnan(rho) else float(rho)  # a constant column moves nothing
        found.append(Influence(name, output, "spearman", value, float(p_value)))
    return sorted(found, key=lambda i: -abs(i.value))


def sobol_influence(
    table,
    output: str = "time_to_target_slowest_s",
    inputs: Sequence[str] | None = None,
    *,
    status: str | None = "status",
    seed: int | None = 0,
) -> list[Influence]:
    """First-order Sobol indices of each input on ``output`` by RBD-FAST (SALib).

    Works on the study's own sample (random or Latin hypercube), so no special design is
    needed; the inputs should be independent. Needs the ``uncertainty`` extra.

    Returns
    -------
    list of Influence
        Sorted by the index, largest first.

    Raises
    ------
    AdvisorError
        If SALib is not installed (``pip install soakwise[uncertainty]``).
    """
    try:
        from SALib.analyze import rbd_fast
    except ImportError as error:
        raise AdvisorError(
            "Sobol indices need SALib: pip install 'soakwise[uncertainty]'"
        ) from error
    inputs = list(inputs) if inputs is not None else varied_inputs(table, (output,))
    if not inputs:
        raise AdvisorError("no varied inputs (columns named by case key paths) in the table")
    x, y = _paired(table, inputs, output, status)
    problem = {
        "num_vars": len(inputs),
        "names": list(inputs),
        "bounds": [[float(x[:, k].min()), float(x[:, k].max())] for k in range(len(inputs))],
    }
    result = rbd_fast.analyze(problem, x, y, seed=seed)
    method = "sobol first order (RBD-FAST)"
    found = [
        Influence(name, output, method, float(result["S1"][k])) for k, name in enumerate(inputs)
    ]
    return sorted(found, key=lambda i: -i.value)


def chaos_influence(
    table,
    output: str = "time_to_target_slowest_s",
    inputs: Sequence[str] | None = None,
    *,
    order: int = 3,
    distributions: dict | None = None,
    status: str | None = "status",
) -> list[Influence]:
    """First-order Sobol indices from a polynomial-chaos surrogate fitted to the sample
    (chaospy, the optional ``uncertainty`` extra).

    The answer is fitted by least squares with the orthogonal polynomials of the inputs'
    joint distribution up to total degree ``order``; the indices are the surrogate's
    variance shares, exact for the surrogate.

    Parameters
    ----------
    table : pandas.DataFrame
    output : str
    inputs : sequence of str, optional
        By default :func:`varied_inputs`.
    order : int
        Total polynomial degree, 1 or more; the sample must hold more cases than terms.
    distributions : dict of str to chaospy distribution, optional
        Each input's distribution; by default uniform over its sampled range (independent).
    status : str or None

    Returns
    -------
    list of Influence
        Sorted by the index, largest first.
    """
    try:
        import chaospy
    except ImportError as error:
        raise AdvisorError(
            "a polynomial-chaos surrogate needs chaospy: pip install 'soakwise[uncertainty]'"
        ) from error
    inputs = list(inputs) if inputs is not None else varied_inputs(table, (output,))
    if not inputs:
        raise AdvisorError("no varied inputs (columns named by case key paths) in the table")
    if order < 1:
        raise AdvisorError(f"the polynomial order must be 1 or more; got {order!r}")
    x, y = _paired(table, inputs, output, status)
    terms = math.comb(order + len(inputs), len(inputs))
    if len(y) <= terms:
        raise AdvisorError(
            f"{output!r}: a degree-{order} surrogate in {len(inputs)} inputs has {terms} terms; "
            f"the study has only {len(y)} finished cases"
        )
    given = distributions or {}
    marginals = [
        given.get(name) or chaospy.Uniform(float(x[:, k].min()), float(x[:, k].max()))
        for k, name in enumerate(inputs)
    ]
    joint = chaospy.J(*marginals)
    expansion = chaospy.generate_expansion(order, joint)
    surrogate = chaospy.fit_regression(expansion, x.T, y)
    first = np.atleast_1d(chaospy.Sens_m(surrogate, joint))
    method = f"sobol first order (polynomial chaos, degree {order})"
    found = [Influence(name, output, method, float(first[k])) for k, name in enumerate(inputs)]
    return sorted(found, key=lambda i: -i.value)
