"""``slackline predict EXPERIMENT.json DATA.csv``: apply a saved classifier to new rows.

The rows are read by the experiment's feature names; if the file also has
the experiment's label column, the output adds the error and the confusion
counts on these rows.  The classifier is the one stored in the experiment
(its figures, not a re-fit), so the numbers are those its classifier file gives.
"""

from __future__ import annotations

import io
import sys
from pathlib import Path

from solver import CAUTION_LINE, InputError
from solver.files import load_experiment, read_new_rows, scored_csv
from solver.study import Classifier, confusion, score
from cli.outputs import check_outputs, print_json, write_outputs


def add_arguments(parser) -> None:
    parser.add_argument("experiment", metavar="EXPERIMENT.json",
                        help="experiment file whose fitted classifier to apply")
    parser.add_argument("data", metavar="DATA.csv",
                        help="CSV or TSV with the experiment's two feature columns (and, "
                             "optionally, its label column)")
    form = parser.add_mutually_exclusive_group()
    form.add_argument("--json", action="store_true", help="one JSON object instead of a table")
    form.add_argument("--csv", action="store_true", help="one CSV row per scored row")
    parser.add_argument("-o", "--output", metavar="OUT",
                        help="write to this file instead of standard output")
    parser.add_argument("--drop-incomplete", action="store_true",
                        help="skip rows that cannot be scored (listed on stderr)")


def run(args) -> int:
    outputs = check_outputs([args.experiment, args.data], {"-o": args.output})
    experiment = load_experiment(args.experiment)
    if experiment.results is None:
        raise InputError(f"{args.experiment} holds no fitted classifier (it was saved before "
                         "a fit succeeded); fit it and save it again")
    dataset = experiment.dataset
    rows = read_new_rows(args.data, dataset.feature_names, dataset.label_name,
                         dataset.label_mapping, drop_incomplete=args.drop_incomplete)
    if rows.skipped:
        print(f"skipped rows at line(s) {', '.join(map(str, rows.skipped))}", file=sys.stderr)
    scores = score(Classifier.from_figures(experiment.results, dataset.X), rows.X,
                   dataset.label_mapping)
    counts = None if rows.signs is None else confusion(rows.signs, scores.signs,
                                                       dataset.label_mapping)
    if args.json:
        stream = io.StringIO()
        print_json(as_json(rows, scores, counts, dataset), stream)
        text = stream.getvalue()
    elif args.csv:
        text = as_csv(rows, scores, dataset)
    else:
        text = as_text(rows, scores, counts, dataset, args.experiment)
    if outputs:
        write_outputs([(outputs[0], lambda path: Path(path).write_text(text, encoding="utf-8"))])
        print(f"wrote {len(rows)} scored rows to {args.output}", file=sys.stderr)
    else:
        sys.stdout.write(text)
    print(CAUTION_LINE, file=sys.stderr)
    return 0


def as_json(rows, scores, counts, dataset) -> dict:
    listed = []
    for i, line in enumerate(rows.lines):
        row = {"row": int(line), "decision": float(scores.decision[i]),
               "label": scores.labels[i], "distance": float(scores.distance[i]),
               "in_band": bool(scores.in_band[i])}
        if rows.labels is not None:
            row["true_label"] = rows.labels[i]
        listed.append(row)
    data = {"rows": listed, "source": rows.source, "features": list(dataset.feature_names),
            "distance_space": scores.distance_space, "close_calls": scores.close_calls,
            "skipped_lines": list(rows.skipped)}
    if counts is not None:
        data["error"] = counts.error
        data["confusion"] = counts.to_dict()
    return data


def as_csv(rows, scores, dataset) -> str:
    return scored_csv(rows, scores, dataset.feature_names)


def as_text(rows, scores, counts, dataset, experiment_name) -> str:
    lines = [f"{rows.source}: {len(rows)} rows scored by the classifier of {experiment_name} "
             f"(features {dataset.feature_names[0]}, {dataset.feature_names[1]})",
             f"  {'line':>6} {'decision':>12}  {'predicted':<14} {'distance':>10}  close call"]
    for i, line in enumerate(rows.lines):
        lines.append(f"  {line:>6} {scores.decision[i]:>12.6g}  {str(scores.labels[i]):<14} "
                     f"{scores.distance[i]:>10.4g}  {'yes' if scores.in_band[i] else ''}")
    lines.append(f"  distance to the boundary is in {scores.distance_space}"
                 + ("" if scores.distance_space == "data units" else
                    " (the kernel's, not the plane of the data)"))
    lines.append(f"  close calls (inside the margin band, |f| < 1): {scores.close_calls} "
                 f"of {len(rows)}")
    if counts is not None:
        lines.append(f"  error on these rows: {counts.error:.1%} "
                     f"({counts.false_positive + counts.false_negative} of {counts.rows})")
        lines.extend("  " + text for text in counts.lines())
    return "\n".join(lines) + "\n"
