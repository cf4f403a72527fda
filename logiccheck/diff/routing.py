"""Who is asked each item, in two versions of a spec, over one shared respondent.

A respondent is the answers they would give if asked: for every item a "would answer"
flag and a value, shared by both versions. Each version then decides, with the
three-valued semantics of DESIGN §3 and DEVELOPERS.md, which items are asked, and an item
that is not asked has no value there. Two versions route an item alike when no
respondent is asked it in one and not in the other; the solver proves that, or gives
such a respondent.

Codes are matched across versions by label, not value: a recode (the same answer stored
under another number) does not change who is asked; the recode itself is reported
separately. Ordering comparisons use each version's own code values.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import z3

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

NO_ANSWER = "(no answer)"
ANSWERED = "(answered)"


class Unsupported(Exception):
    """A condition the cross-version encoding cannot express (the message says which)."""


@dataclass
class B:
    """A three-valued condition: `t` when true, `f` when false (neither: unknown)."""

    t: Any
    f: Any


@dataclass
class T:
    """A value: `known` when it has one, `val` (label id for codes), `nr` for a
    non-response code, `num` for arithmetic and ordering (code value for codes)."""

    known: Any
    val: Any
    nr: Any
    num: Any
    coded_key: str | None = None


def _real(x: Any) -> Any:
    return z3.ToReal(x) if z3.is_int(x) else x


@dataclass
class Universe:
    """The shared respondent: variables per item key, their domains, label ids."""

    labels: dict[str, dict[str, int]] = field(default_factory=dict)
    domain: list[Any] = field(default_factory=list)
    kinds: dict[str, set[str]] = field(default_factory=dict)
    # Per variable, the values either version allows: the domain is their union.
    allowed: dict[str, list[Any]] = field(default_factory=dict)
    _vars: dict[str, Any] = field(default_factory=dict)

    def var(self, name: str, sort: str) -> Any:
        if name not in self._vars:
            make = {"bool": z3.Bool, "int": z3.Int, "real": z3.Real}[sort]
            self._vars[name] = make(name)
        return self._vars[name]

    def gives(self, key: str) -> Any:
        return self.var(f"{key}#gives", "bool")

    def label_id(self, key: str, label: str) -> int:
        table = self.labels.setdefault(key, {})
        if label not in table:
            table[label] = len(table)
        return table[label]

    def value(self, key: str, kind: str) -> Any:
        self.kinds.setdefault(key, set()).add(kind)
        sort = {"single": "int", "number": "int", "decimal": "real"}[kind]
        return self.var(f"{key}#{kind}", sort)

    def allow(self, var_name: str, condition: Any) -> None:
        self.allowed.setdefault(var_name, []).append(condition)

    def mark(self) -> tuple[int, set[str], set[str]]:
        multis = {k for k, kinds in self.kinds.items() if "multi" in kinds}
        return len(self.domain), set(self.allowed), {f"{k}:{len(self.labels.get(k, {}))}" for k in multis}

    def constraints(self, since: tuple[int, set[str], set[str]] = (0, set(), set())) -> list[Any]:
        """The domain constraints not yet handed out (`since`: an earlier `mark()`)."""
        done, allowed_done, multi_done = since
        out = list(self.domain[done:])
        out += [z3.Or(conds) for name, conds in self.allowed.items() if name not in allowed_done]
        for key, kinds in self.kinds.items():
            if "multi" in kinds and f"{key}:{len(self.labels.get(key, {}))}" not in multi_done:
                chosen = [self.chosen(key, lb) for lb in self.labels.get(key, {})]
                out.append(self.gives(key) == z3.Or(chosen or [z3.BoolVal(False)]))
        return out

    def chosen(self, key: str, label: str) -> Any:
        self.kinds.setdefault(key, set()).add("multi")
        self.label_id(key, label)
        return self.var(f"{key}#opt#{label}", "bool")


class VersionEncoding:
    """One version's routing over the shared respondent."""

    def __init__(self, q: Questionnaire, universe: Universe, key_of: dict[str, str]) -> None:
        self.q = q
        self.u = universe
        self.key_of = key_of  # this version's name -> shared key
        self.nr_values = [o.value for o in q.nonresponse]
        self.nr_labels = [o.label for o in q.nonresponse]
        self._asked: dict[int, Any] = {}
        self._fired: dict[int, Any] = {}
        self._lets: dict[str, B | T] = {}
        self._declare_domains()

    # ----------------------------------------------------------- the respondent
    def key(self, name: str) -> str:
        return self.key_of.get(name, name)

    def _declare_domains(self) -> None:
        for entry in self.q.entries:
            stmt = entry.stmt
            if entry.kind not in ("item", "sample"):
                continue
            key = self.key(stmt.name)
            kind = stmt.type.kind
            nr_ok = self.q.allows_nonresponse(stmt)
            if entry.kind == "sample":
                self.u.domain.append(self.u.gives(key))
            if kind == "single":
                codes = self.q.item_codes(stmt)
                labels = [o.label for o in codes.options] if codes else []
                if nr_ok:
                    labels += self.nr_labels
                val = self.u.value(key, "single")
                self.u.allow(f"{key}#single", z3.Or([val == self.u.label_id(key, lb) for lb in labels] or [z3.BoolVal(False)]))
            elif kind in ("number", "decimal"):
                val = self.u.value(key, kind)
                lo, hi = stmt.type.lo, stmt.type.hi
                options = [z3.And(val >= lo, val <= hi)] if lo is not None and hi is not None else [z3.BoolVal(True)]
                if nr_ok:
                    options += [val == v for v in self.nr_values]
                self.u.allow(f"{key}#{kind}", z3.Or(options))
            elif kind == "multi":
                codes = self.q.item_codes(stmt)
                for o in codes.options if codes else []:
                    self.u.chosen(key, o.label)
            if entry.kind == "item" and stmt.flags.required:
                self.u.domain.append(z3.Implies(self.asked(entry), self.u.gives(key)))

    def present(self, name: str) -> Any:
        entry = self.q.symbols.get(name)
        if entry is None:
            raise Unsupported(f"`{name}` is not defined")
        if entry.kind == "sample":
            return z3.BoolVal(True)
        if entry.kind == "let":
            value = self.let_value(entry)
            return value.known if isinstance(value, T) else z3.Or(value.t, value.f)
        return z3.And(self.asked(entry), self.u.gives(self.key(name)))

    # ----------------------------------------------------------- routing
    def _reached(self, entry: Entry) -> Any:
        parts = []
        for expr in entry.conditions():
            parts.append(self.cond(expr).t)
        stops, skips = self.q.guards(entry)
        parts += [z3.Not(self.fired(s)) for s in stops]
        parts += [z3.Not(self.fired(s)) for s in skips]
        return z3.And(parts) if parts else z3.BoolVal(True)

    def asked(self, entry: Entry) -> Any:
        if entry.index not in self._asked:
            self._asked[entry.index] = z3.BoolVal(True) if entry.kind == "sample" else self._reached(entry)
        return self._asked[entry.index]

    def fired(self, entry: Entry) -> Any:
        # A stop or skip fires when reached; `_reached` already includes its condition.
        if entry.index not in self._fired:
            self._fired[entry.index] = self._reached(entry)
        return self._fired[entry.index]

    def asked_name(self, name: str) -> Any:
        return self.asked(self.q.symbols[name])

    # ----------------------------------------------------------- expressions
    def let_value(self, entry: Entry) -> B | T:
        if entry.name not in self._lets:
            self._lets[entry.name] = self.expr(entry.own)
        return self._lets[entry.name]

    def cond(self, expr: Any) -> B:
        value = self.expr(expr)
        if isinstance(value, B):
            return value
        raise Unsupported("a value is used where a condition is expected")

    def term(self, expr: Any) -> T:
        value = self.expr(expr)
        if isinstance(value, T):
            return value
        # A condition read as a number (rare): true = 1, false = 0.
        return T(z3.Or(value.t, value.f), z3.If(value.t, 1, 0), z3.BoolVal(False), z3.If(value.t, 1, 0))

    def _ref(self, name: str) -> B | T:
        entry = self.q.symbols.get(name)
        if entry is None:
            raise Unsupported(f"`{name}` is not defined")
        if entry.kind == "let":
            return self.let_value(entry)
        stmt = entry.stmt
        key = self.key(name)
        kind = stmt.type.kind
        known = self.present(name)
        if kind == "single":
            val = self.u.value(key, "single")
            codes = self.q.item_codes(stmt)
            nr_ids = [self.u.label_id(key, lb) for lb in self.nr_labels] if self.q.allows_nonresponse(stmt) else []
            num: Any = z3.IntVal(-1)
            pairs = [(o.label, o.value) for o in (codes.options if codes else [])]
            if self.q.allows_nonresponse(stmt):
                pairs += [(o.label, o.value) for o in self.q.nonresponse]
            for label, value in pairs:
                num = z3.If(val == self.u.label_id(key, label), value, num)
            nr = z3.Or([val == i for i in nr_ids]) if nr_ids else z3.BoolVal(False)
            return T(known, val, nr, num, coded_key=key)
        if kind in ("number", "decimal"):
            val = self.u.value(key, kind)
            nr_vals = self.nr_values if self.q.allows_nonresponse(stmt) else []
            nr = z3.Or([val == v for v in nr_vals]) if nr_vals else z3.BoolVal(False)
            return T(known, val, nr, val)
        raise Unsupported(f"`{name}` ({kind}) cannot be compared")

    def _code(self, node: n.Code, subject: T) -> T:
        if subject.coded_key is None:
            return T(z3.BoolVal(True), z3.IntVal(node.value), z3.BoolVal(False), z3.IntVal(node.value))
        ident = self.u.label_id(subject.coded_key, node.label)
        nr = z3.BoolVal(node.label in self.nr_labels)
        return T(z3.BoolVal(True), z3.IntVal(ident), nr, z3.IntVal(node.value))

    def _pair(self, left: Any, right: Any) -> tuple[T, T]:
        if isinstance(right, n.Code) and not isinstance(left, n.Code):
            lt = self.term(left)
            return lt, self._code(right, lt)
        if isinstance(left, n.Code) and not isinstance(right, n.Code):
            rt = self.term(right)
            return self._code(left, rt), rt
        return self.term(left), self.term(right)

    def expr(self, e: Any) -> B | T:
        if isinstance(e, n.Not):
            inner = self.cond(e.operand)
            return B(inner.f, inner.t)
        if isinstance(e, n.And):
            parts = [self.cond(o) for o in e.operands]
            return B(z3.And([p.t for p in parts]), z3.Or([p.f for p in parts]))
        if isinstance(e, n.Or):
            parts = [self.cond(o) for o in e.operands]
            return B(z3.Or([p.t for p in parts]), z3.And([p.f for p in parts]))
        if isinstance(e, n.Ref):
            return self._ref(e.name)
        if isinstance(e, n.Num):
            v = z3.IntVal(int(e.value)) if e.is_int else z3.RealVal(e.value)
            return T(z3.BoolVal(True), v, z3.BoolVal(False), v)
        if isinstance(e, n.Code):
            v = z3.IntVal(e.value)
            return T(z3.BoolVal(True), v, z3.BoolVal(False), v)
        if isinstance(e, n.Compare):
            lt, rt = self._pair(e.left, e.right)
            if e.op in ("=", "!="):
                known = z3.And(lt.known, rt.known)
                same = lt.val == rt.val if lt.coded_key or rt.coded_key else _real(lt.num) == _real(rt.num)
                hit = same if e.op == "=" else z3.Not(same)
                return B(z3.And(known, hit), z3.And(known, z3.Not(hit)))
            known = z3.And(lt.known, rt.known, z3.Not(lt.nr), z3.Not(rt.nr))
            a, b = _real(lt.num), _real(rt.num)
            hit = {"<": a < b, "<=": a <= b, ">": a > b, ">=": a >= b}[e.op]
            return B(z3.And(known, hit), z3.And(known, z3.Not(hit)))
        if isinstance(e, n.InList):
            subject = self.term(e.subject)
            knowns, hits = [subject.known], []
            for v in e.values:
                st, vt = self._pair(e.subject, v)
                knowns.append(vt.known)
                hits.append(st.val == vt.val if st.coded_key else _real(st.num) == _real(vt.num))
            known, hit = z3.And(knowns), z3.Or(hits or [z3.BoolVal(False)])
            return B(z3.And(known, hit), z3.And(known, z3.Not(hit)))
        if isinstance(e, n.InRange):
            s = self.term(e.subject)
            known = z3.And(s.known, z3.Not(s.nr))
            x = _real(s.num)
            hit = z3.And(x >= e.lo, x <= e.hi)
            return B(z3.And(known, hit), z3.And(known, z3.Not(hit)))
        if isinstance(e, n.Has):
            if not isinstance(e.subject, n.Ref):
                raise Unsupported("`has` on an expression")
            key = self.key(e.subject.name)
            known = self.present(e.subject.name)
            chosen = [self.u.chosen(key, v.label) for v in e.values if isinstance(v, n.Code)]
            if len(chosen) != len(e.values):
                raise Unsupported("`has` with a value that is not a code")
            hit = z3.And(chosen) if e.mode == "all" else z3.Or(chosen)
            return B(z3.And(known, hit), z3.And(known, z3.Not(hit)))
        if isinstance(e, n.Func):
            entry = self.q.symbols.get(e.name)
            if entry is None:
                raise Unsupported(f"`{e.name}` is not defined")
            if e.func == "asked":
                a = self.asked(entry) if entry.kind != "let" else z3.BoolVal(True)
                return B(a, z3.Not(a))
            if e.func == "answered":
                p = self.present(e.name)
                return B(p, z3.Not(p))
            codes = self.q.item_codes(entry.stmt) if entry.kind in ("item", "sample") else None
            key = self.key(e.name)
            total = z3.Sum([z3.If(self.u.chosen(key, o.label), 1, 0) for o in codes.options]) if codes else z3.IntVal(0)
            return T(self.present(e.name), total, z3.BoolVal(False), total)
        if isinstance(e, n.Arith):
            a, b = self.term(e.left), self.term(e.right)
            known = z3.And(a.known, b.known, z3.Not(a.nr), z3.Not(b.nr))
            x, y = _real(a.num), _real(b.num)
            if e.op == "/":
                known = z3.And(known, y != 0)
            v = {"+": x + y, "-": x - y, "*": x * y, "/": x / y}[e.op]
            return T(known, v, z3.BoolVal(False), v)
        if isinstance(e, n.Neg):
            a = self.term(e.operand)
            return T(z3.And(a.known, z3.Not(a.nr)), -_real(a.num), z3.BoolVal(False), -_real(a.num))
        raise Unsupported(f"cannot encode a `{getattr(e, 'kind', type(e).__name__)}` expression")


