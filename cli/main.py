"""The ``slackline`` command: headless subcommands, or the workbench window.

No Qt is imported here at module level, so the headless commands start fast
and run on machines without a display.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

from solver import SlacklineError
from solver.messages import MESSAGE_LIMIT, one_line

PROBLEMS_SHOWN = 20    # problems of an invalid file listed below the message, one per line

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


class _Parser(argparse.ArgumentParser):
    """argparse, but a bad option is one bounded line, not the usage block."""

    def error(self, message):
        text = one_line(f"{self.prog}: {message} (see {self.prog} --help)", MESSAGE_LIMIT)
        self.exit(2, text + "\n")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
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
        _say(f"slackline {args.command}: {exc}", getattr(exc, "problems", []) or [])
        return 2
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return _closed_stdout()
    except OSError as exc:   # a file or stream that failed under us
        where = f" ({exc.filename})" if exc.filename else ""
        _say(f"slackline {args.command}: {exc.strerror or exc}{where}; nothing more was written")
        return 2
    except Exception as exc:  # the last guard: a bug, said in one line, never a traceback
        if os.environ.get("SLACKLINE_DEBUG"):
            raise
        _say(f"slackline {args.command}: internal error ({type(exc).__name__}: {exc}); "
             f"please report it with the command and its input (SLACKLINE_DEBUG=1 shows "
             f"the details)")
        return 3


def _say(message: str, problems=()) -> None:
    """The message on one bounded line; an invalid file's problems below it, counted."""
    lines = [one_line(message)] + ["  " + one_line(p) for p in problems[:PROBLEMS_SHOWN]]
    if len(problems) > PROBLEMS_SHOWN:
        lines.append(f"  ... and {len(problems) - PROBLEMS_SHOWN} more problems")
    print("\n".join(lines), file=sys.stderr)


def _closed_stdout() -> int:
    """The reader of our output went away (``| head``): stop quietly, as other tools do."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass
    return 141


if __name__ == "__main__":
    sys.exit(main())
