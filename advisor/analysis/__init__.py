"""The analysis: the lumped family, Biot numbers, the slowest mode, the assessment and its
verdict, and the quick check. No files, no terminal.

The public names are loaded on first use, so a module that needs only the verdict's words
(``soakwise show``) does not load scipy with the lumped models.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..lazy_names import lazy_names

# Public name → the module that defines it.
_LAZY = {
    **dict.fromkeys(
        ("Assessment", "LumpedError", "Verdict", "assess", "check_request"), ".assessment"
    ),
    **dict.fromkeys(("BiotNumber", "biot_numbers"), ".biot"),
    **dict.fromkeys(
        ("FreezingComparison", "FreezingProduct", "pham_time", "plank_time"), ".freezing"
    ),
    **dict.fromkeys(("FittedExponential", "LumpedModel", "TwoNodeModel"), ".lumped"),
    **dict.fromkeys(("SlowestMode", "slowest_mode"), ".modes"),
    **dict.fromkeys(
        ("QuenchCurve", "QuenchOutputs", "quench_outputs", "rate_of_change"), ".quench"
    ),
    **dict.fromkeys(("QuickCheck", "quick_check"), ".quick"),
}

__all__ = [
    "Assessment",
    "BiotNumber",
    "FittedExponential",
    "FreezingComparison",
    "FreezingProduct",
    "LumpedError",
    "LumpedModel",
    "QuenchCurve",
    "QuenchOutputs",
    "QuickCheck",
    "SlowestMode",
    "TwoNodeModel",
    "Verdict",
    "assess",
    "biot_numbers",
    "check_request",
    "pham_time",
    "plank_time",
    "quench_outputs",
    "quick_check",
    "rate_of_change",
    "slowest_mode",
]

if TYPE_CHECKING:
    from .assessment import Assessment, LumpedError, Verdict, assess, check_request
    from .biot import BiotNumber, biot_numbers
    from .freezing import FreezingComparison, FreezingProduct, pham_time, plank_time
    from .lumped import FittedExponential, LumpedModel, TwoNodeModel
    from .modes import SlowestMode, slowest_mode
    from .quench import QuenchCurve, QuenchOutputs, quench_outputs, rate_of_change
    from .quick import QuickCheck, quick_check

__getattr__, __dir__ = lazy_names(__name__, _LAZY)
