"""Messages of the table of limits for numeric settings (core/option_limits.py)."""

ENTRIES = [
    ("limit.refused", "refused", "{where}: {problem}; choose a value inside these limits.",
     "Every number a setting takes has limits far above sensible use; choose one inside them."),
    ("limit.must_be", "part", "must be {allowed}, not {given}", ""),
    ("limit.whole_from_to", "part", "a whole number from {low} to {high}", ""),
    ("limit.number_from_to", "part", "a number from {low} to {high}", ""),
    ("limit.number_from_below", "part", "a number from {low} up to (not including) {high}", ""),
    ("limit.number_above_to", "part", "a number above {low} and at most {high}", ""),
    ("limit.number_between", "part", "a number between {low} and {high} (not either)", ""),
    ("limit.or_every_core", "part", "-1 (every core) or {allowed}", ""),
]
