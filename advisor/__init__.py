"""The validity advisor: lumped estimates against the finite-element field, and the writers.

Nothing in ``geometries`` or ``fem`` imports this package. The public names below are loaded
on first use, so ``import advisor`` (and the command line's help) does not load the solver,
the mesher or the plotting.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from .errors import AdvisorError, ResultsFolderExistsError
from .lazy_names import lazy_names

# Public name → the module that defines it.
_LAZY = {
    **dict.fromkeys(
        (
            "Assessment",
            "BiotNumber",
            "FittedExponential",
            "LumpedError",
            "LumpedModel",
            "QuickCheck",
            "SlowestMode",
            "TwoNodeModel",
            "Verdict",
            "assess",
            "biot_numbers",
            "check_request",
            "quick_check",
            "slowest_mode",
        ),
        ".analysis",
    ),
    **dict.fromkeys(("Results", "run_case", "run_model", "write_results"), ".pipeline"),
}

__all__ = [
    "AdvisorError",
    "Assessment",
    "BiotNumber",
    "FittedExponential",
    "LumpedError",
    "LumpedModel",
    "QuickCheck",
    "Results",
    "ResultsFolderExistsError",
    "SlowestMode",
    "TwoNodeModel",
    "Verdict",
    "assess",
    "biot_numbers",
    "check_request",
    "quick_check",
    "run_case",
    "run_model",
    "slowest_mode",
    "write_results",
]

if TYPE_CHECKING:
    from .analysis import (
        Assessment,
        BiotNumber,
        FittedExponential,
        LumpedError,
        LumpedModel,
        QuickCheck,
        SlowestMode,
        TwoNodeModel,
        Verdict,
        assess,
        biot_numbers,
        check_request,
        quick_check,
        slowest_mode,
    )
    from .pipeline import Results, run_case, run_model, write_results

__getattr__, __dir__ = lazy_names(__name__, _LAZY)
