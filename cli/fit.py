"""``slackline fit DATA ...``: fit once, print a summary or one JSON object."""

from __future__ import annotations

import math
import sys

from solver import CAUTION_LINE, INSIDE, MISCLASSIFIED, ON_MARGIN, OUTSIDE, STATUS_TEXT, fit
from solver.result import NO_LINE
from cli.common import add_config_arguments, add_data_arguments, config_from_args, load_data
from cli.fit_evidence import add_evidence_arguments, evidence_for
from cli.outputs import check_outputs, print_json, write_outputs


def add_arguments(parser) -> None:
    add_data_arguments(parser)
    add_config_arguments(parser)
    parser.add_argument("--json", action="store_true",
                        help="print exactly one JSON object on stdout instead of a summary")
    parser.add_argument("--save", metavar="EXPERIMENT.json",
                        help="also write a reproducible experiment file")
    add_evidence_arguments(parser)


def run(args) -> int:
    outputs = check_outputs([args.data, args.test], {"--save": args.save})
    dataset = load_data(args)
    config = config_from_args(args, dataset)
    print(f"labels: {dataset.mapping_text()}", file=sys.stderr)
    result = fit(dataset.X, dataset.y, config)
    evidence = evidence_for(args, dataset, result)
    if outputs:
        from solver.files import save_experiment  # the file layer
        write_outputs([(outputs[0], lambda path: save_experiment(
            path, dataset, result, heldout=evidence.heldout_section()))])
    if args.json:
        data = result.to_dict()
        data["functional_margin"] = result.functional_margin.tolist()   # y_i f(x_i)
        data["distance"] = _finite_list(result.distance)                 # y_i f(x_i) / |w|
        if result.projection is not None:
            data["projection"] = result.projection.tolist()               # w.x_i / |w|
        data["features"] = list(dataset.feature_names)
        data["label_mapping"] = {str(k): v for k, v in dataset.label_mapping.items()}
        data.update(evidence.to_json())
        print_json(data)
    else:
        print(summary_text(result, dataset) + evidence.text())
    print(CAUTION_LINE, file=sys.stderr)
    return 0


def _finite_list(values) -> list:
    return [float(v) if math.isfinite(v) else None for v in values]


def summary_text(result, dataset) -> str:
    config = result.config
    c_text = "hard margin" if config.hard_margin else f"C = {config.C:g}"
    lines = [f"{dataset.source}: {len(result.y)} points, features "
             f"{dataset.feature_names[0]}, {dataset.feature_names[1]}; "
             f"{config.kernel} kernel, {c_text}, scaling {config.scaling}"]
    if result.w_is_zero:
        lines.append(f"  w = 0 to rounding: {NO_LINE}   b = {result.b:.6g}")
    elif result.w is not None:
        lines.append(f"  w = ({result.w[0]:.6g}, {result.w[1]:.6g})   b = {result.b:.6g}   "
                     f"margin width 2/|w| = {result.margin_width:.6g}")
    else:
        lines.append(f"  b = {result.b:.6g}")
    held = ", ".join(f"{result.count(s)} {STATUS_TEXT[s]}" for s in (ON_MARGIN, INSIDE,
                                                                      MISCLASSIFIED))
    lines.append(f"  support vectors: {result.n_support} ({held}); "
                 f"the other {result.count(OUTSIDE)} points are {STATUS_TEXT[OUTSIDE]}")
    lines.append(f"  training error {result.training_error:.1%}   objective "
                 f"1/2|w|^2 = {result.half_norm_w2:.6g}, sum C_i xi_i = {result.penalty_term:.6g}")
    lines.append(f"  primal {result.primal_objective:.10g}  dual {result.dual_objective:.10g}  "
                 f"gap {result.duality_gap:.2e}   {result.iterations} iterations, "
                 f"{result.seconds * 1e3:.1f} ms")
    return "\n".join(lines)
