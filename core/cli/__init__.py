"""The ``prunella`` subcommands. Bad input prints one sentence with the fix and exits with 2.

The entry point lives in gui/launch.py, which hands subcommands here without importing Qt.
Each subcommand's options and work live in their own module: fit.py (fit, score),
checking.py (check, report) and chart.py (chart).
"""

from __future__ import annotations

import os
import sys

from .. import __version__
from ..errors import Cancelled, InputError
from ..messages.message import say
from ..phrases import METHOD_NAME
from ..safe_files import save_notes
from . import chart, checking, fit
from .arguments import EXIT_BAD_INPUT, Parser

SUBCOMMANDS = ("fit", "score", "check", "report", "chart")
_RUN = {"fit": fit.run_fit, "score": fit.run_score, "check": checking.run_check,
        "report": checking.run_report, "chart": chart.run_chart}

__all__ = ["SUBCOMMANDS", "EXIT_BAD_INPUT", "build_parser", "main"]


def build_parser() -> Parser:
    parser = Parser(prog="prunella", description="Cross-validated, cost-complexity-pruned "
                    f"decision trees for clinical spreadsheets, by the method of {METHOD_NAME}. "
                    "Run without a command to open the app.")
    parser.add_argument("--version", action="version", version=f"prunella {__version__}")
    sub = parser.add_subparsers(dest="command", parser_class=Parser)
    fit.add_parsers(sub)
    checking.add_parsers(sub)
    chart.add_parsers(sub)
    parser.subcommands = dict(sub.choices)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Run a subcommand; returns the exit status."""
    parser = build_parser()
    args, unknown = parser.parse_known_args(argv)
    if args.command is None:
        if unknown:
            parser.error(say("cli.unknown_arguments", arguments=" ".join(unknown)))
        parser.print_help()
        return EXIT_BAD_INPUT
    if unknown:  # said by the subcommand, so the advice names 'prunella fit --help'
        parser.subcommands[args.command].error(
            say("cli.unknown_arguments", arguments=" ".join(unknown)))
    try:
        with save_notes(lambda note: print(f"note: {note}", file=sys.stderr)):
            return _RUN[args.command](args)
    except InputError as exc:
        print(f"prunella: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except Cancelled as exc:
        print(f"prunella: {exc}", file=sys.stderr)
        return 130
    except KeyboardInterrupt:
        print(f"prunella: {say('cli.interrupted')}", file=sys.stderr)
        return 130
    except BrokenPipeError:
        # The reader stopped reading (`prunella fit … | head`): nothing is wrong with the
        # work, so no traceback. Point stdout at nothing, or Python's own flush at exit
        # raises again; the status is the shell's for a closed pipe (128 + SIGPIPE).
        _quiet_stdout()
        return 141


def _quiet_stdout() -> None:
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):  # no real stdout (an embedded run): nothing to quiet
        pass
