"""Arguments shared by the headless commands that read a data file and fit it."""

from __future__ import annotations

import argparse
import sys

from solver import kernels, scaling
from solver import FitConfig
from solver import PARAMETERS
from solver.files import Dataset, load_table
from solver import InputError
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
    """C, kernel, the kernel parameters, class weights and scaling, as the
    kernel registry and solver.parameters declare them."""
    margin = parser.add_mutually_exclusive_group()
    margin.add_argument("--C", dest="C", type=_number("C"), default=PARAMETERS["C"].default,
                        help=f"{PARAMETERS['C'].help} (default {PARAMETERS['C'].default:g})")
    margin.add_argument("--hard", action="store_true",
                        help="hard margin (C = infinity): no slack allowed")
    parser.add_argument("--kernel", type=_choice("kernel", kernels.names), default="linear",
                        metavar="|".join(kernels.names()),
                        help="; ".join(f"{k.name}: {k.help}" for k in kernels.REGISTRY.values())
                        + " (default linear)")
    for name in kernels.parameter_names():
        spec = PARAMETERS[name]
        users = ", ".join(k.name for k in kernels.REGISTRY.values() if name in k.parameters)
        parser.add_argument(f"--{name}", type=_number(name), default=spec.default,
                            help=f"{spec.help} [{users}] (default {spec.default:g})")
    for old, new in OLD_OPTIONS.items():
        parser.add_argument(old, nargs="?", action=Renamed, new=new, help=argparse.SUPPRESS)
    parser.add_argument("--weight", action="append", default=[], metavar="LABEL=FACTOR",
                        help="class weight: multiply C for points of LABEL (repeatable)")
    parser.add_argument("--scale", type=_choice("scale", lambda: tuple(scaling.METHODS)),
                        default="none", metavar="|".join(scaling.METHODS),
                        help="feature scaling before the fit: "
                             + "; ".join(f"{k}: {v}" for k, v in scaling.METHODS.items())
                             + " (default none)")


# spellings of other tools that users may bring along -> ours
OLD_SPELLINGS = {"kernel": {"poly": "polynomial"}, "scale": {"standard": "zscore",
                                                             "minmax": "range"}}


OLD_OPTIONS = {"--coef0": "--offset", "--model": "--classifier"}


class Renamed(argparse.Action):
    """An option of other tools' spelling (or of an older release): refused with the
    name it has here."""

    def __init__(self, *args, new: str = "", **kwargs):
        self.new = new
        super().__init__(*args, **kwargs)

    def __call__(self, parser, namespace, values, option_string=None):
        parser.error(f"{option_string} is called {self.new or OLD_OPTIONS[option_string]} here")


def _choice(option: str, allowed):
    def parse(text):
        if text in allowed():
            return text
        hint = OLD_SPELLINGS.get(option, {}).get(text)
        if hint:
            raise argparse.ArgumentTypeError(f"--{option} {text!r} is spelled {hint!r} here")
        raise argparse.ArgumentTypeError(f"--{option} must be one of "
                                         f"{', '.join(allowed())}; got {text!r}")
    return parse


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
    settings = {name: getattr(args, name) for name in kernels.parameter_names()}
    for name, value in settings.items():
        if PARAMETERS[name].kind is int and float(value).is_integer():
            settings[name] = int(value)
    return FitConfig(C=args.C, hard_margin=args.hard, kernel=args.kernel, **settings,
                     weight_positive=weights[1], weight_negative=weights[-1],
                     scaling=args.scale)


def _same(value, text) -> bool:
    try:
        return float(value) == float(text)
    except (TypeError, ValueError):
        return False
