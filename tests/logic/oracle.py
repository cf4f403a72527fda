"""A brute-force reading of the routing semantics (DEVELOPERS.md), written from scratch in plain Python (no z3).

It enumerates every respondent over small domains (each item blank, or any code, value
or non-response code; a multi item blank or any non-empty set of options), walks the
questionnaire in order for each, and records what happened. It shares nothing with
`logiccheck.logic` but the parsed questionnaire it reads.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from typing import Any

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire

BLANK = None
TEXT = "some text"


@dataclass
class Walk:
    """One respondent's route."""

    answers: dict[str, Any]
    values: dict[str, Any] = field(default_factory=dict)  # name -> value, items asked and answered
    asked: set[str] = field(default_factory=set)
    reached: set[int] = field(default_factory=set)  # entry indexes
    fired: set[int] = field(default_factory=set)  # stops, skips that fired, checks that applied
    blocks: set[str] = field(default_factory=set)
    block_seen: set[str] = field(default_factory=set)  # outer conditions held, alive, not skipped
    not_own: set[int] = field(default_factory=set)  # reached, own condition not true
    holds: dict[tuple[str, str], bool] = field(default_factory=dict)  # (statement key, reading) -> true


class Oracle:
    def __init__(self, q: Questionnaire) -> None:
        self.q = q
        self.nr = {o.value for o in q.nonresponse}
        self.nr_labels = {o.label for o in q.nonresponse}
        self.items = [e for e in q.entries if e.kind in ("item", "sample")]

    # ---------------------------------------------------------------- domains
    def domain(self, entry) -> list[Any]:  # type: ignore[no-untyped-def]
        stmt = entry.stmt
        kind = stmt.type.kind
        if entry.kind == "sample":  # known before the interview: never blank
            return sorted(o.value for o in self.q.item_codes(stmt).options)
        nr = sorted(self.nr) if kind in ("single", "number", "decimal") and not stmt.flags.strict else []
        if kind == "note":
            return [BLANK]
        if kind == "text":
            return [BLANK, TEXT]
        if kind == "single":
            codes = self.q.item_codes(stmt)
            return [BLANK, *sorted({o.value for o in codes.options} | set(nr))]
        if kind == "number":
            lo, hi = int(stmt.type.lo), int(stmt.type.hi)
            return [BLANK, *sorted(set(range(lo, hi + 1)) | set(nr))]
        if kind == "multi":
            values = [o.value for o in self.q.item_codes(stmt).options]
            subsets = [frozenset(c) for r in range(1, len(values) + 1) for c in itertools.combinations(values, r)]
            return [BLANK, *subsets]
        raise ValueError(kind)

    def respondents(self):  # type: ignore[no-untyped-def]
        names = [e.name for e in self.items]
        for combo in itertools.product(*[self.domain(e) for e in self.items]):
            yield dict(zip(names, combo, strict=True))

    def size(self) -> int:
        total = 1
        for e in self.items:
            total *= len(self.domain(e))
        return total

    # ---------------------------------------------------------------- the walk
    def walk(self, answers: dict[str, Any]) -> Walk | None:
        """The route of one respondent; None if the answers break `required`."""
        q = self.q
        w = Walk(answers)
        for e in self.items:
            if e.kind == "sample":
                w.values[e.name] = answers[e.name]
        stopped = False
        skips: list[tuple[int, int]] = []  # (from, to) of fired skips
        lets: dict[str, int] = {}
        block_done: set[str] = set()

        def spanned(i: int) -> bool:
            return any(a < i < b for a, b in skips)

        for entry in q.entries:
            i = entry.index
            ctx = Ctx(self, w, i, lets)
            # Blocks starting here.
            for owner, _ in entry.context:
                name = owner.name
                if name in block_done or q.section_start.get(name) != i:
                    continue
                block_done.add(name)
                chain = []
                for o, e in entry.context:
                    chain.append((o, e))
                    if o is owner:
                        break
                outer_ok = all(
                    e is None or Ctx(self, w, q.section_start[o.name], lets).truth(e, "ours") is True
                    for o, e in chain[:-1]
                )
                if outer_ok and not stopped and not spanned(i):
                    w.block_seen.add(name)
                    own = chain[-1][1]
                    if own is None or ctx.truth(own, "ours") is True:
                        w.blocks.add(name)
                    if own is not None:
                        for reading in ("ours", "blank", "code"):
                            w.holds[(f"block:{name}", reading)] = ctx.truth(own, reading) is True
            if entry.kind == "let":
                lets[entry.name] = i
                continue
            if entry.kind == "sample":
                continue
            context_ok = all(
                e is None or Ctx(self, w, q.section_start.get(o.name, i), lets).truth(e, "ours") is True
                for o, e in entry.context
            )
            reached = context_ok and not stopped and not spanned(i)
            own_true = entry.own is None or ctx.truth(entry.own, "ours") is True
            if reached:
                w.reached.add(i)
                if entry.own is not None:
                    for reading in ("ours", "blank", "code"):
                        w.holds[(f"entry:{i}", reading)] = ctx.truth(entry.own, reading) is True
                if not own_true:
                    w.not_own.add(i)
            if entry.kind == "item":
                if reached and own_true:
                    w.asked.add(entry.name)
                    value = answers[entry.name]
                    if value is BLANK and entry.stmt.flags.required and entry.stmt.type.kind != "note":
                        return None
                    if value is not BLANK:
                        w.values[entry.name] = value
            elif entry.kind == "stop":
                if reached and own_true:
                    w.fired.add(i)
                    stopped = True
            elif entry.kind == "skip":
                if reached and own_true and entry.skip_target is not None:
                    w.fired.add(i)
                    skips.append((i, entry.skip_target))
            elif entry.kind == "check":
                if reached and own_true:
                    w.fired.add(i)
                    if entry.require is not None:
                        for reading in ("ours", "blank", "code"):
                            w.holds[(f"require:{i}", reading)] = ctx.truth(entry.require, reading) is True
        return w

    def walks(self) -> list[Walk]:
        out = []
        for answers in self.respondents():
            w = self.walk(answers)
            if w is not None:
                out.append(w)
        return out


