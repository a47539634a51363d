"""A fitted classifier applied to rows it was not fitted on.

Per row: the decision value f(x), the predicted label as the experiment
writes it (f >= 0 is the positive class, as everywhere in Slackline), the
distance to the boundary and whether the row falls inside the margin band
(|f| < 1, a "close call").  With true labels: the error and the confusion
counts, named by the experiment's labels.

Distance: |f(x)| / |w|.  For a linear kernel w is in the features' original
units, so the distance is in the data's units.  For the polynomial and RBF
kernels |w| is the norm of the weight vector in the kernel's feature space,
so the distance is measured there, not in the plane of the data.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.errors import InputError
from solver.model import DecisionModel
from solver.result import _frozen, weights_cancel
from solver.study.agreement import RELATIVE, Agreement

DATA_UNITS = "data units"
FEATURE_SPACE = "feature space"


@dataclass(frozen=True, eq=False)
class Classifier:
    """What scoring needs of a fit: f anywhere, |w| and the kernel's name."""

    model: DecisionModel
    weight_norm: float          # |w|: original units (linear) or feature space
    kernel: str
    no_boundary: bool = False   # w = 0 (to rounding): f = b everywhere, no distances

    @classmethod
    def from_result(cls, result) -> "Classifier":
        return cls(model=result.model, weight_norm=float(result.weight_norm),
                   kernel=result.config.kernel,
                   no_boundary=bool(result.w_is_zero) or not result.weight_norm > 0)

    @classmethod
    def from_figures(cls, figures: dict, X=None) -> "Classifier":
        """From the figures an experiment file stores (``Experiment.results``); ``X``, the
        points they were fitted on, tells a w of rounding from a true one."""
        m = figures["model"]

        def array(key):
            return None if m[key] is None else np.asarray(m[key], dtype=float)

        vectors = array("support_vectors")
        model = DecisionModel(m["kernel"], float(m["gamma"]), int(m["degree"]),
                              float(m["offset"]), array("shift"), array("scale"), float(m["b"]),
                              feature_weights=array("feature_weights"),
                              support_vectors=None if vectors is None else vectors.reshape(-1, 2),
                              coefficients=array("coefficients"))
        norm = float(figures["weight_norm"])
        cancel = X is not None and weights_cancel(model.feature_weights, figures["alpha"], X,
                                                  model.shift, model.scale)
        return cls(model=model, weight_norm=norm, kernel=m["kernel"],
                   no_boundary=cancel or not norm > 0)

    def decision_function(self, points) -> np.ndarray:
        return self.model.decision_function(points)


@dataclass(frozen=True, eq=False)
class Scores:
    """What the classifier says about each row (arrays in row order, read-only)."""

    decision: np.ndarray        # f(x)
    signs: np.ndarray           # predicted +1 / -1
    labels: tuple               # predicted label as written in the experiment
    distance: np.ndarray        # |f(x)| / |w|, >= 0 (NaN when w = 0)
    in_band: np.ndarray         # |f(x)| < 1: inside the margin band, a close call
    distance_space: str         # DATA_UNITS (linear) or FEATURE_SPACE (kernels)

    def __post_init__(self):
        for name in ("decision", "signs", "distance", "in_band"):
            object.__setattr__(self, name, _frozen(getattr(self, name)))

    def __len__(self) -> int:
        return len(self.decision)

    @property
    def close_calls(self) -> int:
        return int(np.count_nonzero(self.in_band))


@dataclass(frozen=True)
class Confusion:
    """Confusion counts with the experiment's own label names.

    A "positive" is a row the classifier puts in the positive class (+1);
    it is true when the row's own label is the positive label too.
    """

    positive_label: object
    negative_label: object
    true_positive: int
    false_positive: int
    true_negative: int
    false_negative: int

    @property
    def rows(self) -> int:
        return self.true_positive + self.false_positive + self.true_negative + self.false_negative

    @property
    def error(self) -> float:
        """Fraction of rows whose predicted label differs from their own."""
        return (self.false_positive + self.false_negative) / self.rows

    def to_dict(self) -> dict:
        return {"positive_label": self.positive_label, "negative_label": self.negative_label,
                "true_positive": self.true_positive, "false_positive": self.false_positive,
                "true_negative": self.true_negative, "false_negative": self.false_negative}

    def lines(self) -> list[str]:
        """The four counts in words: 'true positive (pass predicted pass): 12'."""
        pos, neg = self.positive_label, self.negative_label
        return [f"true positive ({pos} predicted {pos}): {self.true_positive}",
                f"false positive ({neg} predicted {pos}): {self.false_positive}",
                f"true negative ({neg} predicted {neg}): {self.true_negative}",
                f"false negative ({pos} predicted {neg}): {self.false_negative}"]


