"""The catalogue: every message worded once, one module per step of the work.

Each entry is (code, severity, template, advice). Severity: "refused" — the step stops and
nothing is computed; "warning" — the step went on, but look at this before trusting the
result; "note" — recorded so nothing happens silently; "part" — a piece that fills a field of
another message's template (worded here so it is worded once; not a message of its own). A
template's {rows} is a row list such as " (rows 4, 9 and 22)", or empty; {where} names the
file (and sheet). Code families name the step: read, xlsx, values, infer, dictionary,
variables, design, guard, grow, folds, size, holdout, check, nested, stability, chart, file,
project, model, cli, limit, work, app (the desktop app's own).
"""

from . import (app, chart, checking, command_line, design, dictionary, files, limits, reading,
               sizing, work)

ENTRIES = (reading.ENTRIES + dictionary.ENTRIES + design.ENTRIES + sizing.ENTRIES
           + limits.ENTRIES + checking.ENTRIES + files.ENTRIES + chart.ENTRIES + command_line.ENTRIES
           + app.ENTRIES + work.ENTRIES)
