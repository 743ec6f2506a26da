"""Whether the readings can identify what was asked: sensitivity, standard errors and the
correlation between fitted values, turned into a rating with reasons in words."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

CORRELATION_LIMIT = 0.95  # common practice: above this, two parameters trade off
RELATIVE_ERROR_LIMIT = 0.25  # a standard error above a quarter of the value: weakly determined


@dataclass(frozen=True)
class Identifiability:
    """Whether the readings determine the parameters: ``rating`` is ``"identified"``,
    ``"weakly identified"`` or ``"not identified"``; ``reasons`` say why in words."""

    rating: str
    reasons: tuple[str, ...]


def identifiability(parameters, values, errors, correlation, sensitivities, noise):
    """The verdict: a single value whose 10 % change moves no reading by more than the noise
    is not identified (a table node so insensitive makes the verdict weak); a standard error
    above 25 % of the value, or a correlation above 0.95 between parameters of different
    requests (or single values), makes it weak."""
    names = parameters.names
    owner = np.concatenate([np.full(b.size, i) for i, b in enumerate(parameters.blocks)])
    tabled = np.concatenate([np.full(b.size, b.regularised) for b in parameters.blocks])
    insensitive = [
        (n, t) for n, s, t in zip(names, sensitivities, tabled, strict=True) if s < noise
    ]
    blind = [n for n, t in insensitive if not t]  # a table node leans on its neighbours
    reasons = [
        f"{name}: a 10 % change moves no reading by more than {noise:.2g} K (too insensitive"
        + ("; its value comes from the smoothing more than from the readings)" if t else ")")
        for name, t in insensitive
    ]
    for name, value, error in zip(names, values, errors, strict=True):
        if name not in dict(insensitive) and error > RELATIVE_ERROR_LIMIT * abs(value):
            reasons.append(f"{name}: standard error {100 * error / abs(value):.0f} % of the value")
    for i in range(len(names)):
        for j in range(i + 1, len(names)):
            same_table = owner[i] == owner[j] and tabled[i]
            if not same_table and abs(correlation[i, j]) > CORRELATION_LIMIT:
                reasons.append(
                    f"{names[i]} and {names[j]} are correlated at {correlation[i, j]:+.3f}: the "
                    "readings fix a combination of them, not each one"
                )
    if blind:
        rating = "not identified"
    elif reasons:
        rating = "weakly identified"
    else:
        rating = "identified"
        reasons.append(
            "every parameter moves the readings by more than the noise, with standard errors "
            f"under {100 * RELATIVE_ERROR_LIMIT:.0f} % and no correlation above "
            f"{CORRELATION_LIMIT}"
        )
    return Identifiability(rating, tuple(reasons))
