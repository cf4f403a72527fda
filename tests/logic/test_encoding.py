"""The z3 encoding follows the routing semantics (DEVELOPERS.md) on small hand-checked cases."""

from __future__ import annotations

import z3

from logiccheck.loader import load_text
from logiccheck.logic import Encoding
from logiccheck.model import nodes as n

SPEC = """survey t "t"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

nonresponse
  dk = 98 "Don't know"

used: single yesno "Used?"
trips: number 1..50 "Trips?" when used = yes
stop done "Bye" when trips > 40
why: text "Why?" when not (used = yes)
last: single yesno "Last?"
"""


def _enc() -> Encoding:
    return Encoding(load_text(SPEC, "t.qlc").questionnaire)


def _sat(enc: Encoding, *extra: z3.BoolRef) -> bool:
    s = enc.solver()
    s.add(*extra)
    return s.check() == z3.sat


def test_unanswered_gate_leaves_not_condition_unknown() -> None:
    enc = _enc()
    # Kleene: `not (used = yes)` is unknown for a blank `used`, so `why` is not asked.
    assert not _sat(enc, enc.asked("why"), z3.Not(enc.answered("used")))
    # A non-response code is a value: `used = yes` is false, so `why` is asked.
    assert _sat(enc, enc.asked("why"), enc.value("used") == 98)


def test_stop_ends_the_interview_and_answers_need_asking() -> None:
    enc = _enc()
    over = z3.And(enc.value("trips") > 40, enc.value("trips") <= 50)
    assert not _sat(enc, enc.asked("last"), enc.answered("trips"), over)
    # 98 is a non-response code: `trips > 40` is unknown for it, so the stop does not fire.
    assert _sat(enc, enc.asked("last"), enc.answered("trips"), enc.value("trips") == 98)
    assert _sat(enc, enc.asked("last"), z3.Not(enc.answered("trips")))
    assert not _sat(enc, enc.answered("trips"), z3.Not(enc.asked("trips")))


def test_readings_differ_on_blank_and_codes() -> None:
    enc = _enc()
    q = enc.q
    cond = q.symbols["why"].own
    assert isinstance(cond, n.Not)
    ours_t, ours_f = enc.truth(cond, at=q.symbols["why"].index)
    blank_t, _ = enc.truth(cond, reading="blank", at=q.symbols["why"].index)
    blank_used = z3.Not(enc.answered("used"))
    assert not _sat(enc, blank_used, z3.Or(ours_t, ours_f))  # unknown in ours
    assert not _sat(enc, blank_used, z3.Not(blank_t))  # true when a blank is "not yes"


def test_witness_uses_labels_and_blanks() -> None:
    enc = _enc()
    s = enc.solver()
    s.add(enc.asked("why"), enc.value("used") == 98)
    assert s.check() == z3.sat
    w = enc.witness(s.model(), ["why", "used", "trips"])
    assert w == {"used": "dk", "trips": "not asked", "why": w["why"]}
    assert w["why"] in ("blank", "(some text)")
