"""``slackline export EXPERIMENT.json --points out.csv --model out.json``.

Writes the experiment's per-point table (CSV) and/or its model card (JSON)
from the figures stored in the file.  An experiment saved without results is
fitted first with its stored configuration (said on stderr).
"""

from __future__ import annotations

import sys

from solver import InputError
from solver.files import load_experiment
from solver.files import write_model_card, write_points_csv
from solver import fit


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json", help="experiment file to read")
    parser.add_argument("--points", metavar="OUT.csv",
                        help="per-point table: features, label, sign, decision value, "
                             "functional margin, distance, alpha, slack, status")
    parser.add_argument("--model", metavar="OUT.json",
                        help="model card: what it takes to apply the classifier elsewhere")


def run(args) -> int:
    if not args.points and not args.model:
        raise InputError("say what to export: --points OUT.csv, --model OUT.json, or both")
    experiment = load_experiment(args.experiment)
    figures = experiment.results
    if figures is None:
        print(f"{args.experiment} holds no results; fitting it with its stored configuration",
              file=sys.stderr)
        figures = fit(experiment.dataset.X, experiment.dataset.y, experiment.config)
    if args.points:
        write_points_csv(args.points, experiment.dataset, figures)
        print(f"wrote the per-point table of {len(experiment.dataset)} points to {args.points}")
    if args.model:
        write_model_card(args.model, experiment.dataset, figures)
        print(f"wrote the model card to {args.model}")
    return 0
