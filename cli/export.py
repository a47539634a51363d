"""``slackline export EXPERIMENT.json --points out.csv --classifier out.json``.

Writes the experiment's per-point table (CSV) and/or its classifier file
(JSON: the decision function, what it was trained on, and the cautions) from
the figures stored in the file.  An experiment saved without results is
fitted first with its stored configuration (said on stderr).
"""

from __future__ import annotations

import argparse
import sys

from cli.common import Renamed as _Renamed
from solver import CAUTION_LINE, InputError, fit
from solver.files import load_experiment, write_classifier, write_points_csv


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json", help="experiment file to read")
    parser.add_argument("--points", metavar="OUT.csv",
                        help="per-point table: features, label, sign, decision value, "
                             "functional margin, distance, alpha, slack, status")
    parser.add_argument("--classifier", metavar="OUT.json",
                        help="classifier file: the decision function with what it takes to "
                             "apply it elsewhere, what it was trained on, and the cautions")
    parser.add_argument("--model", nargs="?", action=_Renamed, help=argparse.SUPPRESS)


def run(args) -> int:
    if not args.points and not args.classifier:
        raise InputError("say what to export: --points OUT.csv, --classifier OUT.json, "
                         "or both")
    experiment = load_experiment(args.experiment)
    figures = experiment.results
    if figures is None:
        print(f"{args.experiment} holds no results; fitting it with its stored configuration",
              file=sys.stderr)
        figures = fit(experiment.dataset.X, experiment.dataset.y, experiment.config)
    if args.points:
        write_points_csv(args.points, experiment.dataset, figures)
        print(f"wrote the per-point table of {len(experiment.dataset)} points to {args.points}")
    if args.classifier:
        write_classifier(args.classifier, experiment.dataset, figures)
        print(f"wrote the classifier to {args.classifier}")
    print(CAUTION_LINE, file=sys.stderr)
    return 0
