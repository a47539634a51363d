"""The ``slackline`` command: headless subcommands, or the workbench window.

No Qt is imported here at module level, so the headless commands start fast
and run on machines without a display.
"""

from __future__ import annotations

import argparse
import importlib
import sys

from solver import SlacklineError

# subcommand -> (module, one-line help); each module has add_arguments(parser)
# and run(args) -> exit status.
COMMANDS = {
    "fit": ("cli.fit", "fit a support vector machine to a CSV/TSV file"),
    "check": ("cli.check", "re-run an experiment file and compare its numbers"),
    "export": ("cli.export", "write an experiment's points table or classifier file"),
    "sweep": ("cli.sweep", "fit across a range of C with cross-validation"),
    "render": ("cli.render", "draw an experiment's canvas to a PNG/SVG file, no window"),
    "predict": ("cli.predict", "apply an experiment's classifier to new rows of a CSV/TSV file"),
}


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="slackline",
        description="Fit, explain and export two-feature support vector machines. "
                    "Without a command, opens the workbench window.")
    parser.add_argument("--version", action="version", version=_version())
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module_name, help_text) in COMMANDS.items():
        command_parser = sub.add_parser(name, help=help_text, description=help_text)
        module = importlib.import_module(module_name)   # a broken command fails loudly
        module.add_arguments(command_parser)
        command_parser.set_defaults(run=module.run)
    return parser


def _version() -> str:
    from solver import __version__
    return f"slackline {__version__}"


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    if not argv or argv[0].startswith("-") and argv[0] not in ("-h", "--help", "--version"):
        from app.window.launch import launch_window
        return launch_window(argv)
    parser = build_parser()
    args = parser.parse_args(argv)
    if getattr(args, "run", None) is None:
        parser.print_help(sys.stderr)
        return 2
    try:
        return int(args.run(args) or 0)
    except SlacklineError as exc:
        print(f"slackline {args.command}: {exc}", file=sys.stderr)
        for problem in getattr(exc, "problems", []) or []:
            print(f"  {problem}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
