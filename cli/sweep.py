"""``slackline sweep DATA ...``: fit across a range of C with k-fold cross-validation.

Prints a table and the suggested C (or one JSON object with --json, or a CSV
with one row per C with --csv).  A progress bar goes to stderr when stderr is
a terminal, and stays quiet otherwise.
"""

from __future__ import annotations

import math
import sys

from solver.study import LEAVE_ONE_OUT
from solver import InputError
from solver.study import DEFAULT_FROM, DEFAULT_STEPS, DEFAULT_TO, SweepSettings, run_sweep
from cli.common import add_config_arguments, add_data_arguments, config_from_args, load_data
from cli.outputs import print_json
from cli.sweep_validation import add_validation_argument, heldout_curve
from solver.parameters import PARAMETERS

SEED_LIMIT = 2 ** 32 - 1   # numpy's SeedSequence / scikit-learn's random_state take 0 .. 2**32 - 1
STEPS_LIMIT = 1000


def add_arguments(parser) -> None:
    add_data_arguments(parser)
    add_config_arguments(parser)
    grid = parser.add_argument_group("the sweep")
    grid.add_argument("--from", dest="c_from", type=_number("--from"), default=DEFAULT_FROM,
                      metavar="C", help=f"smallest C (default {DEFAULT_FROM:g})")
    grid.add_argument("--to", dest="c_to", type=_number("--to"), default=DEFAULT_TO,
                      metavar="C", help=f"largest C (default {DEFAULT_TO:g})")
    grid.add_argument("--steps", type=_whole("--steps"), default=DEFAULT_STEPS,
                      help=f"values of C, log-spaced, ends included (default {DEFAULT_STEPS})")
    grid.add_argument("--folds", default="5", metavar="K",
                      help="k of the stratified k-fold cross-validation, or 'loo' for "
                           "leave-one-out (default 5)")
    grid.add_argument("--seed", type=_whole("--seed"), default=0,
                      help="seed of the fold split (default 0)")
    grid.add_argument("--jobs", type=_whole("--jobs"), default=None, metavar="N",
                      help="parallel fold jobs through joblib (default: joblib's default; "
                           "-1 uses every core)")
    add_validation_argument(grid)
    output = parser.add_mutually_exclusive_group()
    output.add_argument("--json", action="store_true",
                        help="print exactly one JSON object on stdout")
    output.add_argument("--csv", action="store_true",
                        help="print one CSV row per C on stdout")


def run(args) -> int:
    if args.hard:
        raise InputError("a sweep varies C, so it cannot use --hard; drop --hard and set "
                         "the range with --from and --to")
    _check_options(args)
    settings = SweepSettings(c_from=args.c_from, c_to=args.c_to, steps=args.steps,
                             folds=_folds(args.folds), seed=args.seed)
    dataset = load_data(args)
    config = config_from_args(args, dataset)
    if args.C != 1.0:
        print("note: --C is not used by sweep; the range comes from --from and --to",
              file=sys.stderr)
    print(f"labels: {dataset.mapping_text()}", file=sys.stderr)
    sweep = _run_with_progress(dataset, config, settings, args.jobs)
    curve = heldout_curve(args, dataset, sweep)          # with --test: a fixed validation set
    if args.json:
        data = sweep.to_dict()
        data["data"] = {"source": dataset.source, "sha256": dataset.sha256,
                        "features": list(dataset.feature_names),
                        "label_mapping": {str(k): v for k, v in dataset.label_mapping.items()}}
        print_json(curve.add_to_json(data) if curve else data)
    elif args.csv:
        import pandas as pd
        rows = curve.add_to(sweep.rows()) if curve else sweep.rows()
        pd.DataFrame(rows).to_csv(sys.stdout, index=False, float_format="%.10g")
    else:
        print(table_text(sweep, dataset) + ("\n" + curve.text() if curve else ""))
    for failure in sweep.failures:
        print(f"fit failed at C = {failure.C:g} ({failure.where}): {failure.message}",
              file=sys.stderr)
    return 0


