"""``slackline fit DATA ...``: fit once, print a summary or one JSON object."""

from __future__ import annotations

import json
import sys

from solver import fit
from solver import STATUS_TEXT, STATUSES, result_to_dict
from cli.common import add_config_arguments, add_data_arguments, config_from_args, load_data
from cli.fit_evidence import add_evidence_arguments, evidence_for


def add_arguments(parser) -> None:
    add_data_arguments(parser)
    add_config_arguments(parser)
    parser.add_argument("--json", action="store_true",
                        help="print exactly one JSON object on stdout instead of a summary")
    parser.add_argument("--save", metavar="EXPERIMENT.json",
                        help="also write a reproducible experiment file")
    add_evidence_arguments(parser)


def run(args) -> int:
    dataset = load_data(args)
    config = config_from_args(args, dataset)
    print(f"labels: {dataset.mapping_text()}", file=sys.stderr)
    result = fit(dataset.X, dataset.y, config)
    evidence = evidence_for(args, dataset, result)
    if args.save:
        from solver.files import save_experiment  # the file layer
        save_experiment(args.save, dataset, result, heldout=evidence.heldout_section())
    if args.json:
        data = result_to_dict(result)
        data["features"] = list(dataset.feature_names)
        data["label_mapping"] = {str(k): v for k, v in dataset.label_mapping.items()}
        data.update(evidence.to_json())
        json.dump(data, sys.stdout)
        sys.stdout.write("\n")
    else:
        print(summary_text(result, dataset) + evidence.text())
    return 0


def summary_text(result, dataset) -> str:
    config = result.config
    c_text = "hard margin" if config.hard_margin else f"C = {config.C:g}"
    lines = [f"{dataset.source}: {len(result.y)} points, features "
             f"{dataset.feature_names[0]}, {dataset.feature_names[1]}; "
             f"{config.kernel} kernel, {c_text}, scaling {config.scaling}"]
    if result.w is not None:
        lines.append(f"  w = ({result.w[0]:.6g}, {result.w[1]:.6g})   b = {result.b:.6g}   "
                     f"margin width 2/|w| = {result.margin_width:.6g}")
    else:
        lines.append(f"  b = {result.b:.6g}")
    counts = ", ".join(f"{result.count(s)} {STATUS_TEXT[s]}" for s in STATUSES)
    lines.append(f"  support vectors: {result.n_support}  ({counts})")
    lines.append(f"  training error {result.training_error:.1%}   objective "
                 f"1/2|w|^2 = {result.half_norm_w2:.6g}, sum C_i xi_i = {result.penalty_term:.6g}")
    lines.append(f"  primal {result.primal_objective:.10g}  dual {result.dual_objective:.10g}  "
                 f"gap {result.duality_gap:.2e}   {result.iterations} iterations, "
                 f"{result.seconds * 1e3:.1f} ms")
    return "\n".join(lines)
