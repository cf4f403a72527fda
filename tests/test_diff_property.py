"""Property: on random condition pairs, the solver's verdict matches exhaustive routing."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.diff import diff_questionnaires
from tests.diff_oracle import Router, parse_witness
from tests.test_diff import _brute

ATOMS = [
    "a = yes", "a != no", "a = dk", "a in (yes, dk)", "b = yes", "b != yes", "answered(b)",
    "n >= 2", "n < 4", "n = 3", "n in 1..3", "n != 0", "answered(n)",
]


def _cond(depth: int) -> st.SearchStrategy[str]:
    atom = st.sampled_from(ATOMS)
    if depth == 0:
        return atom
    sub = _cond(depth - 1)
    return st.one_of(
        atom,
        sub.map(lambda x: f"not ({x})"),
        st.tuples(sub, sub).map(lambda p: f"({p[0]}) and ({p[1]})"),
        st.tuples(sub, sub).map(lambda p: f"({p[0]}) or ({p[1]})"),
    )


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_cond(2), _cond(2))
def test_verdict_matches_exhaustive_routing(old_cond: str, new_cond: str) -> None:
    same, (old, new) = _brute(old_cond, new_cond)
    result = diff_questionnaires(old, new)
    routing = [c for c in result.changes if c.kind == "routing-changed"]
    assert (routing == []) == same, (old_cond, new_cond)
    for change in routing:
        a = Router(old, parse_witness(old, change.witness)).asked["z"]
        b = Router(new, parse_witness(new, change.witness)).asked["z"]
        assert a != b and a == (change.asked_in == "old")
