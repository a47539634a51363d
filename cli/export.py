"""``slackline export EXPERIMENT.json --points out.csv --model out.json``.

Writes the experiment's per-point table (CSV) and/or its model card (JSON)
from the figures stored in the file.  An experiment saved without results is
fitted first with its stored configuration (said on stderr).  Both outputs
are checked before the experiment is read, and written together or not at
all (cli.outputs).
"""

from __future__ import annotations

import sys

from cli.outputs import check_outputs, write_outputs
from solver import InputError
from solver.files import load_experiment
from solver.files import write_model_card, write_points_csv
from solver import fit

# option, metavar, help, writer(path, dataset, figures), what it is
OUTPUTS = (
    ("--points", "OUT.csv", "per-point table: features, label, sign, decision value, "
     "functional margin, distance, alpha, slack, status", write_points_csv,
     "the per-point table"),
    ("--model", "OUT.json", "model card: what it takes to apply the classifier elsewhere",
     write_model_card, "the model card"),
)


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json", help="experiment file to read")
    for option, metavar, help_text, _writer, _what in OUTPUTS:
        parser.add_argument(option, metavar=metavar, help=help_text)


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
        print(f"wrote {writers[output.option][1]} to {output.path}")
    return 0


def _bound(writer, dataset, figures):
    return lambda path: writer(path, dataset, figures)