def heldout_sentence(counts: Confusion, training_error: float) -> str:
    """The held-out check in words, beside the training error (reports, compare view)."""
    wrong = counts.false_positive + counts.false_negative
    return (f"On {counts.rows} held-out point{'s' if counts.rows != 1 else ''} the error is "
            f"{counts.error:.1%} ({wrong} wrong: {counts.false_positive} {counts.negative_label} "
            f"taken for {counts.positive_label}, {counts.false_negative} "
            f"{counts.positive_label} taken for {counts.negative_label}), beside a training "
            f"error of {training_error:.1%}.")


def score(fitted, points, label_mapping: dict) -> Scores:
    """Apply a fit (a FitResult or a Classifier) to ``points`` (n x 2, original units)."""
    classifier = fitted if isinstance(fitted, Classifier) else Classifier.from_result(fitted)
    points = np.asarray(points, dtype=float).reshape(-1, 2)
    by_sign = _labels_by_sign(label_mapping)
    decision = classifier.decision_function(points) if len(points) else np.zeros(0)
    signs = np.where(decision >= 0, 1, -1)
    if classifier.no_boundary:                              # w = 0: no boundary
        distance = np.full(len(decision), np.nan)
    else:
        distance = np.abs(decision) / classifier.weight_norm
    return Scores(decision=decision, signs=signs,
                  labels=tuple(by_sign[int(s)] for s in signs),
                  distance=distance,
                  in_band=np.abs(decision) < 1.0,
                  distance_space=DATA_UNITS if classifier.kernel == "linear"
                  else FEATURE_SPACE)


def confusion(true_signs, predicted_signs, label_mapping: dict) -> Confusion:
    """Confusion counts of predicted against true signs (+1 / -1)."""
    true_signs = np.asarray(true_signs).reshape(-1)
    predicted_signs = np.asarray(predicted_signs).reshape(-1)
    if true_signs.shape != predicted_signs.shape or not len(true_signs):
        raise InputError(f"confusion counts need one true label per prediction and at least "
                         f"one row; got {true_signs.size} labels, {predicted_signs.size} "
                         "predictions")
    by_sign = _labels_by_sign(label_mapping)

    def count(truth, predicted):
        return int(np.count_nonzero((true_signs == truth) & (predicted_signs == predicted)))

    return Confusion(positive_label=by_sign[1], negative_label=by_sign[-1],
                     true_positive=count(1, 1), false_positive=count(-1, 1),
                     true_negative=count(-1, -1), false_negative=count(1, -1))


def _labels_by_sign(label_mapping: dict) -> dict:
    by_sign = {int(sign): label for label, sign in label_mapping.items()}
    if sorted(by_sign) != [-1, 1]:
        raise InputError(f"the label mapping must name one label for +1 and one for -1; "
                         f"got {label_mapping!r}")
    return by_sign


def heldout_agreement(stored: dict, points, label_mapping: dict, result) -> list:
    """``slackline check`` on a stored held-out section: its decision values and
    confusion counts against those of ``result`` (a fresh fit) on the same points.

    held-out decision   agrees within 1e-6 * max(1, max |stored f|), as the
                        training points' decision values do
    held-out confusion  identical counts
    """
    decision = result.decision_function(points.X) if len(points.X) else np.zeros(0)
    stored_decision = np.asarray(stored["decision"], dtype=float)
    f_scale = max(1.0, float(np.max(np.abs(stored_decision), initial=0.0)))
    largest = (float(np.max(np.abs(stored_decision - decision), initial=0.0))
               if stored_decision.shape == decision.shape else float("inf"))
    counts = confusion(points.signs, np.where(decision >= 0, 1, -1), label_mapping).to_dict()
    keys = ("true_positive", "false_positive", "true_negative", "false_negative")
    differ = [k for k in keys if counts[k] != stored["confusion"][k]]
    detail = "; ".join(f"{k} {stored['confusion'][k]} -> {counts[k]}" for k in differ)
    return [Agreement("held-out decision", largest, RELATIVE * f_scale),
            Agreement("held-out confusion", len(differ), 0, detail)]
