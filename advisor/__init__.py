"""The validity advisor: lumped estimates against the finite-element field, and the writers.

Nothing in ``geometries`` or ``fem`` imports this package.
"""

from .assessment import Assessment, LumpedError, Verdict, assess
from .biot import BiotNumber, biot_numbers
from .errors import AdvisorError, ResultsFolderExistsError
from .lumped import FittedExponential, LumpedModel, TwoNodeModel
from .modes import SlowestMode, slowest_mode
from .quick import QuickCheck, quick_check
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
