"""The ``prunella`` entry point: subcommands go to core's command line, no Qt imported;
without a subcommand the desktop app opens."""

from __future__ import annotations

import sys


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    from core.cli import SUBCOMMANDS, main as cli_main

    if argv and (argv[0] in SUBCOMMANDS or argv[0] in ("-h", "--help", "--version")):
        return cli_main(argv)
    from gui.app import run_app  # imports Qt only now

    return run_app(argv)


if __name__ == "__main__":
    sys.exit(main())
