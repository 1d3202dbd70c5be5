"""What a goal or cost means on the cohort, in clinical words, from cross-validated counts
("catches about 95 of every 100 admitted patients; sends about 40 of every 100 not admitted
for the test"). The app's step 2 shows the sentence; it is worded here, not in the gui."""

from __future__ import annotations

from ..messages.message import say

YES = {"yes", "y", "true", "1", "positive", "present"}
NO = {"no", "n", "false", "0", "negative", "absent"}


def group_name(outcome: str, level: str) -> str:
    """Patients of one outcome level in words: 'admitted' for yes, 'not admitted' for no,
    else 'admitted = ward' (the level's own name)."""
    word = str(level).strip().lower()
    if word in YES:
        return outcome
    if word in NO:
        return f"not {outcome}"
    return f"{outcome} {level}"


def counts_in_words(caught: int, positives: int, alarmed: int, negatives: int,
                    outcome: str, positive: str, negative: str) -> str:
    """The sentence for cross-validated counts: of ``positives`` patients with the outcome
    ``caught`` were called positive; of ``negatives`` without it ``alarmed`` were."""
    per_100 = (lambda k, n: round(100 * k / n) if n else 0)
    return say("goal.in_words", caught=per_100(caught, positives),
               positive=group_name(outcome, positive), alarmed=per_100(alarmed, negatives),
               negative=group_name(outcome, negative))
