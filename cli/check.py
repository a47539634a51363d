"""``slackline check EXPERIMENT.json``: re-solve a stored experiment and compare.

The file is validated first (schema, consistency, checksum); an invalid file
raises FileFormatError, which the dispatcher turns into exit status 2.  The
points are then fitted again with the stored configuration and solver
options, and the new figures are compared with the stored ones:

    quantity            agrees when the largest difference is at most
    w                   1e-6 * max|stored w|
    b                   1e-6 * max(1, |stored b|)
    decision values     1e-6 * max(1, max_i |stored f(x_i)|)
    slack               1e-6 * max(1, max_i |stored f(x_i)|)
    alpha               1e-6 * max_i C_i  (the largest alpha for a hard margin)
    margin width        1e-6 * stored margin width
    primal, dual        1e-7 * max(1, |stored objective|)
    status              identical for every point
    support vectors     the identical set of point indices
    held-out decision   as decision values, over the stored held-out points (if any)
    held-out confusion  identical counts

Exit status: 0 when everything agrees, 1 when something drifts (or there
are no stored results to compare, or the stored configuration no longer
solves), 2 when the file is invalid.
"""

from __future__ import annotations

import json
import sys
from dataclasses import asdict, dataclass

import numpy as np

from solver import ConvergenceError, NotSeparableError
from solver.files import heldout_from_section, load_experiment, provenance, results_to_dict
from solver.study import confusion
from solver import fit

RELATIVE = 1e-6
OBJECTIVE_RELATIVE = 1e-7


@dataclass(frozen=True)
class Comparison:
    quantity: str
    difference: float      # largest absolute difference (count of points for sets)
    allowed: float
    detail: str = ""

    @property
    def agrees(self) -> bool:
        return bool(self.difference <= self.allowed)


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json", help="experiment file to check")
    parser.add_argument("--json", action="store_true",
                        help="print one JSON object with every comparison instead of a table")


def run(args) -> int:
    experiment = load_experiment(args.experiment)
    dataset, config, stored = experiment.dataset, experiment.config, experiment.results
    if stored is None:
        print(f"{args.experiment}: no stored results to compare (the experiment was saved "
              "before a fit succeeded); fit it and save it again", file=sys.stderr)
        return 1
    try:
        result = fit(dataset.X, dataset.y, config)
    except (NotSeparableError, ConvergenceError) as exc:
        print(f"{args.experiment}: DRIFT — the stored configuration no longer solves: {exc}")
        return 1
    fresh = results_to_dict(result)
    comparisons = compare(stored, fresh, np.asarray(result.penalties))
    if experiment.heldout is not None:
        comparisons += heldout_comparisons(experiment.heldout, dataset.label_mapping, result)
    drifted = [c for c in comparisons if not c.agrees]
    changed = version_changes(experiment.written, provenance())
    if args.json:
        json.dump({"file": str(args.experiment), "agrees": not drifted,
                   "software_changes": changed,
                   "comparisons": [dict(asdict(c), agrees=c.agrees) for c in comparisons]},
                  sys.stdout)
        sys.stdout.write("\n")
    else:
        print(report_text(args.experiment, len(dataset), config, comparisons))
        if changed:
            print("  written with " + "; ".join(f"{k} {v[0]}, now {v[1]}"
                                               for k, v in changed.items()))
    return 1 if drifted else 0


