"""The analysis: the lumped family, Biot numbers, the slowest mode, the assessment and its
verdict, and the quick check. No files, no terminal."""

from .assessment import Assessment, LumpedError, Verdict, assess, check_request
from .biot import BiotNumber, biot_numbers
from .freezing import FreezingComparison, FreezingProduct, pham_time, plank_time
from .lumped import FittedExponential, LumpedModel, TwoNodeModel
from .modes import SlowestMode, slowest_mode
from .quench import QuenchCurve, QuenchOutputs, quench_outputs, rate_of_change
from .quick import QuickCheck, quick_check

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
