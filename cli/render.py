"""``slackline render EXPERIMENT.json -o FIGURE``: the canvas picture, no window needed."""

from __future__ import annotations

import sys
from pathlib import Path

from app.canvas.figure import DEFAULT_SIZE, FORMATS, parse_size, save_figure  # no Qt at import
from solver import InputError



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
    if Path(args.output).suffix.lower() not in FORMATS:
        raise InputError(f"the figure must end in .png or .svg; got {args.output!r}")
    experiment = load_experiment(args.experiment)
    dataset = experiment.dataset
    # the stored figures are a record; the picture is drawn from a fresh fit of
    # the same points and settings, the same numbers `slackline check` verifies
    result = fit(dataset.X, dataset.y, experiment.config)
    path = save_figure(args.output, dataset, result, width, height)
    print(f"wrote {path} ({width}x{height})", file=sys.stderr)
    return 0
