"""Do two sets of stored figures of one fit agree?  ``slackline check`` asks
this of an experiment file's figures and a fresh fit of the same points.

    quantity            agrees when the largest difference is at most
    w                   1e-6 * max(max|stored w|, max(1, max_i |stored f(x_i)|) / max|x|):
                        a change of w that moves no f(x_i) = w.x_i + b by more than the
                        decision values' tolerance agrees (w = 0 to rounding, no line
                        separates the classes: w is 1e-14 of either sign)
    b                   1e-6 * max(1, |stored b|)
    decision values     1e-6 * max(1, max_i |stored f(x_i)|)
    slack               1e-6 * max(1, max_i |stored f(x_i)|)
    alpha               1e-6 * max_i C_i  (the largest alpha for a hard margin)
    margin width        1e-6 * stored margin width (not compared when w is below that
                        floor: 2/|w| of rounding is rounding)
    primal, dual        1e-7 * max(1, |stored objective|)
    status              identical for every point
    support vectors     the identical set of point indices

(solver.study.compare is the other question: what changed between two
different fits, in words a stakeholder reads.)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

RELATIVE = 1e-6
OBJECTIVE_RELATIVE = 1e-7


@dataclass(frozen=True)
class Agreement:
    quantity: str
    difference: float      # largest absolute difference (count of points for sets)
    allowed: float
    detail: str = ""

    @property
    def agrees(self) -> bool:
        return bool(self.difference <= self.allowed)


def agreement(stored: dict, fresh: dict, penalties: np.ndarray,
              extent: float = 0.0) -> list[Agreement]:
    """Every row of the table in the module docstring (FitResult.to_dict shapes);
    ``extent``: max|x| over the points, in the units of w."""
    comparisons = []
    f_scale = max(1.0, float(np.max(np.abs(stored["decision"]), initial=0.0)))
    w_floor = f_scale / extent if extent > 0 else 0.0
    rounding_w = False
    if stored["w"] is not None or fresh["w"] is not None:
        if stored["w"] is None or fresh["w"] is None:
            comparisons.append(Agreement("w", np.inf, 0.0, "present in only one of them"))
        else:
            w_old = np.asarray(stored["w"])
            largest_w = float(np.max(np.abs(w_old)))
            rounding_w = largest_w <= RELATIVE * w_floor
            comparisons.append(Agreement("w", _largest(w_old, fresh["w"]),
                                          RELATIVE * max(largest_w, w_floor)))
    comparisons.append(Agreement("b", abs(stored["b"] - fresh["b"]),
                                  RELATIVE * max(1.0, abs(stored["b"]))))
    comparisons.append(Agreement("decision", _largest(stored["decision"], fresh["decision"]),
                                  RELATIVE * f_scale))
    comparisons.append(Agreement("slack", _largest(stored["slack"], fresh["slack"]),
                                  RELATIVE * f_scale))
    finite = penalties[np.isfinite(penalties)]
    alpha_scale = float(finite.max()) if finite.size else max(1.0, float(np.max(stored["alpha"])))
    comparisons.append(Agreement("alpha", _largest(stored["alpha"], fresh["alpha"]),
                                  RELATIVE * alpha_scale))
    if stored["margin_width"] is not None and fresh["margin_width"] is not None \
            and not rounding_w:
        comparisons.append(Agreement("margin width",
                                      abs(stored["margin_width"] - fresh["margin_width"]),
                                      RELATIVE * stored["margin_width"]))
    for key in ("primal", "dual"):
        old, new = stored["objective"][key], fresh["objective"][key]
        comparisons.append(Agreement(f"{key} objective", abs(old - new),
                                      OBJECTIVE_RELATIVE * max(1.0, abs(old))))
    changed = [i for i, (a, b) in enumerate(zip(stored["status"], fresh["status"])) if a != b]
    comparisons.append(Agreement("status", len(changed), 0,
                                  _status_detail(changed, stored["status"], fresh["status"])))
    old_support, new_support = set(stored["support"]), set(fresh["support"])
    differ = sorted(old_support ^ new_support)
    comparisons.append(Agreement(
        "support vectors", len(differ), 0,
        f"same {len(old_support)} points" if not differ else
        f"points {_list(differ)} are support vectors in only one of the fits"))
    return comparisons


def _largest(old, new) -> float:
    old, new = np.asarray(old, dtype=float), np.asarray(new, dtype=float)
    if old.shape != new.shape:
        return float("inf")
    return float(np.max(np.abs(old - new), initial=0.0))


def _status_detail(changed, old, new) -> str:
    if not changed:
        return ""
    return "; ".join(f"point {i}: {old[i]} -> {new[i]}" for i in changed[:5]) + \
        (f"; and {len(changed) - 5} more" if len(changed) > 5 else "")


def _list(indices) -> str:
    shown = ", ".join(str(i) for i in indices[:10])
    return shown + (f" and {len(indices) - 10} more" if len(indices) > 10 else "")