def _constants(expr: Any) -> set[str]:
    seen, out, stack = set(), set(), [expr]
    while stack:
        node = stack.pop()
        if node.get_id() in seen:
            continue
        seen.add(node.get_id())
        if z3.is_const(node) and node.decl().kind() == z3.Z3_OP_UNINTERPRETED:
            out.add(node.decl().name())
        stack.extend(node.children())
    return out


@dataclass
class RoutingResult:
    """`same` proven, or a witness respondent (`witness`) with where they are asked."""

    same: bool
    witness: dict[str, str] | None = None
    asked_old: bool | None = None
    asked_new: bool | None = None
    error: str | None = None


class CrossVersion:
    """Both versions over one respondent; `compare(old_name, new_name)` per item."""

    def __init__(self, old: Questionnaire, new: Questionnaire, new_to_old: dict[str, str]) -> None:
        self.u = Universe()
        self.old = VersionEncoding(old, self.u, {})
        self.new = VersionEncoding(new, self.u, new_to_old)
        self._s: z3.Solver | None = None
        self._added: tuple[int, set[str], set[str]] = (0, set(), set())
        # Witnesses name an item as the new version does.
        self.display = {was: now for now, was in new_to_old.items()}

    def _solver(self, timeout_ms: int) -> z3.Solver:
        # One solver holds the respondent's domain; each comparison is a push/pop on it.
        # Encoding items may add variables, so their domains are added as they appear.
        if self._s is None:
            self._s = z3.Solver()
            self._s.set("timeout", timeout_ms)
        fresh = self.u.constraints(since=self._added)
        self._s.add(fresh)
        self._added = self.u.mark()
        return self._s

    def compare(self, old_name: str, new_name: str, timeout_ms: int = 20000) -> RoutingResult:
        try:
            a_old = self.old.asked_name(old_name)
            a_new = self.new.asked_name(new_name)
        except Unsupported as err:
            return RoutingResult(same=False, error=str(err))
        solver = self._solver(timeout_ms)
        differ = z3.Xor(a_old, a_new)
        solver.push()
        try:
            solver.add(differ)
            verdict = solver.check()
            model = solver.model() if verdict == z3.sat else None
        finally:
            solver.pop()
        if verdict == z3.unsat:
            return RoutingResult(same=True)
        if verdict == z3.unknown:
            return RoutingResult(same=False, error="the solver gave up (timeout)")
        assert model is not None
        return RoutingResult(
            same=False,
            witness=self._witness(model, _constants(differ)),
            asked_old=z3.is_true(model.eval(a_old, model_completion=True)),
            asked_new=z3.is_true(model.eval(a_new, model_completion=True)),
        )

    def _witness(self, model: z3.ModelRef, names: set[str]) -> dict[str, str]:
        keys = sorted({name.split("#")[0] for name in names})
        out: dict[str, str] = {}
        for key in keys:
            shown = self.display.get(key, key)

            def val(name: str, sort: str) -> Any:
                return model.eval(self.u.var(name, sort), model_completion=True)

            gives = z3.is_true(val(f"{key}#gives", "bool"))
            kinds = self.u.kinds.get(key, set())
            if not gives:
                out[shown] = NO_ANSWER
            elif "multi" in kinds:
                chosen = [lb for lb in self.u.labels.get(key, {}) if z3.is_true(val(f"{key}#opt#{lb}", "bool"))]
                out[shown] = ", ".join(chosen)
            elif "single" in kinds:
                ident = val(f"{key}#single", "int").as_long()
                names_by_id = {i: lb for lb, i in self.u.labels.get(key, {}).items()}
                out[shown] = names_by_id.get(ident, str(ident))
            elif "number" in kinds:
                out[shown] = str(val(f"{key}#number", "int").as_long())
            elif "decimal" in kinds:
                out[shown] = val(f"{key}#decimal", "real").as_decimal(6).rstrip("?")
            else:
                out[shown] = ANSWERED
        return out
