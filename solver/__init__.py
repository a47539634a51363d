"""Slackline's solver: two-feature support vector machines, no Qt anywhere.

    from solver import fit, FitConfig
    result = fit(X, y, FitConfig(C=1.0))
"""

from .config import FitConfig, SolverOptions
from .errors import (ConvergenceError, FileFormatError, InputError, NotSeparableError,
                     SlacklineError)
from .fit import fit, validate_points
from .model import DecisionModel
from .result import STATUS_TEXT, STATUSES, FitResult, KKTResiduals

__version__ = "0.1.0"

__all__ = [
    "fit", "validate_points", "FitConfig", "SolverOptions", "FitResult", "KKTResiduals",
    "DecisionModel", "STATUSES", "STATUS_TEXT", "SlacklineError", "InputError",
    "NotSeparableError", "ConvergenceError", "FileFormatError", "__version__",
]
