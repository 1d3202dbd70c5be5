"""What every subcommand shares: one-sentence errors with exit status 2, list options, and
never writing over an input file."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..errors import InputError

EXIT_BAD_INPUT = 2


class Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one sentence, exit 2, like every other bad input
        self.exit(EXIT_BAD_INPUT, f"prunella: {message}; see 'prunella {self.prog.split()[-1]} --help'.\n")


def csv_list(text: str | None) -> tuple[str, ...]:
    """'a, b,c' as ('a', 'b', 'c')."""
    return tuple(part.strip() for part in text.split(",") if part.strip()) if text else ()


def refuse_overwrite(target: str | None, *sources: str) -> None:
    """Refuse an output path that names one of the inputs."""
    if target is None:
        return
    for source in sources:
        if Path(source).exists() and Path(target).resolve() == Path(source).resolve():
            raise InputError(f"{target} is an input file; choose another name for the output "
                             "so the input stays unchanged.")
