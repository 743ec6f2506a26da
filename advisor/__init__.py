"""The validity advisor: lumped estimates against the finite-element field, and the writers.

Nothing in ``geometries`` or ``fem`` imports this package.
"""

from .assessment import Assessment, LumpedError, Verdict, assess
from .biot import BiotNumber, biot_numbers
from .errors import AdvisorError, ResultsFolderExistsError
from .lumped import LumpedModel
from .results import write_results

__all__ = [
    "AdvisorError",
    "Assessment",
    "BiotNumber",
    "LumpedError",
    "LumpedModel",
    "ResultsFolderExistsError",
    "Verdict",
    "assess",
    "biot_numbers",
    "write_results",
]
