"""The analysis: the lumped family, Biot numbers, the slowest mode, the assessment and its
verdict, and the quick check. No files, no terminal."""

from .assessment import Assessment, LumpedError, Verdict, assess, check_request
from .biot import BiotNumber, biot_numbers
from .lumped import FittedExponential, LumpedModel, TwoNodeModel
from .modes import SlowestMode, slowest_mode
from .quick import QuickCheck, quick_check

__all__ = [
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
]
