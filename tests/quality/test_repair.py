"""Edit-rule repair hints: error localisation after Fellegi & Holt (1976)."""

from __future__ import annotations

from logiccheck.loader import load_text
from logiccheck.quality.repair import repair_hint

# The worked example (Fellegi, I. P. & Holt, D. (1976), "A systematic approach to
# automatic edit and imputation", JASA 71: the balance edit with non-negativity and a
# ratio edit, in the style of their illustrations): profit + cost = turnover,
# cost − 0.6·turnover ≥ 0, cost ≥ 0, profit ≥ 0.
FIRM = """survey firm "Business survey"
profit: number -100000..100000 "Profit"
cost: number -100000..100000 "Cost"
turnover: number -100000..100000 "Turnover"
check balance "Profit and cost add up to turnover" require profit + cost = turnover
check cost_share "Cost is at least 60 % of turnover" require cost - 0.6 * turnover >= 0
check cost_pos "Cost is not negative" require cost >= 0
check profit_pos "Profit is not negative" require profit >= 0
"""


def test_worked_example_has_one_minimal_repair() -> None:
    q = load_text(FIRM).questionnaire
    hint = repair_hint(q, {"profit": 755, "cost": 125, "turnover": 200})
    assert hint is not None
    assert hint.items == ["profit"]
    assert hint.alternatives == []  # exactly one minimal repair
    assert hint.values == {"profit": 75.0}  # the only value that balances
    assert hint.cost == 1


def test_weights_change_the_answer() -> None:
    q = load_text(FIRM).questionnaire
    # profit = 10, cost = 100, turnover = 100 (by hand): change profit (→ 0), cost (→ 90,
    # still ≥ 60 % of 100) or turnover (→ 110; 100 ≥ 66): three minimal repairs.
    hint = repair_hint(q, {"profit": 10, "cost": 100, "turnover": 100})
    assert hint is not None
    assert sorted([hint.items, *hint.alternatives]) == [["cost"], ["profit"], ["turnover"]]
    heavy = repair_hint(q, {"profit": 10, "cost": 100, "turnover": 100}, weights={"profit": 5, "cost": 2})
    assert heavy is not None and heavy.items == ["turnover"] and heavy.alternatives == []


def test_consistent_record_needs_nothing() -> None:
    q = load_text(FIRM).questionnaire
    assert repair_hint(q, {"profit": 40, "cost": 60, "turnover": 100}) is None


def test_rules_apply_only_where_reached() -> None:
    spec = """survey t "t"
codes yn
  yes = 1 "Yes"
  no = 2 "No"
works: single yn "Do you work?"
hours: number 0..100 "Hours" when works = yes
check hours_ok "Workers report hours" when works = yes require hours >= 1
"""
    q = load_text(spec).questionnaire
    hint = repair_hint(q, {"works": 1, "hours": 0})
    assert hint is not None
    # Saying the person does not work would also make `hours` out of path, so it costs
    # two changes (works, and blanking hours): the one minimal repair is the hours.
    assert hint.items == ["hours"] and hint.alternatives == []
    assert hint.values["hours"] >= 1


def test_routing_must_hold_too() -> None:
    spec = """survey t "t"
codes yn
  yes = 1 "Yes"
  no = 2 "No"
works: single yn "Do you work?"
hours: number 0..100 "Hours" when works = yes
"""
    q = load_text(spec).questionnaire
    # An answer where the routing does not ask: blank it (one change) or say the
    # person works (one change); no check involved, the routing alone.
    hint = repair_hint(q, {"works": 2, "hours": 20})
    assert hint is not None
    assert sorted([hint.items, *hint.alternatives]) == [["hours"], ["works"]]
    assert repair_hint(q, {"works": 2, "hours": None}) is None
