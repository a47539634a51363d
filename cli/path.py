"""``slackline path DATA ...``: the exact C path, its breakpoints and events.

Prints a summary, or one JSON object (--json), or a CSV of the breakpoints and
events, one row each (--csv).  ``--at C1,C2,...`` adds the solution at those C,
evaluated from the path (no QP).
"""

from __future__ import annotations

import csv
import json
import math
import sys

from solver.errors import InputError
from solver.qp.path import DEFAULT_FROM, DEFAULT_TO, compute_path
from solver.study.path_words import summary_lines
from cli.common import (_number, add_config_arguments, add_data_arguments, config_from_args,
                        load_data)


def add_arguments(parser) -> None:
    add_data_arguments(parser)
    add_config_arguments(parser, with_c=False)
    span = parser.add_argument_group("the path")
    span.add_argument("--from", dest="c_from", type=_number("--from"), default=DEFAULT_FROM,
                      metavar="A", help=f"smallest C (default {DEFAULT_FROM:g})")
    span.add_argument("--to", dest="c_to", type=_number("--to"), default=DEFAULT_TO,
                      metavar="B", help=f"largest C (default {DEFAULT_TO:g})")
    span.add_argument("--at", default="", metavar="C1,C2,...",
                      help="also print the solution at these C (inside the range)")
    output = parser.add_mutually_exclusive_group()
    output.add_argument("--json", action="store_true",
                        help="print exactly one JSON object on stdout")
    output.add_argument("--csv", action="store_true",
                        help="print the breakpoints and events as CSV, one row each")


def run(args) -> int:
    at = _c_list(args.at)
    outside = [C for C in at if not args.c_from <= C <= args.c_to]
    if outside and args.c_from < args.c_to:
        raise InputError(f"--at {outside[0]:g} is outside the range --from {args.c_from:g} "
                         f"--to {args.c_to:g}; widen the range or drop that C")
    dataset = load_data(args)
    config = config_from_args(args, dataset)
    print(f"labels: {dataset.mapping_text()}", file=sys.stderr)
    path = compute_path(dataset.X, dataset.y, config, c_from=args.c_from, c_to=args.c_to)
    results = [(C, path.evaluate(C)) for C in at]
    if args.json:
        json.dump(path_to_dict(path, results), sys.stdout, allow_nan=False)
        sys.stdout.write("\n")
    elif args.csv:
        write_csv(path, sys.stdout)
    else:
        for line in summary_lines(path, near=at[0] if at else _middle(path)):
            print(line)
        for C, result in results:
            print(_result_line(C, result))
    return 0


def path_to_dict(path, results) -> dict:
    return {
        "from": path.c_from,
        "to": path.c_to,
        "breakpoints": [float(C) for C in path.breakpoints],
        "events": [event.to_dict() for event in path.events],
        "at": [{"C": C, "b": float(result.b),
                "w": None if result.w is None else [float(v) for v in result.w],
                "alpha": [float(v) for v in result.alpha],
                "training_error": result.training_error,
                "objective": {"primal": result.primal_objective,
                              "dual": result.dual_objective}}
               for C, result in results],
        "seconds": path.seconds,
    }


def write_csv(path, stream) -> None:
    writer = csv.writer(stream, lineterminator="\n")
    writer.writerow(["kind", "C", "point", "from", "to"])
    for C in path.breakpoints:
        writer.writerow(["breakpoint", f"{C:.17g}", "", "", ""])
    for event in path.events:
        writer.writerow(["event", f"{event.C:.17g}", event.point, event.before, event.after])


def _result_line(C, result) -> str:
    w = "" if result.w is None else f"w = ({result.w[0]:.6g}, {result.w[1]:.6g})  "
    return (f"at C = {C:g}: {w}b = {result.b:.6g}  support vectors {result.n_support}  "
            f"training error {result.training_error:.1%}  primal "
            f"{result.primal_objective:.10g}  dual {result.dual_objective:.10g}")


def _middle(path) -> float:
    """C = 1 when it is in range (fit's default), else the range's middle in log C."""
    if path.c_from <= 1.0 <= path.c_to:
        return 1.0
    return math.sqrt(path.c_from * path.c_to)


def _c_list(text: str) -> list[float]:
    values = []
    for part in filter(None, (p.strip() for p in text.split(","))):
        try:
            value = float(part)
        except ValueError:
            raise InputError(f"--at takes numbers separated by commas, for example "
                             f"--at 0.1,1,10; got {part!r}") from None
        if not math.isfinite(value) or value <= 0:
            raise InputError(f"every C in --at must be a positive number; got {part!r}")
        values.append(value)
    return values
