"""Anderson acceleration of the simplified Newton iteration on a kept tangent.

Simplified Newton is the fixed-point iteration u ← g(u) = u − J⁻¹r(u) with an old tangent J.
Anderson's mixing (Anderson 1965; in the form of Walker & Ni, *SIAM J. Numer. Anal.* 49, 2011,
from memory) keeps the last few iterates u_j and their updates f_j = g(u_j) − u_j and takes

    u_k+1 = u_k + f_k − (ΔU + ΔF)·γ,   γ = argmin ‖f_k − ΔF·γ‖₂,

ΔU, ΔF the differences of successive iterates and updates. On a linear problem it is GMRES on
the preconditioned system (Walker & Ni), so the few directions in which the kept tangent is
wrong (a node that entered the freezing range since the factorisation, a boundary node whose
coefficient moved along the curve) are corrected in about one iteration each, instead of
converging at the chord's rate. The cost is a small least-squares problem per iteration.
"""

from __future__ import annotations

import numpy as np

DEPTH = 5  # iterates kept for the mixing


class AndersonMixing:
    """The mixed update of a fixed-point iteration, from the iterates seen since
    :meth:`reset` (all on the free degrees of freedom)."""

    def __init__(self, depth: int = DEPTH):
        self.depth = depth
        self.reset()

    def reset(self) -> None:
        """Forget the history (the tangent that defines the updates changed)."""
        self._last: tuple[np.ndarray, np.ndarray] | None = None
        self._steps: list[np.ndarray] = []  # ΔU columns, oldest first
        self._differences: list[np.ndarray] = []  # ΔF columns

    def update(self, iterate: np.ndarray, update: np.ndarray) -> np.ndarray:
        """The mixed change to add to ``iterate`` (K), given its simplified-Newton ``update``
        (K); the plain update while fewer than two iterates are known."""
        if self._last is not None:
            self._steps.append(iterate - self._last[0])
            self._differences.append(update - self._last[1])
            if len(self._steps) > self.depth:
                self._steps.pop(0)
                self._differences.pop(0)
        self._last = (iterate.copy(), update.copy())
        if not self._steps:
            return update
        differences = np.array(self._differences).T  # ΔF, one column per pair
        scale = float(np.abs(differences).max(initial=0.0))
        if scale == 0.0:
            return update
        gamma, *_ = np.linalg.lstsq(differences / scale, update / scale, rcond=1e-10)
        return update - (np.array(self._steps).T + differences) @ gamma
