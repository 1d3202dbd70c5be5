"""The one table of limits for every numeric setting a user can give.

The command line (its options are parsed with :func:`option_type`), the project and model
files (their settings are checked with :func:`check_setting`), the start of every derivation
(:func:`check_request_limits`) and the app's spin boxes (:func:`spin_range`) all read the
same table, so a value refused in one place is refused in every place, before any work
starts. Each limit is written as scikit-learn writes its parameter constraints: a number type
and an interval, closed or open at each end. The upper ends are far above any sensible value;
they exist so that a file cannot ask for ten million repeats or a million folds.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from numbers import Integral, Real

from .errors import InputError
from .messages.message import say


@dataclass(frozen=True)
class Interval:
    """Allowed values of a number: its type (``Integral`` or ``Real``), its ends and which
    ends belong to it ("both", "left", "right" or "neither"), as in scikit-learn."""

    kind: type
    low: float
    high: float
    closed: str = "both"

    def holds(self, value) -> bool:
        """True if ``value`` is a number of this kind inside the interval (never a bool)."""
        if isinstance(value, bool) or not isinstance(value, self.kind):
            return False
        try:
            if not math.isfinite(value):
                return False
        except OverflowError:  # a whole number too large for a float: far outside any limit
            return False
        above = value >= self.low if self.closed in ("both", "left") else value > self.low
        below = value <= self.high if self.closed in ("both", "right") else value < self.high
        return above and below

    def words(self) -> str:
        """The interval in words, e.g. 'a whole number from 1 to 100000'."""
        if self.kind is Integral:
            return say("limit.whole_from_to", low=_number(self.low), high=_number(self.high))
        code = {"both": "limit.number_from_to", "left": "limit.number_from_below",
                "right": "limit.number_above_to", "neither": "limit.number_between"}[self.closed]
        return say(code, low=_number(self.low), high=_number(self.high))


@dataclass(frozen=True)
class OptionLimit:
    """One setting: its name in settings and files, its command-line option, its interval,
    and whether it may be left out (None: no limit, or not used)."""

    name: str
    option: str
    interval: Interval
    optional: bool = False
    also: tuple[int, ...] = ()  # special values outside the interval (jobs: -1 = every core)

    def holds(self, value) -> bool:
        if value is None:
            return self.optional
        if value in self.also and not isinstance(value, bool) and isinstance(value, Integral):
            return True
        return self.interval.holds(value)

    def words(self) -> str:
        words = self.interval.words()
        if self.also:
            words = say("limit.or_every_core", allowed=words)
        return words


def _number(value: float) -> str:
    return str(int(value)) if float(value).is_integer() else f"{value:g}"


def _whole(low: int, high: int) -> Interval:
    return Interval(Integral, low, high)


# The table. Upper ends: far above sensible use, low enough that no file can ask for work
# that runs for days or fills the memory (issue: ten million repeats reached 23.7 GB).
OPTION_LIMITS: dict[str, OptionLimit] = {limit.name: limit for limit in (
    OptionLimit("min_leaf", "--min-leaf", _whole(1, 1_000_000)),
    OptionLimit("max_depth", "--max-depth", _whole(1, 64), optional=True),
    OptionLimit("folds", "--folds", _whole(2, 100)),
    OptionLimit("repeats", "--repeats", _whole(1, 100)),
    OptionLimit("validation_share", "--validation-share", Interval(Real, 0, 1, "neither")),
    OptionLimit("holdout", "--holdout", Interval(Real, 0, 1, "neither"), optional=True),
    OptionLimit("miss_cost", "--miss-cost", Interval(Real, 0, 1000, "right"), optional=True),
    OptionLimit("seed", "--seed", _whole(0, 2**31 - 1)),  # the app's spin box holds 2**31 - 1
    OptionLimit("jobs", "--jobs", _whole(1, 1024), also=(-1,)),
    OptionLimit("size", "--size", _whole(1, 100_000)),
    OptionLimit("bootstrap", "--bootstrap", _whole(0, 10_000)),
    OptionLimit("outer_folds", "--outer-folds", _whole(2, 100)),
    OptionLimit("goal", "--min-sensitivity", Interval(Real, 0, 1, "neither"), optional=True),
    OptionLimit("small_cell", "--small-cell", _whole(0, 1_000_000)),
    OptionLimit("prior", "--priors", Interval(Real, 0, 1e6)),
    OptionLimit("cost", "--costs", Interval(Real, 0, 1e6)),
    OptionLimit("coarsen", "--coarsen", _whole(2, 65_536), optional=True),
)}


def limit_of(name: str) -> OptionLimit:
    """The table's entry for setting ``name``."""
    return OPTION_LIMITS[name]


def allowed(name: str, value) -> bool:
    """True if ``value`` is allowed for setting ``name``."""
    return OPTION_LIMITS[name].holds(value)


def problem_with(name: str, value) -> str | None:
    """What is wrong with ``value`` for setting ``name`` in words, or None if it is allowed."""
    limit = OPTION_LIMITS[name]
    if limit.holds(value):
        return None
    given = repr(value)[:40] if not isinstance(value, str) else repr(value[:40])
    return say("limit.must_be", allowed=limit.words(), given=given)


def check_setting(name: str, value, where: str | None = None) -> None:
    """Refuse (InputError) a value of setting ``name`` outside the table's limits; ``where``
    names it as the user gave it (default: the command-line option)."""
    problem = problem_with(name, value)
    if problem is not None:
        raise InputError(say("limit.refused", where=where or OPTION_LIMITS[name].option,
                             problem=problem))


def option_type(name: str):
    """An argparse ``type`` for the command-line option of setting ``name``: the text as a
    number, refused with the table's words (argparse then adds 'see prunella fit --help')."""
    import argparse

    limit = OPTION_LIMITS[name]
    integral = limit.interval.kind is Integral

    def parse(text: str):
        try:
            value = int(text) if integral else float(text)
        except ValueError:
            value = text
        problem = problem_with(name, value)
        if problem is not None:
            raise argparse.ArgumentTypeError(problem)
        return value

    parse.__name__ = "whole number" if integral else "number"  # argparse names the type so
    return parse


def spin_range(name: str) -> tuple[float, float]:
    """The lowest and highest value the app's spin box for setting ``name`` offers."""
    interval = OPTION_LIMITS[name].interval
    return interval.low, interval.high


def check_request_limits(request) -> None:
    """Refuse a DerivationRequest any of whose numbers is outside the table, before any work."""
    tree, cv = request.tree, request.cv
    for name, value in (("min_leaf", tree.min_leaf), ("max_depth", tree.max_depth),
                        ("miss_cost", tree.miss_cost), ("seed", tree.seed),
                        ("folds", cv.folds), ("repeats", cv.repeats),
                        ("validation_share", cv.validation_share), ("seed", cv.seed),
                        ("holdout", request.holdout), ("coarsen", tree.coarsen)):
        check_setting(name, value, where=name.replace("_", " "))
    if isinstance(request.size, int) and not isinstance(request.size, bool):
        check_setting("size", request.size, where="size")
    if not isinstance(tree.priors, str):
        for value in tree.priors:
            check_setting("prior", value, where="priors")
    for row in tree.loss or ():
        for value in row:
            check_setting("cost", value, where="costs")
