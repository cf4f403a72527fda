"""An independent, plain-Python router for test oracles: who is asked, given answers.

It follows the routing semantics (DEVELOPERS.md) and DEVELOPERS.md directly (Kleene logic with None as unknown,
stops and skips in order, codes compared by label) and shares no code with the solver
encoding. A respondent is the answers they would give if asked: label (single), number,
set of labels (multi), True (text), or None (no answer).
"""

from __future__ import annotations

from typing import Any

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


def _and(values: list[bool | None]) -> bool | None:
    if any(v is False for v in values):
        return False
    return None if any(v is None for v in values) else True


def _or(values: list[bool | None]) -> bool | None:
    if any(v is True for v in values):
        return True
    return None if any(v is None for v in values) else False


class Router:
    def __init__(self, q: Questionnaire, answers: dict[str, Any]) -> None:
        self.q = q
        self.answers = answers
        self.nr_labels = {o.label for o in q.nonresponse}
        self.nr_values = {o.value for o in q.nonresponse}
        self.asked: dict[str, bool] = {}
        self.values: dict[str, Any] = {}
        self.lets: dict[str, Any] = {}
        self.fired: set[str] = set()  # stops that ended the interview
        self.failed: set[str] = set()  # checks that applied and whose `require` is false
        self._route()

    def _route(self) -> None:
        stopped = False
        skip_until: int | None = None
        for e in self.q.entries:
            if skip_until is not None and e.index >= skip_until:
                skip_until = None
            blocked = stopped or skip_until is not None
            if e.kind == "sample":
                self.asked[e.name] = True
                self.values[e.name] = self.answers.get(e.name)
                continue
            if e.kind == "let":
                self.lets[e.name] = self.eval(e.own)
                continue
            reached = not blocked and all(self.eval(c) is True for c in e.conditions())
            if e.kind == "item":
                self.asked[e.name] = reached
                self.values[e.name] = self.answers.get(e.name) if reached else None
            elif e.kind == "stop" and reached:
                stopped = True
                self.fired.add(e.name)
            elif e.kind == "check" and reached and e.require is not None and self.eval(e.require) is False:
                self.failed.add(e.name)
            elif e.kind == "skip" and reached and e.skip_target is not None:
                skip_until = e.skip_target

    # -- values
    def _item(self, name: str) -> Entry:
        return self.q.symbols[name]

    def _nr(self, name: str, value: Any) -> bool:
        e = self._item(name)
        if e.kind != "item" or not self.q.allows_nonresponse(e.stmt):
            return False
        if e.stmt.type.kind == "single":
            return value in self.nr_labels
        return value in self.nr_values

    def _code_value(self, name: str, label: str) -> int:
        e = self._item(name)
        codes = self.q.item_codes(e.stmt)
        table = {o.label: o.value for o in (codes.options if codes else [])}
        table.update({o.label: o.value for o in self.q.nonresponse})
        return table[label]

    def eval(self, x: Any) -> Any:
        if isinstance(x, n.Not):
            v = self.eval(x.operand)
            return None if v is None else not v
        if isinstance(x, n.And):
            return _and([self.eval(o) for o in x.operands])
        if isinstance(x, n.Or):
            return _or([self.eval(o) for o in x.operands])
        if isinstance(x, n.Ref):
            if x.name in self.lets:
                return self.lets[x.name]
            return self.values.get(x.name)
        if isinstance(x, n.Num):
            return x.value
        if isinstance(x, n.Code):
            return x.label
        if isinstance(x, n.Compare):
            subject = x.left if isinstance(x.left, n.Ref) else x.right
            a, b = self.eval(x.left), self.eval(x.right)
            if a is None or b is None:
                return None
            if x.op in ("=", "!="):
                return (a == b) == (x.op == "=")
            name = subject.name if isinstance(subject, n.Ref) else None
            if name in self.q.symbols and self._item(name).kind in ("item", "sample"):
                if self._nr(name, self.values.get(name)):
                    return None
                if self._item(name).stmt.type.kind == "single":
                    a = self._code_value(name, a) if isinstance(a, str) else a
                    b = self._code_value(name, b) if isinstance(b, str) else b
            return {"<": a < b, "<=": a <= b, ">": a > b, ">=": a >= b}[x.op]
        if isinstance(x, n.InList):
            v = self.eval(x.subject)
            return None if v is None else v in [self.eval(o) for o in x.values]
        if isinstance(x, n.InRange):
            v = self.eval(x.subject)
            if v is None or (isinstance(x.subject, n.Ref) and self._nr(x.subject.name, v)):
                return None
            return x.lo <= v <= x.hi
        if isinstance(x, n.Has):
            v = self.eval(x.subject)
            if v is None:
                return None
            wanted = [o.label for o in x.values]
            return all(w in v for w in wanted) if x.mode == "all" else any(w in v for w in wanted)
        if isinstance(x, n.Func):
            if x.func == "asked":
                return self.asked.get(x.name, False)
            if x.func == "answered":
                return self.values.get(x.name) is not None
            v = self.values.get(x.name)
            return None if v is None else len(v)
        raise NotImplementedError(type(x).__name__)


def parse_witness(
    q: Questionnaire, witness: dict[str, str], rename: dict[str, str] | None = None, side: str | None = None
) -> dict[str, Any]:
    """A diff witness as answers for `q` (`rename` maps witness names to q's names; an
    item whose type changed is given per version, `NAME (old)` / `NAME (new)`)."""
    out: dict[str, Any] = {}
    for name, text in witness.items():
        if name.endswith((" (old)", " (new)")):
            if side is None or not name.endswith(f" ({side})"):
                continue
            name = name.rsplit(" ", 1)[0]
        name = (rename or {}).get(name, name)
        e = q.symbols.get(name)
        if e is None or text == "(no answer)":
            continue
        kind = e.stmt.type.kind
        if kind == "single":
            out[name] = text
        elif kind == "multi":
            out[name] = set(text.split(", "))
        elif kind in ("number", "decimal"):
            # A non-response answer is given by its label (its value differs by version).
            codes = {o.label: o.value for o in q.nonresponse}
            out[name] = float(codes[text]) if text in codes else float(text)
        else:
            out[name] = True
    return out
