"""What every subcommand shares: one-sentence errors with exit status 2, list options, and the
dictionary file to use (never writing over an input is core.safe_files.check_outputs)."""

from __future__ import annotations

import argparse

from ..messages.message import say

EXIT_BAD_INPUT = 2


class Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one sentence, exit 2, like every other bad input
        usage = say("cli.usage", problem=message, command=self.prog)
        self.exit(EXIT_BAD_INPUT, f"prunella: {usage}\n")


def size_option(text: str) -> str | int:
    """--size: '1se', 'min' or a number of outcome boxes inside the table of limits."""
    import argparse

    from ..option_limits import problem_with

    if text in ("1se", "min"):
        return text
    try:
        value: str | int = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(say("cli.size_words", given=text[:40])) from None
    problem = problem_with("size", value)
    if problem is not None:
        raise argparse.ArgumentTypeError(problem)
    return value


def csv_list(text: str | None) -> tuple[str, ...]:
    """'a, b,c' as ('a', 'b', 'c')."""
    return tuple(part.strip() for part in text.split(",") if part.strip()) if text else ()


DICTIONARY_HELP = ("data dictionary (JSON or CSV) with roles, kinds, labels, units; default: "
                   "NAME.dictionary.json (or .csv) beside the data, if there is one, as in the "
                   "app; 'none' guesses every column from the data")


def dictionary_path(given: str | None, data: str) -> str | None:
    """The dictionary file to use: the one given, else the one saved beside the data (the
    app picks that one up too, so both read the same file the same way)."""
    if given is not None:
        return None if given.strip().lower() == "none" else given
    from ..dictionary.for_table import dictionary_beside

    beside = dictionary_beside(data)
    return None if beside is None else str(beside)


def add_work_options(parser) -> None:
    """--jobs and --cluster: where the folds, nested CV and bootstrap resamples run."""
    from ..option_limits import option_type

    parser.add_argument("--jobs", type=option_type("jobs"), default=-1,
                        help="worker processes for folds, nested CV and bootstrap resamples "
                        "(default -1 = all cores; the results are the same for any number)")
    parser.add_argument("--cluster", metavar="ADDRESS",
                        help="run that work on the Dask cluster whose scheduler is at ADDRESS "
                        "(e.g. tcp://10.0.0.5:8786; needs pip install -e \".[cluster]\")")


def work_place(args):
    """The core.work_place.WorkPlace the options describe (refused in one sentence if bad)."""
    from ..work_place import WorkPlace

    return WorkPlace(jobs=args.jobs, cluster=args.cluster)
