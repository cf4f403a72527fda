"""Edit-rule repair hints: the fewest (weighted) items whose values could change so that
every `check` rule and the routing hold — the error-localisation principle of Fellegi &
Holt (1976) — solved exactly with z3's optimiser over the questionnaire's logic encoding.

Every item keeps its recorded state unless it is in the change set. A changed item that
had a value gets any value of its domain where the routing asks it and becomes blank
where the routing no longer does (blanking an asked answer is not a repair: a blank only
makes a rule unknown); a changed blank is filled. Every statement the encoding reads
applies: domains, `required`, answered-only-if-asked, and no `check` fails.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import z3

from logiccheck.logic.encoding import Encoding
from logiccheck.model.questionnaire import Questionnaire


@dataclass
class RepairHint:
    items: list[str]  # a minimal set of items to change
    cost: float
    values: dict[str, float | None]  # one consistent assignment for them (None: blank)
    alternatives: list[list[str]] = field(default_factory=list)  # every other set of the same cost
    skipped_rules: list[str] = field(default_factory=list)  # checks the encoding could not read


def _number(v: Any) -> float | None:
    if v is None:
        return None
    if isinstance(v, (int, float)):
        return None if isinstance(v, float) and math.isnan(v) else float(v)
    text = str(v).strip()
    if not text:
        return None
    try:
        return float(text)
    except ValueError:
        return math.nan  # recorded, but not a number: it must change


def _const(x: float) -> z3.ArithRef:
    return z3.IntVal(int(x)) if float(x).is_integer() else z3.RealVal(repr(float(x)))


def _float(v: z3.ExprRef) -> float:
    if z3.is_int_value(v):
        return float(v.as_long())
    return float(v.as_fraction())


class Repairer:
    """Built once per questionnaire; `hint(record)` per respondent."""

    def __init__(self, q: Questionnaire, weights: Mapping[str, float] | None = None, timeout_ms: int = 10_000) -> None:
        self.q = q
        self.enc = Encoding(q)
        self.weights = dict(weights or {})
        self.timeout_ms = timeout_ms
        self.checks = [e for e in q.entries if e.kind == "check" and e.require is not None]
        self.skipped = [e.name for e in self.checks if e.index in self.enc.unencodable]
        self.names = [e.name for e in q.entries if e.kind in ("item", "sample") and e.stmt.type.kind != "note"]

    def _state(self, name: str, record: Mapping[str, Any]) -> tuple[z3.BoolRef, bool]:
        """The constraint 'this item is as recorded', and whether it has a value."""
        entry = self.q.symbols[name]
        kind = entry.stmt.type.kind
        enc = self.enc
        if kind == "multi":
            opts = enc._options.get(name, {})
            cells = {code: _number(record.get(f"{name}_{code}")) for code in opts}
            chosen = {code for code, v in cells.items() if v == 1}
            bad = any(v is not None and v not in (0, 1) for v in cells.values())
            has = bool(chosen) or bad
            if bad:
                return z3.BoolVal(False), True
            fixed = [opt == (code in chosen) for code, opt in opts.items()]
            return (z3.And(enc.answered(name), *fixed) if has else z3.Not(enc.answered(name))), has
        if kind == "text":
            raw = record.get(name)
            has = raw is not None and str(raw).strip() != "" and not (isinstance(raw, float) and math.isnan(raw))
            return (enc.answered(name) if has else z3.Not(enc.answered(name))), has
        v = _number(record.get(name))
        if v is None:
            return z3.Not(enc.answered(name)), False
        if math.isnan(v):
            return z3.BoolVal(False), True
        return z3.And(enc.answered(name), enc.value(name) == _const(v)), True

    def hint(self, record: Mapping[str, Any], max_alternatives: int = 10) -> RepairHint | None:
        """The cheapest change set, or None when the record already satisfies every rule
        and the routing (or nothing can be found in time)."""
        enc = self.enc
        changed = {name: z3.Bool(f"changed:{name}") for name in self.names}
        base: list[z3.BoolRef] = [*enc.facts(), *[z3.Not(enc.fails(e)) for e in self.checks]]
        states = []
        for name in self.names:
            same, has = self._state(name, record)
            states.append(z3.Implies(z3.Not(changed[name]), same))
            if self.q.symbols[name].kind == "item":
                # A changed answer stays an answer wherever the routing asks the item.
                follow = enc.answered(name) == enc.asked(name) if has else enc.answered(name)
                states.append(z3.Implies(changed[name], follow))
        probe = z3.Solver()
        probe.set("timeout", self.timeout_ms)
        probe.add(*base, *states, *[z3.Not(c) for c in changed.values()])
        if probe.check() == z3.sat:
            return None
        cost = z3.Sum([z3.If(c, _const(float(self.weights.get(n, 1.0))), _const(0)) for n, c in changed.items()])
        found: list[tuple[list[str], float, dict[str, float | None]]] = []
        blocks: list[z3.BoolRef] = []
        best: float | None = None
        while len(found) <= max_alternatives:
            opt = z3.Optimize()
            opt.set("timeout", self.timeout_ms)
            opt.add(*base, *states, *blocks)
            if best is not None:
                opt.add(cost <= _const(best))
            opt.minimize(cost)
            if opt.check() != z3.sat:
                break
            model = opt.model()
            chosen = sorted(n for n, c in changed.items() if z3.is_true(model.eval(c, model_completion=True)))
            value = _float(model.eval(cost, model_completion=True))
            if best is None:
                best = value
            elif value > best:
                break
            found.append((chosen, value, {n: self._value(model, n) for n in chosen}))
            # Block this set and its supersets: only other minimal sets remain.
            blocks.append(z3.Not(z3.And([changed[c] for c in chosen])) if chosen else z3.BoolVal(False))
        if not found:
            return None
        items, value, values = found[0]
        return RepairHint(items, value, values, [f[0] for f in found[1:]], list(self.skipped))

    def _value(self, model: z3.ModelRef, name: str) -> float | None:
        if not z3.is_true(model.eval(self.enc.answered(name), model_completion=True)):
            return None
        if name in self.enc._values:
            return _float(model.eval(self.enc.value(name), model_completion=True))
        return math.nan  # a set or a text: changed, no single number to show


def repair_hint(
    q: Questionnaire,
    record: Mapping[str, Any],
    weights: Mapping[str, float] | None = None,
    max_alternatives: int = 10,
    timeout_ms: int = 10_000,
) -> RepairHint | None:
    """One-off form of `Repairer(q, weights).hint(record)`; `record` maps export columns
    (default layout) to cells."""
    return Repairer(q, weights, timeout_ms).hint(record, max_alternatives)
