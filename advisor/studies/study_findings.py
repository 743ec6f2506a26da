"""What a study concludes: :func:`analyse_study` turns a study's table into
:class:`StudyFindings` — validity map and design rules, spreads and influences of a sampled
study (grid convergence is added by the convergence command)."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

from ..errors import AdvisorError
from .convergence import GridConvergence
from .uncertainty import DEFAULT_ANSWERS, FAILED_STATUSES, Influence, Spread, varied_inputs
from .validity import DEFAULT_ERRORS, DesignRule, ValidityMap


@dataclass(frozen=True)
class StudyFindings:
    """What a study concludes; every part optional.

    Attributes
    ----------
    title : str
    cases, failed : int
        Cases in the study and how many failed.
    validity : ValidityMap or None
    rules : tuple of DesignRule
    spreads : tuple of Spread
    influences : dict of str to tuple of Influence
        Answer column → inputs, strongest first.
    convergence : dict of str to GridConvergence
        Answer column → the finest triple's index.
    grids : dict of str to (sizes, values)
        Answer column → every grid run (sizes in m).
    recommendation : str
        The mesh to use, in words.
    """

    title: str
    cases: int = 0
    failed: int = 0
    validity: ValidityMap | None = None
    rules: tuple[DesignRule, ...] = ()
    spreads: tuple[Spread, ...] = ()
    influences: dict[str, tuple[Influence, ...]] = field(default_factory=dict)
    convergence: dict[str, GridConvergence] = field(default_factory=dict)
    grids: dict[str, tuple[Sequence[float], Sequence[float]]] = field(default_factory=dict)
    recommendation: str = ""


def _looks_sampled(table, inputs: Sequence[str]) -> bool:
    """Random or Latin-hypercube samples: every varied input takes a new value in each case."""
    return bool(inputs) and all(table[c].nunique() == len(table) for c in inputs)


def analyse_study(
    table,
    *,
    title: str = "Study",
    variable: str | None = None,
    tolerance: float = 0.05,
    errors: Mapping[str, str] = DEFAULT_ERRORS,
    answers: Sequence[str] = DEFAULT_ANSWERS,
    sampled: bool | None = None,
    sensitivity: str = "rank",
    status: str | None = "status",
) -> StudyFindings:
    """The findings of a study's table: a validity map over ``variable`` (when it and the
    error columns are there) and, for a sampled study, the spread of each answer and the
    inputs ranked by rank correlation.

    Parameters
    ----------
    table : pandas.DataFrame
        One row per case.
    variable : str, optional
        The validity map's horizontal axis; by default the only varied input, else none.
    tolerance : float
        A fraction.
    errors : mapping of str to str
        Lumped model → error column.
    answers : sequence of str
        Answer columns for the spreads and influences.
    sampled : bool, optional
        Whether the inputs were sampled; guessed from the table when None.
    sensitivity : str
        How inputs are ranked: ``"rank"`` (Spearman's rank correlation, scipy), ``"sobol"``
        (first-order Sobol indices by RBD-FAST, SALib) or ``"chaos"`` (first-order Sobol
        indices of a polynomial-chaos surrogate, chaospy); the last two need the
        ``uncertainty`` extra.
    status : str or None
        The status column.
    """
    from . import uncertainty
    from .validity import design_rule, validity_map

    rankers = {
        "rank": uncertainty.rank_influence,
        "sobol": uncertainty.sobol_influence,
        "chaos": uncertainty.chaos_influence,
    }
    if sensitivity not in rankers:
        raise AdvisorError(f"sensitivity must be one of {sorted(rankers)}; got {sensitivity!r}")

    inputs = varied_inputs(table, (*answers, *errors.values()))
    failed = 0
    if status is not None and status in table.columns:
        failed = int(table[status].astype(str).str.lower().isin(FAILED_STATUSES).sum())
    is_sampled = sampled if sampled is not None else _looks_sampled(table, inputs)
    if variable is None and len(inputs) == 1 and not is_sampled:
        variable = inputs[0]  # a one-input sweep: its map is the study's point
    vmap, rules = None, ()
    if variable is not None and all(c in table.columns for c in errors.values()):
        vmap = validity_map(table, variable, errors=errors, tolerance=tolerance, status=status)
        rules = tuple(design_rule(vmap, model) for model in vmap.errors)
    spreads, influences = [], {}
    if is_sampled:
        for answer in answers:
            if answer not in table.columns:
                continue
            try:
                found = uncertainty.spread(table, answer, status=status)
            except AdvisorError:
                continue  # too few finished cases with this answer: left out of the report
            spreads.append(found)
            if inputs:
                ranker = rankers[sensitivity]
                influences[answer] = tuple(ranker(table, answer, inputs, status=status))
    return StudyFindings(title, len(table), failed, vmap, rules, tuple(spreads), influences)
