"""``slackline check EXPERIMENT.json``: re-solve a stored experiment and compare.

The file is validated first (schema, consistency, checksum); an invalid file
raises FileFormatError, which the dispatcher turns into exit status 2.  The
points are then fitted again with the stored configuration and solver
options, and the new figures are compared with the stored ones (the
tolerances are listed in solver.study.agreement; stored held-out points in
solver.study.heldout.heldout_agreement).

Exit status: 0 when everything agrees, 1 when something drifts (or there
are no stored results to compare, or the stored configuration no longer
solves), 2 when the file is invalid.
"""

from __future__ import annotations

import sys
from dataclasses import asdict

import numpy as np

from solver import ConvergenceError, NotSeparableError, fit
from solver.files import heldout_from_section, load_experiment, provenance
from solver.study import agreement, heldout_agreement
from cli.outputs import print_json


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
    fresh = result.to_dict()
    comparisons = agreement(stored, fresh, np.asarray(result.penalties),
                            float(np.abs(dataset.X).max(initial=0.0)))
    if experiment.heldout is not None:       # stored held-out points: solver.study.heldout
        points = heldout_from_section(experiment.heldout, dataset.label_mapping)
        comparisons += heldout_agreement(experiment.heldout, points, dataset.label_mapping,
                                         result)
    drifted = [c for c in comparisons if not c.agrees]
    changed = version_changes(experiment.written, provenance())
    if args.json:
        print_json({"file": str(args.experiment), "agrees": not drifted,
                    "software_changes": changed,
                    "comparisons": [dict(asdict(c), agrees=c.agrees) for c in comparisons]})
    else:
        print(report_text(args.experiment, len(dataset), config, comparisons))
        if changed:
            print("  written with " + "; ".join(f"{k} {v[0]}, now {v[1]}"
                                               for k, v in changed.items()))
    return 1 if drifted else 0


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
