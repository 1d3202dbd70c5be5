"""The goal in clinical words, from cross-validated counts (issue 13, item 4)."""

from core.sizing.goal_words import counts_in_words, group_name


def test_words_use_the_outcomes_own_levels_and_round_per_100():
    text = counts_in_words(190, 200, 320, 800, "admitted", "yes", "no")
    assert text == ("Under cross-validation the tree catches about 95 of every 100 admitted "
                    "patients and sends about 40 of every 100 not admitted for the test.")
    assert text.code == "goal.in_words"
    assert group_name("discharge", "ward") == "discharge ward"
    assert "about 0 of every 100" in counts_in_words(0, 0, 0, 5, "died", "yes", "no")