def _check_options(args) -> None:
    """What the libraries below would refuse with a traceback, refused here in words."""
    if not 0 <= args.seed <= SEED_LIMIT:
        raise InputError(f"--seed must be a whole number from 0 to {SEED_LIMIT}; "
                         f"got {args.seed}")
    if args.jobs is not None and args.jobs != -1 and args.jobs < 1:
        raise InputError(f"--jobs must be 1 or more, or -1 for every core; got {args.jobs}")
    if args.jobs is not None and args.jobs > 256:
        raise InputError(f"--jobs is at most 256 parallel jobs; got {args.jobs}")
    if not 2 <= args.steps <= STEPS_LIMIT:
        raise InputError(f"--steps must be a whole number from 2 to {STEPS_LIMIT}; "
                         f"got {args.steps}")
    for option, value in (("--from", args.c_from), ("--to", args.c_to)):
        if not (math.isfinite(value) and value > 0):
            raise InputError(f"{option} must be a positive number; got {value:g}")
        if PARAMETERS["C"].problem(value) is not None:   # each C of the grid is a fit's C
            raise InputError(f"{option} must be {PARAMETERS['C'].describe()}; got {value:g}")


def _run_with_progress(dataset, config, settings, jobs):
    from tqdm import tqdm
    with tqdm(total=1, desc="sweep", unit="fit", file=sys.stderr,
              disable=not sys.stderr.isatty(), leave=False) as bar:
        def progress(done, total):
            bar.total = total
            bar.n = done
            bar.refresh()
        return run_sweep(dataset.X, dataset.y, config, settings, progress=progress, n_jobs=jobs)


def table_text(sweep, dataset) -> str:
    fold_text = "leave-one-out" if sweep.folds == LEAVE_ONE_OUT else f"{sweep.folds}-fold"
    lines = [f"{dataset.source}: {sweep.n_points} points, {sweep.config.kernel} kernel, "
             f"{len(sweep.C)} values of C, {fold_text} cross-validation (seed {sweep.seed}), "
             f"{sweep.seconds:.2f} s",
             f"{'C':>10} {'margin':>9} {'SV':>4} {'on':>4} {'in':>4} {'wrong':>5} "
             f"{'train err':>9} {'CV err':>7} {'CV SE':>7} {'1/2|w|^2':>10} {'sum C xi':>10}"]
    for row in sweep.rows():
        lines.append(f"{row['C']:>10.4g} {row['margin_width']:>9.4g} {_int(row['n_support']):>4} "
                     f"{_int(row['n_on_margin']):>4} {_int(row['n_inside']):>4} "
                     f"{_int(row['n_misclassified']):>5} {row['training_error']:>9.3f} "
                     f"{row['cv_error']:>7.3f} {row['cv_standard_error']:>7.3f} "
                     f"{row['half_norm_w2']:>10.4g} {row['penalty_term']:>10.4g}")
    suggestion = sweep.suggestion
    if suggestion is None:
        lines.append("no suggestion: no C had every fold fit succeed")
    else:
        lines += [
            "suggestion (from cross-validation on these points — not a validated model):",
            f"  lowest CV error {suggestion.best_error:.3f} "
            f"(SE {suggestion.best_standard_error:.3f}) at C = {suggestion.best_C:.4g}",
            f"  within one standard error of it (CV error <= {suggestion.threshold:.3f}):",
            f"    largest C  = {suggestion.largest_C_within_one_se:.4g}  (less regularised)",
            f"    smallest C = {suggestion.smallest_C_within_one_se:.4g}  (more regularised, "
            f"the simpler model)"]
    exact = sweep.exact_cv
    if exact is not None:
        best = exact.suggestion
        lines += [
            f"at every C (one exact C path per fold, {len(exact.knots)} steps of the CV error):",
            f"  lowest CV error {best.best_error:.3f} (SE {best.best_standard_error:.3f}); "
            f"within one SE for C from {best.smallest_C_within_one_se:.4g} to "
            f"{best.largest_C_within_one_se:.4g}"]
    if sweep.cancelled:
        lines.append(f"cancelled after {len(sweep.C)} of {sweep.planned_steps} values of C")
    return "\n".join(lines)


def _int(value) -> str:
    return "-" if math.isnan(value) else str(int(value))


def _folds(text):
    return LEAVE_ONE_OUT if str(text).strip().lower() == LEAVE_ONE_OUT else text


def _number(name):
    import argparse

    def parse(text):
        try:
            value = float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{name} must be a number; got {text!r}") from None
        return value
    return parse


def _whole(name):
    import argparse

    def parse(text):
        try:
            return int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{name} must be a whole number; "
                                             f"got {text!r}") from None
    return parse
