"""``slackline render EXPERIMENT.json -o FIGURE``: the canvas picture, no window needed."""

from __future__ import annotations

import sys
from pathlib import Path

from app.canvas.figure import DEFAULT_SIZE, FORMATS, parse_size, save_figure  # no Qt at import
from cli.outputs import check_outputs, write_outputs
from solver import InputError
from solver.messages import quote


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json",
                        help="an experiment file saved by Slackline")
    parser.add_argument("-o", "--output", required=True, metavar="FIGURE",
                        help="the picture to write: .png or .svg")
    parser.add_argument("--size", default=f"{DEFAULT_SIZE[0]}x{DEFAULT_SIZE[1]}",
                        metavar="WxH", help="picture size in pixels (default 1200x800)")


def run(args) -> int:
    from solver.files import load_experiment
    from solver import fit

    width, height = parse_size(args.size)
    suffix = Path(args.output).suffix.lower()
    if suffix not in FORMATS:
        raise InputError(f"the figure must end in .png or .svg; got {quote(args.output)}")
    outputs = check_outputs([args.experiment], {"-o": args.output})
    experiment = load_experiment(args.experiment)
    dataset = experiment.dataset
    # the stored figures are a record; the picture is drawn from a fresh fit of
    # the same points and settings, the same numbers `slackline check` verifies
    result = fit(dataset.X, dataset.y, experiment.config)
    write_outputs([(outputs[0], lambda path: save_figure(path, dataset, result, width, height,
                                                         suffix=suffix))])
    print(f"wrote {args.output} ({width}x{height})", file=sys.stderr)
    return 0
