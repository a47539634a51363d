"""Arguments shared by the headless commands that read a data file and fit it."""

from __future__ import annotations

import argparse
import sys

from solver.config import FitConfig
from solver.files.dataset import Dataset, load_table
from solver.errors import InputError
from solver.messages import listing, quote


def add_data_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("data", metavar="DATA", help="CSV or TSV file with a header row")
    parser.add_argument("--features", metavar="A,B",
                        help="the two feature columns (default: the first two numeric ones)")
    parser.add_argument("--label", metavar="L", help="the label column (default: the last)")
    parser.add_argument("--positive", metavar="VALUE",
                        help="the label value that counts as the positive class (+1)")
    parser.add_argument("--drop-incomplete", action="store_true",
                        help="skip rows with a missing or non-numeric feature (listed on stderr)")


def add_config_arguments(parser: argparse.ArgumentParser) -> None:
    margin = parser.add_mutually_exclusive_group()
    margin.add_argument("--C", dest="C", type=_number("C"), default=1.0,
                        help="regularisation strength, a positive number (default 1)")
    margin.add_argument("--hard", action="store_true",
                        help="hard margin (C = infinity): no slack allowed")
    parser.add_argument("--kernel", choices=("linear", "polynomial", "rbf"), default="linear")
    parser.add_argument("--gamma", type=_number("gamma"), default=0.5,
                        help="kernel width for rbf and poly (default 0.5)")
    parser.add_argument("--degree", type=_number("degree"), default=3,
                        help="polynomial degree (default 3)")
    parser.add_argument("--offset", type=_number("offset"), default=1.0,
                        help="polynomial offset, >= 0 (default 1)")
    parser.add_argument("--weight", action="append", default=[], metavar="LABEL=FACTOR",
                        help="class weight: multiply C for points of LABEL (repeatable)")
    parser.add_argument("--scale", choices=("none", "zscore", "range"), default="none",
                        help="feature scaling before the fit (default none)")


def _number(name):
    def parse(text):
        try:
            return float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{name} must be a number; got {quote(text)}") from None
    return parse


def load_data(args) -> Dataset:
    features = None
    if args.features:
        features = [part.strip() for part in args.features.split(",")]
        if len(features) != 2 or not all(features):
            raise InputError(f"--features takes two column names separated by a comma; "
                             f"got {quote(args.features)}")
    dataset = load_table(args.data, features=features, label=args.label,
                         positive=args.positive, drop_incomplete=args.drop_incomplete)
    if dataset.skipped:
        print(f"skipped incomplete rows at line(s) {', '.join(map(str, dataset.skipped))}",
              file=sys.stderr)
    return dataset


def config_from_args(args, dataset: Dataset) -> FitConfig:
    weights = {1: 1.0, -1: 1.0}
    for item in args.weight:
        label, _, factor = item.rpartition("=")
        if not label:
            raise InputError(f"--weight takes LABEL=FACTOR, for example --weight bad=2; "
                             f"got {quote(item)}")
        sign = next((s for value, s in dataset.label_mapping.items()
                     if str(value) == label or _same(value, label)), None)
        if sign is None:
            known = listing(str(v) for v in dataset.label_mapping)
            raise InputError(f"--weight names label {quote(label)}, which is not in the data "
                             f"(labels: {known})")
        try:
            weights[sign] = float(factor)
        except ValueError:
            raise InputError(f"the class weight in --weight {quote(item)} must be a number") from None
    degree = int(args.degree) if float(args.degree).is_integer() else args.degree
    return FitConfig(C=args.C, hard_margin=args.hard, kernel=args.kernel, gamma=args.gamma,
                     degree=degree, offset=args.offset, weight_positive=weights[1],
                     weight_negative=weights[-1], scaling=args.scale)


def _same(value, text) -> bool:
    try:
        return float(value) == float(text)
    except (TypeError, ValueError):
        return False
