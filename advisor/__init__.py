"""The validity advisor: lumped estimates against the finite-element field, and the writers.

Nothing in ``geometries`` or ``fem`` imports this package.
"""

from .analysis.assessment import Assessment, LumpedError, Verdict, assess
from .analysis.biot import BiotNumber, biot_numbers
from .analysis.lumped import FittedExponential, LumpedModel, TwoNodeModel
from .analysis.modes import SlowestMode, slowest_mode
from .analysis.quick import QuickCheck, quick_check
from .errors import AdvisorError, ResultsFolderExistsError
from .results import write_results

__all__ = [
    "AdvisorError",
    "Assessment",
    "BiotNumber",
    "LumpedError",
    "FittedExponential",
    "LumpedModel",
    "QuickCheck",
    "SlowestMode",
    "TwoNodeModel",
    "ResultsFolderExistsError",
    "Verdict",
    "assess",
    "biot_numbers",
    "quick_check",
    "slowest_mode",
    "write_results",
]