def compare(stored: dict, fresh: dict, penalties: np.ndarray) -> list[Comparison]:
    """Every comparison of the table in the module docstring."""
    comparisons = []
    if stored["w"] is not None or fresh["w"] is not None:
        if stored["w"] is None or fresh["w"] is None:
            comparisons.append(Comparison("w", np.inf, 0.0, "present in only one of them"))
        else:
            w_old = np.asarray(stored["w"])
            comparisons.append(Comparison("w", _largest(w_old, fresh["w"]),
                                          RELATIVE * float(np.max(np.abs(w_old)))))
    comparisons.append(Comparison("b", abs(stored["b"] - fresh["b"]),
                                  RELATIVE * max(1.0, abs(stored["b"]))))
    f_scale = max(1.0, float(np.max(np.abs(stored["decision"]), initial=0.0)))
    comparisons.append(Comparison("decision", _largest(stored["decision"], fresh["decision"]),
                                  RELATIVE * f_scale))
    comparisons.append(Comparison("slack", _largest(stored["slack"], fresh["slack"]),
                                  RELATIVE * f_scale))
    finite = penalties[np.isfinite(penalties)]
    alpha_scale = float(finite.max()) if finite.size else max(1.0, float(np.max(stored["alpha"])))
    comparisons.append(Comparison("alpha", _largest(stored["alpha"], fresh["alpha"]),
                                  RELATIVE * alpha_scale))
    if stored["margin_width"] is not None and fresh["margin_width"] is not None:
        comparisons.append(Comparison("margin width",
                                      abs(stored["margin_width"] - fresh["margin_width"]),
                                      RELATIVE * stored["margin_width"]))
    for key in ("primal", "dual"):
        old, new = stored["objective"][key], fresh["objective"][key]
        comparisons.append(Comparison(f"{key} objective", abs(old - new),
                                      OBJECTIVE_RELATIVE * max(1.0, abs(old))))
    changed = [i for i, (a, b) in enumerate(zip(stored["status"], fresh["status"])) if a != b]
    comparisons.append(Comparison("status", len(changed), 0,
                                  _status_detail(changed, stored["status"], fresh["status"])))
    old_support, new_support = set(stored["support"]), set(fresh["support"])
    differ = sorted(old_support ^ new_support)
    comparisons.append(Comparison(
        "support vectors", len(differ), 0,
        f"same {len(old_support)} points" if not differ else
        f"points {_list(differ)} are support vectors in only one of the fits"))
    return comparisons


def heldout_comparisons(section: dict, label_mapping: dict, result) -> list[Comparison]:
    """The stored held-out decision values and counts against those of the fresh fit."""
    points = heldout_from_section(section, label_mapping)
    decision = result.decision_function(points.X)
    f_scale = max(1.0, float(np.max(np.abs(section["decision"]), initial=0.0)))
    counts = confusion(points.signs, np.where(decision >= 0, 1, -1), label_mapping).to_dict()
    differ = [k for k in ("true_positive", "false_positive", "true_negative", "false_negative")
              if counts[k] != section["confusion"][k]]
    detail = "; ".join(f"{k} {section['confusion'][k]} -> {counts[k]}" for k in differ)
    return [Comparison("held-out decision", _largest(section["decision"], decision),
                       RELATIVE * f_scale),
            Comparison("held-out confusion", len(differ), 0, detail)]


def version_changes(written: dict, now: dict) -> dict:
    """Software whose version differs from the one that wrote the file: name -> (then, now)."""
    return {key: (written.get(key), now[key]) for key in ("slackline", "python", "numpy", "cvxopt")
            if written.get(key) is not None and written.get(key) != now[key]}


def report_text(name, n_points, config, comparisons) -> str:
    drifted = [c for c in comparisons if not c.agrees]
    c_text = "hard margin" if config.hard_margin else f"C = {config.C:g}"
    verdict = ("agrees with the stored results" if not drifted else
               f"DRIFT in {', '.join(c.quantity for c in drifted)}")
    lines = [f"{name}: re-solved {n_points} points ({config.kernel} kernel, {c_text}) — "
             f"{verdict}",
             f"  {'quantity':<18}{'largest difference':>20}{'allowed':>12}"]
    for c in comparisons:
        if c.quantity in ("status", "support vectors", "held-out confusion"):
            shown = f"{int(c.difference)} differ" if c.difference else c.detail or "identical"
            lines.append(f"  {c.quantity:<18}{shown:>20}{'none':>12}"
                         + ("" if c.agrees else "   <- " + c.detail))
        else:
            mark = "" if c.agrees else "   <- drift"
            lines.append(f"  {c.quantity:<18}{c.difference:>20.3e}{c.allowed:>12.1e}{mark}")
    return "\n".join(lines)


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
