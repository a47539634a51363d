"""Slackline's solver: two-feature support vector machines, no Qt anywhere.

    from solver import fit, FitConfig
    result = fit(X, y, FitConfig(C=1.0))
"""

from solver.compiled_cache import import_compiled_steps

import_compiled_steps()     # before anything imports them: numba may need a cache folder found
from solver import kernels  # noqa: E402
from solver.cautions import CAUTION_LINE, CAUTIONS
from solver.config import FitConfig, SolverOptions
from solver.errors import (ConvergenceError, FileFormatError, InputError, NotSeparableError,
                           SlacklineError)
from solver.fit import fit, validate_points
from solver.model import DecisionModel
from solver.parameters import PARAMETERS, Parameter
from solver.qp.path import CPath, PathEvent, compute_path
from solver.result import (INSIDE, MISCLASSIFIED, ON_MARGIN, OUTSIDE, STATUS_TEXT, STATUSES,
                           FitResult, KKTResiduals)

__version__ = "0.1.0"

__all__ = [
    "fit", "validate_points", "FitConfig", "SolverOptions", "FitResult", "KKTResiduals",
    "DecisionModel", "STATUSES", "STATUS_TEXT", "INSIDE", "MISCLASSIFIED", "ON_MARGIN",
    "OUTSIDE", "CAUTIONS", "CAUTION_LINE", "kernels", "PARAMETERS", "Parameter", "SlacklineError", "InputError",
    "compute_path", "CPath", "PathEvent",
    "NotSeparableError", "ConvergenceError", "FileFormatError", "__version__",
]
