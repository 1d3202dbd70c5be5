"""The goal in clinical words, from cross-validated counts (issue 13, item 4)."""

from core.sizing.goal_words import counts_in_words, group_name


def test_words_use_the_outcomes_own_levels_and_round_per_100():
    text = counts_in_words(190, 200, 320, 800, "admitted", "yes", "no")
    assert text == ("Under cross-validation the tree catches about 95 of every 100 admitted "
                    "patients and sends about 40 of every 100 not admitted for the test.")
    assert text.code == "goal.in_words"
    assert group_name("discharge", "ward") == "patients with “ward”"
    assert group_name("discharge", "ward", "visits", noun=False) == "with “ward”"
    assert "about 0 of every 100" in counts_in_words(0, 0, 0, 5, "died", "yes", "no")
    # An outcome named as an event, not as what patients are: never "not PICU transfer".
    event = counts_in_words(90, 100, 88, 100, "PICU transfer", "yes", "no", aim="cost",
                            unit="visits")
    assert "of every 100 visits with PICU transfer" in event
    assert "of every 100 without PICU transfer." in event and "not PICU" not in event


def test_rule_in_and_cost_sentences_name_the_levels_and_count_visits():
    rule_in = counts_in_words(60, 100, 30, 1000, "Fall in 30 days", "fell", "no fall",
                              aim="specificity", unit="visits")
    assert rule_in == ("Under cross-validation the tree keeps about 97 of every 100 visits "
                       "with “no fall” from the test (it sends about 3 needlessly) and sends "
                       "about 60 of every 100 with “fell” for it.")
    assert rule_in.code == "goal.in_words_rule_in"
    cost = counts_in_words(70, 100, 150, 1000, "admitted", "yes", "no", aim="cost",
                           miss_cost=4.0)
    assert cost == ("With missing a positive counted 4 times as bad as a needless alarm, under "
                    "cross-validation the tree catches about 70 of every 100 admitted patients "
                    "(it misses about 30) and raises a needless alarm for about 15 of every 100 "
                    "not admitted.")
    alike = counts_in_words(70, 100, 150, 1000, "admitted", "yes", "no", aim="cost")
    assert alike.startswith("With missing a positive counted as bad as a needless alarm,")


def test_chosen_in_words_reads_the_chosen_sizes_pooled_cv_counts():
    from core.design import default_design
    from core.sizing import DerivationRequest, derive
    from core.sizing.goal import Goal
    from core.sizing.goal_words import chosen_in_words, size_index
    from tests.helpers import demo_inputs

    table, dictionary, predictors = demo_inputs()
    design = default_design(dictionary, predictors=predictors)
    request = DerivationRequest(design=design, goal=Goal("sensitivity", 0.9), size="goal")
    derivation = derive(table, dictionary, request)
    path = derivation.path
    k = size_index(path, derivation.model.chosen["leaves"])
    c = path.counts.confusion[k]
    text = chosen_in_words(derivation)
    assert text.code == "goal.in_words"
    assert f"catches about {round(100 * c[1, 1] / c[1].sum())} of every 100" in text
    assert round(100 * c[1, 1] / c[1].sum()) >= 90
