"""Outcome rates against hand-computed values.

Formulas: AAPOR Standard Definitions (Final Dispositions of Case Codes and Outcome
Rates for Surveys), recalled from memory; every expected value below is computed by
hand from those formulas, as fractions.
"""

from __future__ import annotations

from fractions import Fraction as F

import pytest

from logiccheck.quality.rates import OutcomeCounts, RatesError, dispositions_to_counts, outcome_rates

WORKED = OutcomeCounts(I=5, P=3, R=2, NC=1, O=2, UH=1, UO=1)


def test_worked_example_of_the_issue() -> None:
    # AAPOR Standard Definitions, hand-computed: the issue's worked example with e = 0.5.
    r = outcome_rates(WORKED, e=0.5)
    assert r["RR1"] == pytest.approx(float(F(1, 3)))
    assert r["RR3"] == pytest.approx(float(F(5, 14)))
    assert r["COOP1"] == pytest.approx(float(F(5, 12)))
    assert r["CON1"] == pytest.approx(float(F(4, 5)))


def test_every_rate_by_hand() -> None:
    # AAPOR Standard Definitions (from memory), computed by hand:
    # I+P = 8, R+NC+O = 5, UH+UO = 2, e = 0.5 → e(UH+UO) = 1.
    r = outcome_rates(WORKED, e=0.5)
    expected = {
        "RR2": F(8, 15), "RR4": F(8, 14), "RR5": F(5, 13), "RR6": F(8, 13),
        "COOP2": F(8, 12), "COOP3": F(5, 10), "COOP4": F(8, 10),
        "REF1": F(2, 15), "REF2": F(2, 14), "REF3": F(2, 13),
        "CON2": F(12, 14), "CON3": F(12, 13),
    }
    for name, value in expected.items():
        assert r[name] == pytest.approx(float(value)), name


def test_e_estimated_from_known_eligibility() -> None:
    # e = (I+P+R+NC+O)/(I+P+R+NC+O+NE) = 13/(13+7) = 0.65 (AAPOR Standard Definitions, from memory)
    c = OutcomeCounts(I=5, P=3, R=2, NC=1, O=2, UH=4, UO=0, NE=7)
    r = outcome_rates(c)
    assert r["e"] == pytest.approx(0.65)
    # RR3 = 5 / (13 + 0.65·4) = 5 / 15.6
    assert r["RR3"] == pytest.approx(5 / 15.6)
    # RR1 ignores e: 5 / 17
    assert r["RR1"] == pytest.approx(5 / 17)


def test_rates_are_ordered_as_the_definitions_imply() -> None:
    # RR1 ≤ RR3 ≤ RR5 and RR1 ≤ RR2 for any counts (denominators shrink, numerators grow).
    r = outcome_rates(OutcomeCounts(I=40, P=10, R=20, NC=15, O=5, UH=30, UO=10, NE=12))
    assert r["RR1"] <= r["RR3"] <= r["RR5"]
    assert r["RR1"] <= r["RR2"] and r["COOP1"] <= r["COOP2"]


def test_words_and_errors() -> None:
    c = OutcomeCounts.from_outcomes(["complete", "Partial", "break-off", "NC", "screen_out"])
    assert c.as_dict() == {"I": 1, "P": 1, "R": 1, "NC": 1, "O": 0, "UH": 0, "UO": 0, "NE": 1}
    with pytest.raises(RatesError, match="case 2: unknown outcome 'maybe'"):
        OutcomeCounts.from_outcomes(["I", "maybe"])
    with pytest.raises(RatesError, match="e must be between"):
        outcome_rates(WORKED, e=1.5)
    assert outcome_rates(OutcomeCounts())["RR1"] is None


def test_dispositions_map_stops_to_not_eligible() -> None:
    c = dispositions_to_counts({"complete": 5, "partial": 3, "break-off": 2, "underage": 4}, stops=["underage"])
    assert c.as_dict()["NE"] == 4 and c.R == 2
