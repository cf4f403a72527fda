"""Edit-rule repair hints: the fewest (weighted) items whose values could change so that
every `check` rule holds — the error-localisation principle of Fellegi & Holt (1976) —
solved exactly with z3's optimiser.

Each item a rule reads is a solver variable within its declared domain; an unchanged
item keeps its recorded value; the objective is the total weight of changed items. A
rule applies as it does in the data (its section/grid conditions and `when`), so a
change may also make a rule stop applying.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import z3

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


class Untranslatable(Exception):
    """An expression this encoding does not cover (sets, text)."""


@dataclass
class RepairHint:
    items: list[str]  # a minimal set of items to change
    cost: float
    values: dict[str, float]  # one assignment of new values that satisfies every rule
    alternatives: list[list[str]] = field(default_factory=list)  # every other set of the same cost
    skipped_rules: list[str] = field(default_factory=list)  # rules the encoding could not read


def _is_blank(v: Any) -> bool:
    return v is None or (isinstance(v, float) and v != v)


class _Encoder:
    def __init__(self, q: Questionnaire, record: Mapping[str, Any]) -> None:
        self.q = q
        self.record = record
        self.vars: dict[str, z3.ArithRef] = {}
        self.domain: list[z3.BoolRef] = []
        self.nr = {o.value for o in q.nonresponse}

    def var(self, name: str) -> z3.ArithRef:
        if name in self.vars:
            return self.vars[name]
        entry = self.q.symbols.get(name)
        if entry is None or entry.kind not in ("item", "sample"):
            raise Untranslatable(name)
        t = entry.stmt.type
        value = self.record.get(name)
        if t.kind in ("multi", "text", "note") or _is_blank(value):
            # Blank: a rule reading it is unknown, not failed; not repaired through.
            raise Untranslatable(name)
        if float(value) in self.nr:
            raise Untranslatable(name)
        # Reals throughout (mixed int/real terms confuse the optimiser); integer items
        # are constrained to integers.
        v = z3.Real(name)
        if t.kind != "decimal":
            self.domain.append(z3.IsInt(v))
        if t.kind == "single" or entry.kind == "sample":
            codes = self.q.item_codes(entry.stmt)
            self.domain.append(z3.Or([v == o.value for o in (codes.options if codes else [])]))
        else:
            if t.lo is not None:
                self.domain.append(v >= _const(t.lo))
            if t.hi is not None:
                self.domain.append(v <= _const(t.hi))
        self.vars[name] = v
        return v

    def num(self, expr: Any) -> z3.ArithRef:
        if isinstance(expr, n.Num):
            return _const(expr.value)
        if isinstance(expr, n.Code):
            return _const(expr.value)
        if isinstance(expr, n.Ref):
            entry = self.q.symbols.get(expr.name)
            if entry is not None and entry.kind == "let" and entry.own is not None:
                return self.num(entry.own)
            return self.var(expr.name)
        if isinstance(expr, n.Neg):
            return -self.num(expr.operand)
        if isinstance(expr, n.Arith):
            a, b = self.num(expr.left), self.num(expr.right)
            return {"+": a + b, "-": a - b, "*": a * b, "/": a / b}[expr.op]
        raise Untranslatable(type(expr).__name__)

    def cond(self, expr: Any) -> z3.BoolRef:
        if isinstance(expr, n.Not):
            return z3.Not(self.cond(expr.operand))
        if isinstance(expr, n.And):
            return z3.And([self.cond(o) for o in expr.operands])
        if isinstance(expr, n.Or):
            return z3.Or([self.cond(o) for o in expr.operands])
        if isinstance(expr, n.Compare):
            a, b = self.num(expr.left), self.num(expr.right)
            return {"=": a == b, "!=": a != b, "<": a < b, "<=": a <= b, ">": a > b, ">=": a >= b}[expr.op]
        if isinstance(expr, n.InList):
            a = self.num(expr.subject)
            return z3.Or([a == self.num(v) for v in expr.values])
        if isinstance(expr, n.InRange):
            a = self.num(expr.subject)
            return z3.And(a >= _const(expr.lo), a <= _const(expr.hi))
        if isinstance(expr, n.Func) and expr.func == "answered":
            return z3.BoolVal(not _is_blank(self.record.get(expr.name)))
        if isinstance(expr, n.Ref):
            entry = self.q.symbols.get(expr.name)
            if entry is not None and entry.kind == "let" and entry.own is not None:
                return self.cond(entry.own)
        raise Untranslatable(type(expr).__name__)


def _const(x: float) -> z3.ArithRef:
    return z3.RealVal(str(int(x)) if float(x).is_integer() else repr(float(x)))


def _float(v: z3.ExprRef) -> float:
    if z3.is_int_value(v):
        return float(v.as_long())
    return float(v.as_fraction())


def _rule(enc: _Encoder, entry: Entry) -> z3.BoolRef:
    applies = [enc.cond(c) for c in entry.conditions()]
    require = enc.cond(entry.require)
    return z3.Implies(z3.And(applies), require) if applies else require


def repair_hint(
    q: Questionnaire,
    record: Mapping[str, Any],
    weights: Mapping[str, float] | None = None,
    max_alternatives: int = 10,
    timeout_ms: int = 10_000,
) -> RepairHint | None:
    """The cheapest set of items to change so every check holds; None when the record
    already satisfies every rule the encoding reads, or no change can."""
    weights = weights or {}
    enc = _Encoder(q, record)
    rules: list[z3.BoolRef] = []
    skipped: list[str] = []
    for entry in q.entries:
        if entry.kind != "check" or entry.require is None:
            continue
        try:
            rules.append(_rule(enc, entry))
        except Untranslatable:
            skipped.append(entry.name)
    if not enc.vars:
        return None
    changed = {name: z3.Bool(f"changed__{name}") for name in enc.vars}
    keep = []
    for name, v in enc.vars.items():
        keep.append(z3.Implies(z3.Not(changed[name]), v == _const(float(record[name]))))
    # Already consistent?
    probe = z3.Solver()
    probe.add(*rules, *[v == _const(float(record[name])) for name, v in enc.vars.items()])
    if probe.check() == z3.sat:
        return None
    cost_terms = [z3.If(c, _const(float(weights.get(name, 1.0))), _const(0)) for name, c in changed.items()]
    cost = z3.Sum(cost_terms)
    found: list[tuple[list[str], float, dict[str, float]]] = []
    blocks: list[z3.BoolRef] = []
    best: float | None = None
    while len(found) <= max_alternatives:
        opt = z3.Optimize()
        opt.set("timeout", timeout_ms)
        opt.add(*enc.domain, *keep, *rules, *blocks)
        if best is not None:
            opt.add(cost <= _const(best))
        opt.minimize(cost)
        if opt.check() != z3.sat:
            break
        model = opt.model()
        chosen = sorted(name for name, c in changed.items() if z3.is_true(model.eval(c, model_completion=True)))
        value = _float(model.eval(cost, model_completion=True))
        if best is None:
            best = value
        elif value > best:
            break
        new_values = {name: _float(model.eval(enc.vars[name], model_completion=True)) for name in chosen}
        found.append((chosen, value, new_values))
        # Block this set and every superset: only other minimal sets remain.
        blocks.append(z3.Not(z3.And([changed[c] for c in chosen])) if chosen else z3.BoolVal(False))
    if not found:
        return None
    items, value, new_values = found[0]
    return RepairHint(items, value, new_values, [f[0] for f in found[1:]], skipped)
