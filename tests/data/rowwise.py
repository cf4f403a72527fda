"""Oracle: a plain row-by-row interpreter of the routing semantics (DEVELOPERS.md) (and the semantics decisions in
DEVELOPERS.md), written without numpy or pyarrow. It reads the CSV with the standard
library's csv module and judges every cell by itself, so it shares nothing with the
vectorised evaluator but the resolved questionnaire."""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, field
from typing import Any

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire


@dataclass
class RowState:
    due: dict[str, bool] = field(default_factory=dict)
    present: dict[str, bool] = field(default_factory=dict)
    valid: dict[str, bool] = field(default_factory=dict)
    stop: str = ""
    failed: list[str] = field(default_factory=list)


class Num:
    """A value: raw for equality, num for ordering (None = no value / unknown)."""

    def __init__(self, raw: float | None, num: float | None) -> None:
        self.raw, self.num = raw, num


def _float(text: str) -> float | None:
    try:
        v = float(text)
    except ValueError:
        return None
    return None if math.isnan(v) or math.isinf(v) else v


class RowInterpreter:
    def __init__(self, q: Questionnaire) -> None:
        self.q = q
        self.nr = {o.value for o in q.nonresponse}
        self.nr_labels = {o.label for o in q.nonresponse}

    # ---------------------------------------------------------------- cells
    def parse(self, entry: Any, row: dict[str, str]) -> tuple[bool, bool, Any]:
        """(present, valid, value) for one item or sample variable."""
        q, stmt = self.q, entry.stmt
        kind = stmt.type.kind
        codes = q.item_codes(stmt)
        allows_nr = q.allows_nonresponse(stmt)
        if kind == "note":
            return False, False, None
        if kind == "multi":
            chosen, bad = set(), False
            for o in codes.options:
                text = (row.get(f"{stmt.name}_{o.value}") or "").strip()
                if text == "":
                    continue
                v = _float(text)
                if v == 1:
                    chosen.add(o.value)
                elif v != 0:
                    bad = True
            present = bool(chosen) or bad
            return present, present and not bad, frozenset(chosen)
        text = (row.get(stmt.name) or "").strip()
        if text == "":
            return False, False, None
        if kind == "text":
            return True, True, text
        v = _float(text)
        if v is None:
            return True, False, None
        if allows_nr and v in self.nr:
            return True, True, v
        if kind == "single":
            ok = v.is_integer() and int(v) in {o.value for o in codes.options}
        else:
            ok = stmt.type.lo <= v <= stmt.type.hi and (kind == "decimal" or v.is_integer())
        return True, ok, v

    # ---------------------------------------------------------------- logic
    def value(self, expr: Any, env: dict[str, Any]) -> Any:
        q = self.q
        if isinstance(expr, n.Num):
            return Num(float(expr.value), float(expr.value))
        if isinstance(expr, n.Code):
            return Num(float(expr.value), None if expr.label in self.nr_labels else float(expr.value))
        if isinstance(expr, n.Ref):
            got = env["values"].get(expr.name)
            if isinstance(got, bool) or (got is None and q.value_kind(expr.name) == "bool"):
                return got
            return got if isinstance(got, Num) else Num(None, None)
        if isinstance(expr, n.Neg):
            a = self.value(expr.operand, env).num
            return Num(None if a is None else -a, None if a is None else -a)
        if isinstance(expr, n.Arith):
            a, b = self.value(expr.left, env).num, self.value(expr.right, env).num
            if a is None or b is None:
                return Num(None, None)
            if expr.op == "/" and b == 0:
                return Num(None, None)
            v = {"+": a + b, "-": a - b, "*": a * b}.get(expr.op) if expr.op != "/" else a / b
            return Num(v, v)
        if isinstance(expr, n.Func):
            if expr.func == "count":
                s = env["values"].get(expr.name)
                return Num(float(len(s)), float(len(s))) if isinstance(s, frozenset) else Num(None, None)
            if expr.func == "asked":
                e = q.symbols.get(expr.name)
                if e is not None and e.kind == "sample":
                    return True
                return env["asked"].get(expr.name, False)
            return env["answered"].get(expr.name, False)
        if isinstance(expr, n.Compare):
            a, b = self.value(expr.left, env), self.value(expr.right, env)
            if not isinstance(a, Num) or not isinstance(b, Num):
                return None
            x, y = (a.raw, b.raw) if expr.op in ("=", "!=") else (a.num, b.num)
            if x is None or y is None:
                return None
            return {"=": x == y, "!=": x != y, "<": x < y, "<=": x <= y, ">": x > y, ">=": x >= y}[expr.op]
        if isinstance(expr, n.InList):
            s = self.value(expr.subject, env).raw
            return None if s is None else s in [float(v.value) for v in expr.values]
        if isinstance(expr, n.InRange):
            s = self.value(expr.subject, env).num
            return None if s is None else expr.lo <= s <= expr.hi
        if isinstance(expr, n.Has):
            s = env["values"].get(expr.subject.name)
            if not isinstance(s, frozenset) or not env["answered"].get(expr.subject.name):
                return None
            wanted = [int(v.value) for v in expr.values]
            return all(w in s for w in wanted) if expr.mode == "all" else any(w in s for w in wanted)
        if isinstance(expr, n.Not):
            a = self.value(expr.operand, env)
            return None if a is None else not a
        if isinstance(expr, n.And):
            parts = [self.value(o, env) for o in expr.operands]
            if any(p is False for p in parts):
                return False
            return True if all(p is True for p in parts) else None
        if isinstance(expr, n.Or):
            parts = [self.value(o, env) for o in expr.operands]
            if any(p is True for p in parts):
                return True
            return False if all(p is False for p in parts) else None
        return None

    # ---------------------------------------------------------------- one row
    def run(self, row: dict[str, str]) -> RowState:
        q = self.q
        out = RowState()
        env: dict[str, Any] = {"values": {}, "answered": {}, "asked": {}}
        stopped, skip_until = False, -1
        for e in q.entries:
            if e.kind == "let":
                v = self.value(e.own, env)
                env["values"][e.name] = Num(v.num, v.num) if isinstance(v, Num) else v
                continue
            if e.kind == "sample":
                present, valid, v = self.parse(e, row)
                env["values"][e.name] = Num(v, v) if valid else None
                env["answered"][e.name] = valid
                continue
            reached = not stopped and skip_until <= e.index
            reached = reached and all(self.value(c, env) is True for _, c in e.context if c is not None)
            cond = reached and (e.own is None or self.value(e.own, env) is True)
            if e.kind == "stop" and cond:
                stopped, out.stop = True, e.name
            elif e.kind == "skip" and cond and e.skip_target is not None:
                skip_until = max(skip_until, e.skip_target)
            elif e.kind == "check" and cond and e.require is not None and self.value(e.require, env) is False:
                out.failed.append(e.name)
            elif e.kind == "item":
                present, valid, v = self.parse(e, row)
                out.due[e.name], out.present[e.name], out.valid[e.name] = cond, present, valid
                use = cond and valid
                env["asked"][e.name] = cond
                env["answered"][e.name] = use
                if not use:
                    env["values"][e.name] = None
                elif isinstance(v, frozenset):
                    env["values"][e.name] = v
                elif isinstance(v, float):
                    nr = q.allows_nonresponse(e.stmt) and v in self.nr
                    env["values"][e.name] = Num(v, None if nr else v)
                else:
                    env["values"][e.name] = None
        return out


def interpret_csv(q: Questionnaire, path: str) -> list[RowState]:
    with open(path, encoding="utf-8-sig", newline="") as fh:
        return [RowInterpreter(q).run(row) for row in csv.DictReader(fh)]
