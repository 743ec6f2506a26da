"""Distributions of uncertain inputs and the points of the unit cube they transform.

A sampled study draws ``samples`` points u in [0, 1)^d, one column per uncertain input in the
order the study lists them, and maps each column through its distribution's quantile function
(inverse transform sampling):

- ``random``: ``numpy.random.default_rng(seed).random((samples, d))``;
- ``latin-hypercube``: ``scipy.stats.qmc.LatinHypercube(d, rng=numpy.random.default_rng(seed))
  .random(samples)`` (one point in each of ``samples`` equal slices of every input).

Distributions (magnitudes in the unit of their first parameter):

- ``uniform(low, high)``: x = low + u·(high − low);
- ``normal(mean, deviation)``: x = mean + deviation·Φ⁻¹(u);
- ``lognormal(median, log_deviation)``: x = median·exp(log_deviation·Φ⁻¹(u)), log_deviation
  the standard deviation of ln x (a plain number);
- ``triangular(low, mode, high)``: the quantile of scipy.stats.triang.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..casefile.reader import CaseError

SAMPLINGS = ("random", "latin-hypercube")
# distribution: its parameters in order, and which of them are differences (spreads)
DISTRIBUTIONS: dict[str, tuple[tuple[str, ...], tuple[str, ...]]] = {
    "uniform": (("low", "high"), ()),
    "normal": (("mean", "deviation"), ("deviation",)),
    "lognormal": (("median", "log_deviation"), ()),
    "triangular": (("low", "mode", "high"), ()),
}


@dataclass(frozen=True)
class Distribution:
    """An uncertain input's distribution.

    Parameters
    ----------
    kind : str
        One of :data:`DISTRIBUTIONS`.
    parameters : tuple of float
        In the order :data:`DISTRIBUTIONS` lists them, in ``unit`` (``log_deviation`` is a
        plain number).
    unit : str
        The unit of the values, as written in the specification (``""`` for plain numbers).
    """

    kind: str
    parameters: tuple[float, ...]
    unit: str

    def __post_init__(self):
        check_parameters(self.kind, self.parameters, self.kind)

    def quantile(self, u: np.ndarray) -> np.ndarray:
        """The values at probabilities ``u`` in [0, 1), in ``unit``."""
        from scipy import stats

        u = np.asarray(u, dtype=float)
        p = self.parameters
        if self.kind == "uniform":
            return p[0] + u * (p[1] - p[0])
        if self.kind == "normal":
            return p[0] + p[1] * stats.norm.ppf(u)
        if self.kind == "lognormal":
            return p[0] * np.exp(p[1] * stats.norm.ppf(u))
        low, mode, high = p
        return stats.triang.ppf(u, (mode - low) / (high - low), loc=low, scale=high - low)


def check_parameters(kind: str, p: tuple[float, ...], where: str) -> None:
    """Refuse parameters that define no distribution, naming what would be valid."""
    if kind not in DISTRIBUTIONS:
        raise CaseError(
            f"{where}: distribution must be one of {list(DISTRIBUTIONS)}, got {kind!r}"
        )
    names = DISTRIBUTIONS[kind][0]
    if len(p) != len(names) or not all(math.isfinite(x) for x in p):
        raise CaseError(f"{where}: {kind} takes {len(names)} finite values ({', '.join(names)})")
    if kind == "uniform" and not p[0] < p[1]:
        raise CaseError(f"{where}: uniform needs low < high, got {p[0]:g} and {p[1]:g}")
    if kind == "normal" and not p[1] > 0:
        raise CaseError(f"{where}: normal needs a deviation > 0, got {p[1]:g}")
    if kind == "lognormal" and not (p[0] > 0 and p[1] > 0):
        raise CaseError(f"{where}: lognormal needs median > 0 and log_deviation > 0, got {p}")
    if kind == "triangular" and not (p[0] <= p[1] <= p[2] and p[0] < p[2]):
        raise CaseError(f"{where}: triangular needs low <= mode <= high, low < high, got {p}")


def unit_cube(sampling: str, samples: int, dimensions: int, seed: int) -> np.ndarray:
    """``samples`` points in [0, 1)^``dimensions`` (see the module's description)."""
    rng = np.random.default_rng(seed)
    if sampling == "random":
        return rng.random((samples, dimensions))
    if sampling == "latin-hypercube":
        from scipy.stats import qmc

        try:
            engine = qmc.LatinHypercube(d=dimensions, rng=rng)
        except TypeError:  # scipy before 1.15 names it seed
            engine = qmc.LatinHypercube(d=dimensions, seed=rng)
        return engine.random(samples)
    raise CaseError(f"sampling must be one of {list(SAMPLINGS)}, got {sampling!r}")
