"""Reports of zoo.core.report that the faces print as they are: the exploration alarm."""

from __future__ import annotations

from zoo.core.params import ParameterSet
from zoo.core.report import exploration_disagreement, exploration_report


def test_exploration_alarm_only_when_search_and_formulas_differ() -> None:
    # docs/theory/check-values.md: C(4,2,2,3) has 40 states and 64 arcs, found by the search too.
    report = exploration_report(ParameterSet(4, 2, 2, 3))
    assert (report["states"], report["arcs"]) == (40, 64)
    assert exploration_disagreement(report) == ""
    wrong = {**report, "states": 41, "states_agree": False}
    assert exploration_disagreement(wrong) == (
        "the explicit search of C(4,2,2,3) disagrees with the closed formulas (states 41 vs 40, "
        "arcs 64 vs 64); this is a bug in zoo, please report it with this command line"
    )