class Ctx:
    """Evaluation of expressions at statement position `at` for one respondent."""

    def __init__(self, oracle: Oracle, w: Walk, at: int, lets: dict[str, int]) -> None:
        self.o = oracle
        self.w = w
        self.at = at
        self.lets = lets

    def _entry(self, name: str):  # type: ignore[no-untyped-def]
        return self.o.q.symbols[name]

    def visible(self, name: str) -> bool:
        e = self._entry(name)
        return e.kind == "sample" or e.index < self.at

    # numbers: (value, is non-response) or None
    def num(self, expr: Any, reading: str) -> tuple[float, bool] | None:
        if isinstance(expr, n.Num):
            return (expr.value, False)
        if isinstance(expr, n.Code):
            return (expr.value, expr.label in self.o.nr_labels)
        if isinstance(expr, n.Ref):
            if not self.visible(expr.name):
                return None
            e = self._entry(expr.name)
            if e.kind == "let":
                return Ctx(self.o, self.w, e.index, self.lets).num(e.own, reading)
            if expr.name not in self.w.values:
                return None
            v = self.w.values[expr.name]
            allows = e.kind == "item" and e.stmt.type.kind in ("single", "number", "decimal") \
                and not e.stmt.flags.strict
            return (v, allows and v in self.o.nr)
        if isinstance(expr, n.Func) and expr.func == "count":
            if not self.visible(expr.name) or expr.name not in self.w.values:
                return None
            return (len(self.w.values[expr.name]), False)
        if isinstance(expr, n.Neg):
            v = self.num(expr.operand, reading)
            if v is None or (v[1] and reading != "code"):
                return None
            return (-v[0], False)
        if isinstance(expr, n.Arith):
            a, b = self.num(expr.left, reading), self.num(expr.right, reading)
            if a is None or b is None:
                return None
            if reading != "code" and (a[1] or b[1]):
                return None
            if expr.op == "+":
                return (a[0] + b[0], False)
            if expr.op == "-":
                return (a[0] - b[0], False)
            if expr.op == "*":
                return (a[0] * b[0], False)
            if b[0] == 0:
                return None
            return (a[0] / b[0], False)
        raise ValueError(expr)

    def _cmp(self, result: bool | None, reading: str, op: str = "") -> bool | None:
        """A comparison's outcome; in the blank reading a missing value compares false
        (except `!=`, true)."""
        if result is None and reading == "blank":
            return op == "!="
        return result

    def truth(self, expr: Any, reading: str) -> bool | None:
        if isinstance(expr, n.Not):
            v = self.truth(expr.operand, reading)
            return None if v is None else not v
        if isinstance(expr, n.And):
            vals = [self.truth(o, reading) for o in expr.operands]
            if any(v is False for v in vals):
                return False
            return True if all(v is True for v in vals) else None
        if isinstance(expr, n.Or):
            vals = [self.truth(o, reading) for o in expr.operands]
            if any(v is True for v in vals):
                return True
            return False if all(v is False for v in vals) else None
        if isinstance(expr, n.Ref):
            if not self.visible(expr.name):
                return self._cmp(None, reading)
            e = self._entry(expr.name)
            return Ctx(self.o, self.w, e.index, self.lets).truth(e.own, reading)
        if isinstance(expr, n.Func):
            if not self.visible(expr.name):
                return False
            if expr.func == "answered":
                return expr.name in self.w.values
            return expr.name in self.w.asked
        if isinstance(expr, n.Compare):
            a, b = self.num(expr.left, reading), self.num(expr.right, reading)
            if a is None or b is None:
                return self._cmp(None, reading, expr.op)
            if expr.op in ("=", "!="):
                eq = a[0] == b[0]
                return eq if expr.op == "=" else not eq
            if reading != "code" and (a[1] or b[1]):
                return self._cmp(None, reading, expr.op)
            x, y = a[0], b[0]
            return {"<": x < y, "<=": x <= y, ">": x > y, ">=": x >= y}[expr.op]
        if isinstance(expr, n.InList):
            return self.truth(n.Or(span=expr.span, operands=[
                n.Compare(span=expr.span, op="=", left=expr.subject, right=v) for v in expr.values
            ]), reading)
        if isinstance(expr, n.InRange):
            a = self.num(expr.subject, reading)
            if a is None or (a[1] and reading != "code"):
                return self._cmp(None, reading)
            return expr.lo <= a[0] <= expr.hi
        if isinstance(expr, n.Has):
            name = expr.subject.name
            if not self.visible(name) or name not in self.w.values:
                return self._cmp(None, reading)
            chosen = self.w.values[name]
            wanted = [v.value for v in expr.values]
            if expr.mode == "all":
                return all(v in chosen for v in wanted)
            return any(v in chosen for v in wanted)
        raise ValueError(expr)
