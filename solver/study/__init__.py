"""Studies over many fits: cross-validation, the C sweep, comparing two fits,
and the plain-words sentence about what changed.

The window and the command line import from here, not from the modules.
"""

from solver.study.agreement import Agreement, agreement
from solver.study.compare import Comparison, compare
from solver.study.crossval import LEAVE_ONE_OUT, CVEstimate, cross_validate, points_fingerprint
from solver.study.heldout import (DATA_UNITS, FEATURE_SPACE, Classifier, Confusion, Scores,
                                  confusion, heldout_agreement, heldout_sentence, score)
from solver.study.influence import Influence, PointInfluence, influence_of_support_vectors
from solver.study.narrative import summary
from solver.study.sweep import (DEFAULT_FROM, DEFAULT_STEPS, DEFAULT_TO, SweepSettings,
                                run_sweep)
from solver.study.sweep_result import FitFailure, SweepResult
from solver.study.validation import heldout_errors

__all__ = [
    "Agreement", "agreement", "Comparison", "compare", "LEAVE_ONE_OUT", "CVEstimate", "cross_validate",
    "points_fingerprint", "summary", "DEFAULT_FROM", "DEFAULT_STEPS", "DEFAULT_TO",
    "SweepSettings", "run_sweep", "FitFailure", "SweepResult", "DATA_UNITS", "FEATURE_SPACE",
    "Classifier", "Confusion", "Scores", "confusion", "heldout_agreement", "heldout_sentence", "score", "Influence", "PointInfluence",
    "influence_of_support_vectors", "heldout_errors",
]
