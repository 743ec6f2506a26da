"""How far a computed answer is from its mesh-independent value: the grid convergence index.

The procedure is that of Celik, Ghia, Roache, Freitas, Coleman & Raad, "Procedure for
estimation and reporting of uncertainty due to discretization in CFD applications", J. Fluids
Eng. 130 (2008) 078001: three grids of representative sizes h1 < h2 < h3 (h = sqrt(area / N)
for triangles), the apparent order p from a fixed-point iteration that carries the sign of the
ratio of successive changes (needed when the refinement ratios differ), Richardson's
extrapolated value, the approximate and extrapolated relative errors, and the fine-grid
convergence index GCI = 1.25·e_a/(r21^p − 1). With more than three grids each consecutive
triple is judged in turn.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import AdvisorError

SAFETY_FACTOR = 1.25  # Celik et al. (2008), for three or more grids
MAX_ITERATIONS = 100
ORDER_TOLERANCE = 1e-12


@dataclass(frozen=True)
class GridConvergence:
    """The grid convergence index of one answer on three grids (1 the finest).

    Attributes
    ----------
    sizes : tuple of float
        Representative sizes h1 < h2 < h3, m (or any one length unit).
    values : tuple of float
        The answer φ1, φ2, φ3 on those grids, in its own unit.
    ratios : tuple of float
        r21 = h2/h1 and r32 = h3/h2.
    order : float
        Apparent order p.
    extrapolated : float
        φ_ext21 = (r21^p·φ1 − φ2)/(r21^p − 1), in the answer's unit.
    approximate_error : float
        e_a21 = |(φ1 − φ2)/φ1|, a fraction.
    extrapolated_error : float
        e_ext21 = |(φ_ext21 − φ1)/φ_ext21|, a fraction.
    gci_fine : float
        GCI_fine21 = 1.25·e_a21/(r21^p − 1), a fraction.
    behaviour : str
        ``"monotone"`` (0 < ε21/ε32 < ln r21/ln r32, which is 1 for equal ratios),
        ``"oscillatory"`` (ε21/ε32 < 0), ``"diverging"`` (larger) or
        ``"converged"`` (no change between the two finest grids).
    """

    sizes: tuple[float, float, float]
    values: tuple[float, float, float]
    ratios: tuple[float, float]
    order: float
    extrapolated: float
    approximate_error: float
    extrapolated_error: float
    gci_fine: float
    behaviour: str

    @property
    def oscillatory(self) -> bool:
        """True when the answer moves up and down as the grid is refined."""
        return self.behaviour == "oscillatory"


def _check(sizes: Sequence[float], values: Sequence[float]) -> None:
    if len(sizes) != len(values) or len(sizes) < 3:
        raise AdvisorError(
            f"grid convergence needs three or more grids with one value each; got "
            f"{len(sizes)} sizes and {len(values)} values"
        )
    if any(not (h > 0 and math.isfinite(h)) for h in sizes):
        raise AdvisorError(f"grid sizes must be positive and finite; got {list(sizes)}")
    if any(b <= a for a, b in zip(sizes[:-1], sizes[1:], strict=True)):
        raise AdvisorError(f"grid sizes must grow strictly from the finest; got {list(sizes)}")
    if any(not math.isfinite(v) for v in values):
        raise AdvisorError(f"grid values must be finite; got {list(values)}")


def apparent_order(r21: float, r32: float, change21: float, change32: float) -> float:
    """Apparent order p by the fixed-point iteration of Celik et al. (2008), eq. 5.

    p = |ln|ε32/ε21| + q(p)| / ln r21, q(p) = ln((r21^p − s)/(r32^p − s)), s = sign(ε32/ε21),
    with ε21 = φ2 − φ1 and ε32 = φ3 − φ2. For equal ratios q = 0 and p is found at once.
    Where the fixed point repels (some unequal ratio pairs), the same equation is solved by
    bracketing on p in (0, 64].

    Raises
    ------
    AdvisorError
        If a change is zero (no order can be observed) or no order in (0, 64] solves it.
    """
    if change21 == 0.0 or change32 == 0.0:
        raise AdvisorError(
            f"no order can be observed: a change between grids is zero "
            f"(ε21 = {change21:g}, ε32 = {change32:g})"
        )
    sign = 1.0 if change32 / change21 > 0 else -1.0
    log_ratio = math.log(abs(change32 / change21))

    def update(order: float) -> float:
        numerator, denominator = r21**order - sign, r32**order - sign
        return abs(log_ratio + math.log(numerator / denominator)) / math.log(r21)

    order = max(abs(log_ratio) / math.log(r21), 0.1)  # the equal-ratio value as a start
    for _ in range(MAX_ITERATIONS):
        try:
            updated = update(order)
        except (ValueError, ZeroDivisionError, OverflowError):
            break
        if abs(updated - order) <= ORDER_TOLERANCE * max(1.0, updated):
            return updated
        order = updated
    # The fixed point repels for some ratio pairs: find the same root by bracketing.
    return _order_by_bracketing(update, (r21, r32, change21, change32))


def _order_by_bracketing(update, figures: tuple[float, ...]) -> float:
    """The root of p − update(p) on (0, 64], bracketed on a logarithmic grid."""
    from scipy.optimize import brentq

    def residual(order: float) -> float:
        return order - update(order)

    grid = [2.0**k for k in range(-10, 7)]
    previous = None
    for order in grid:
        try:
            value = residual(order)
        except (ValueError, ZeroDivisionError, OverflowError):
            previous = None
            continue
        if previous is not None and previous[1] * value <= 0:
            return float(brentq(residual, previous[0], order, xtol=1e-14, rtol=1e-14))
        previous = (order, value)
    r21, r32, change21, change32 = figures
    raise AdvisorError(
        f"no apparent order in (0, 64] (r21 = {r21:g}, r32 = {r32:g}, ε21 = {change21:g}, "
        f"ε32 = {change32:g})"
    )


def grid_convergence(sizes: Sequence[float], values: Sequence[float]) -> GridConvergence:
    """The grid convergence index of an answer on three grids, finest first.

    Parameters
    ----------
    sizes : sequence of 3 float
        Representative sizes h1 < h2 < h3 (any one length unit).
    values : sequence of 3 float
        The answer on each grid, in its own unit.

    Returns
    -------
    GridConvergence

    Examples
    --------
    >>> g = grid_convergence([1.0, 2.0, 4.0], [1.01, 1.04, 1.16])  # φ = 1 + 0.01·h²
    >>> round(g.order, 6), round(g.extrapolated, 6)
    (2.0, 1.0)
    """
    _check(sizes, values)
    h1, h2, h3 = (float(h) for h in sizes[:3])
    f1, f2, f3 = (float(v) for v in values[:3])
    r21, r32 = h2 / h1, h3 / h2
    change21, change32 = f2 - f1, f3 - f2
    if change21 == 0.0:
        return GridConvergence(
            (h1, h2, h3), (f1, f2, f3), (r21, r32), math.inf, f1, 0.0, 0.0, 0.0, "converged"
        )
    quotient = change21 / change32 if change32 != 0.0 else math.inf
    # φ = φ_ext + C·h^p with p > 0 gives 0 < ε21/ε32 < ln r21/ln r32 (the p → 0 limit; 1 for
    # equal ratios), so a larger quotient means the changes grow as the grid is refined.
    behaviour = (
        "oscillatory"
        if quotient < 0
        else "monotone"
        if quotient < math.log(r21) / math.log(r32)
        else "diverging"
    )
    order = apparent_order(r21, r32, change21, change32)
    growth = r21**order
    extrapolated = (growth * f1 - f2) / (growth - 1.0)
    approximate = abs((f1 - f2) / f1) if f1 != 0 else math.inf
    extrapolated_error = abs((extrapolated - f1) / extrapolated) if extrapolated else math.inf
    gci = SAFETY_FACTOR * approximate / (growth - 1.0)
    return GridConvergence(
        (h1, h2, h3),
        (f1, f2, f3),
        (r21, r32),
        order,
        extrapolated,
        approximate,
        extrapolated_error,
        gci,
        behaviour,
    )


def grid_convergence_series(
    sizes: Sequence[float], values: Sequence[float]
) -> list[GridConvergence]:
    """The index of each consecutive triple of grids, finest triple first.

    ``sizes`` and ``values`` may come in any order; they are sorted by size. The first entry
    judges the finest grid.
    """
    if len(sizes) != len(values):
        _check(sizes, values)  # raises, naming both counts
    pairs = sorted(zip((float(h) for h in sizes), (float(v) for v in values), strict=True))
    ordered_sizes = [h for h, _ in pairs]
    ordered_values = [v for _, v in pairs]
    _check(ordered_sizes, ordered_values)
    return [
        grid_convergence(ordered_sizes[i : i + 3], ordered_values[i : i + 3])
        for i in range(len(pairs) - 2)
    ]


def recommended_grid(
    series: Sequence[GridConvergence], threshold: float = 0.01
) -> GridConvergence | None:
    """The coarsest triple whose fine-grid index is below ``threshold`` (a fraction) in
    monotone or converged behaviour; None when no triple qualifies.

    The fine grid of the returned triple (``sizes[0]``) is the mesh to use.
    """
    if not 0 < threshold < 1:
        raise AdvisorError(f"the GCI threshold must be a fraction in (0, 1); got {threshold!r}")
    good = [
        g for g in series if g.behaviour in ("monotone", "converged") and g.gci_fine <= threshold
    ]
    return max(good, key=lambda g: g.sizes[0]) if good else None
