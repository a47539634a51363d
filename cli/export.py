"""``slackline export EXPERIMENT.json --points out.csv --classifier out.json``.

Writes the experiment's per-point table (CSV) and/or its classifier file
(JSON: the decision function, what it was trained on, and the cautions) from
the figures stored in the file.  An experiment saved without results is
fitted first with its stored configuration (said on stderr).  Both outputs
are checked before the experiment is read, and written together or not at
all (cli.outputs).
"""

from __future__ import annotations

import argparse
import sys

from cli.common import Renamed as _Renamed
from cli.outputs import check_outputs, write_outputs
from solver import CAUTION_LINE, InputError, fit
from solver.files import load_experiment, write_classifier, write_points_csv

# option, metavar, help, writer(path, dataset, figures), what it is
OUTPUTS = (
    ("--points", "OUT.csv", "per-point table: features, label, sign, decision value, "
     "functional margin, distance, alpha, slack, status", write_points_csv,
     "the per-point table of {n} points"),
    ("--classifier", "OUT.json", "classifier file: the decision function with what it takes "
     "to apply it elsewhere, what it was trained on, and the cautions", write_classifier,
     "the classifier"),
)


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json", help="experiment file to read")
    for option, metavar, help_text, _writer, _what in OUTPUTS:
        parser.add_argument(option, metavar=metavar, help=help_text)
    parser.add_argument("--model", nargs="?", action=_Renamed, help=argparse.SUPPRESS)


def run(args) -> int:
    given = {option: getattr(args, option.lstrip("-").replace("-", "_"))
             for option, *_ in OUTPUTS}
    planned = check_outputs([args.experiment], given)
    if not planned:
        raise InputError("say what to export: " + ", ".join(
            f"{option} {metavar}" for option, metavar, *_ in OUTPUTS) + ", or both")
    experiment = load_experiment(args.experiment)
    figures = experiment.results
    if figures is None:
        print(f"{args.experiment} holds no results; fitting it with its stored configuration",
              file=sys.stderr)
        figures = fit(experiment.dataset.X, experiment.dataset.y, experiment.config)
    writers = {option: (writer, what) for option, _m, _h, writer, what in OUTPUTS}
    write_outputs([(output, _bound(writers[output.option][0], experiment.dataset, figures))
                   for output in planned])
    for output in planned:
        what = writers[output.option][1].format(n=len(experiment.dataset))
        print(f"wrote {what} to {output.path}")
    print(CAUTION_LINE, file=sys.stderr)
    return 0


def _bound(writer, dataset, figures):
    return lambda path: writer(path, dataset, figures)
