"""``slackline render EXPERIMENT.json -o FIGURE``: the canvas picture, no window needed.

FIGURE ending in .json writes the figure's geometry as data instead
(app.canvas.figure_data): boundary, band, support vectors, slack segments
and w, in the data's own units.
"""

from __future__ import annotations

import sys
from pathlib import Path

from app.canvas.figure import DEFAULT_SIZE, FORMATS, parse_size, save_figure  # no Qt at import
from cli.outputs import check_outputs, write_outputs
from solver import InputError
from solver.messages import quote

GEOMETRY_FORMAT = ".json"


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json",
                        help="an experiment file saved by Slackline")
    parser.add_argument("-o", "--output", required=True, metavar="FIGURE",
                        help="the picture to write: .png or .svg; or .json for the "
                             "figure's geometry as data")
    parser.add_argument("--size", default=f"{DEFAULT_SIZE[0]}x{DEFAULT_SIZE[1]}",
                        metavar="WxH", help="picture size in pixels (default 1200x800)")


def run(args) -> int:
    from solver.files import load_experiment
    from solver import fit

    suffix = Path(args.output).suffix.lower()
    if suffix not in FORMATS + (GEOMETRY_FORMAT,):
        raise InputError(f"the figure must end in .png or .svg (or .json for its geometry as "
                         f"data); got {quote(args.output)}")
    width, height = parse_size(args.size)
    outputs = check_outputs([args.experiment], {"-o": args.output})
    experiment = load_experiment(args.experiment)
    dataset = experiment.dataset
    # the stored figures are a record; the picture is drawn from a fresh fit of
    # the same points and settings, the same numbers `slackline check` verifies
    result = fit(dataset.X, dataset.y, experiment.config)
    if suffix == GEOMETRY_FORMAT:
        from app.canvas.figure_data import figure_json
        from solver.files.atomic import atomic_write_text
        text = figure_json(result, dataset.feature_names)
        write_outputs([(outputs[0], lambda path: atomic_write_text(path, text))])
        print(f"wrote {args.output} (figure geometry)", file=sys.stderr)
        return 0
    write_outputs([(outputs[0], lambda path: save_figure(path, dataset, result, width, height,
                                                         suffix=suffix))])
    print(f"wrote {args.output} ({width}x{height})", file=sys.stderr)
    return 0
