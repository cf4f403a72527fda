"""The vectorised evaluator: each condition compiles once to numpy operations.

Three-valued masks are pairs (t, f): true where surely true, false where surely false,
unknown where neither (Kleene's strong logic, as SQL treats NULL). Statements are
evaluated in questionnaire order with cascade: only a due, valid answer is a value for
anything later (an answer off the route, or an invalid one, opens nothing).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from logiccheck.data.frame import Cells, Layout
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

# Sentinel keys for a name's state in a root-cause fact (values are real numbers).
NOT_ASKED, BLANK, INVALID, OFF_ROUTE, UNKNOWN = -1e300, -2e300, -3e300, -4e300, -5e300


@dataclass
class TV:
    """A three-valued mask."""

    t: np.ndarray
    f: np.ndarray

    @property
    def unknown(self) -> np.ndarray:
        return ~(self.t | self.f)


@dataclass
class NumV:
    """A value per respondent: `raw` for equality (non-response codes as recorded),
    `num` for ordering and arithmetic (non-response codes unknown); NaN = no value."""

    raw: np.ndarray
    num: np.ndarray


@dataclass
class Env:
    rows: int
    values: dict[str, NumV] = field(default_factory=dict)
    bools: dict[str, TV] = field(default_factory=dict)
    sets: dict[str, tuple[np.ndarray, np.ndarray, list[int]]] = field(default_factory=dict)
    answered: dict[str, np.ndarray] = field(default_factory=dict)
    asked: dict[str, np.ndarray] = field(default_factory=dict)
    due: dict[str, np.ndarray] = field(default_factory=dict)
    present: dict[str, np.ndarray] = field(default_factory=dict)
    valid: dict[str, np.ndarray] = field(default_factory=dict)

    def true(self) -> TV:
        return TV(np.ones(self.rows, dtype=bool), np.zeros(self.rows, dtype=bool))

    def unknown(self) -> TV:
        return TV(np.zeros(self.rows, dtype=bool), np.zeros(self.rows, dtype=bool))

    def nan(self) -> NumV:
        a = np.full(self.rows, np.nan)
        return NumV(a, a)


Compiled = Callable[[Env], Any]  # Env -> TV | NumV
Supplier = Callable[[Entry, np.ndarray], "Cells | None"]


# Spec numbers are decimals (the routing semantics (DEVELOPERS.md)) and the solver reads them exactly; float
# arithmetic on them leaves rounding error (0.1 + 0.2 is not 0.3 in binary), so values
# this close, relative to their size, count as equal.
REL_TOL = 1e-9


def close(x: np.ndarray, y: np.ndarray | float) -> np.ndarray:
    """x equals y up to the rounding error of float arithmetic (NaN is never close)."""
    with np.errstate(invalid="ignore"):
        return np.abs(x - y) <= REL_TOL * np.maximum(1.0, np.maximum(np.abs(x), np.abs(y)))


def kleene_and(parts: list[TV]) -> TV:
    t, f = parts[0].t.copy(), parts[0].f.copy()
    for p in parts[1:]:
        t &= p.t
        f |= p.f
    return TV(t, f)


def kleene_or(parts: list[TV]) -> TV:
    t, f = parts[0].t.copy(), parts[0].f.copy()
    for p in parts[1:]:
        t |= p.t
        f &= p.f
    return TV(t, f)


class Compiler:
    """Resolved expression → closure over an Env."""

    def __init__(self, q: Questionnaire) -> None:
        self.q = q
        self.nr_labels = {o.label for o in q.nonresponse}

    def boolean(self, expr: Any) -> Compiled:
        inner = self.compile(expr)

        def run(env: Env) -> TV:
            out = inner(env)
            if not isinstance(out, TV):
                return env.unknown()
            if out.t.shape != (env.rows,):  # a condition on constants only
                return TV(np.broadcast_to(out.t, (env.rows,)).copy(), np.broadcast_to(out.f, (env.rows,)).copy())
            return out

        return run

    def number(self, expr: Any) -> Compiled:
        inner = self.compile(expr)

        def run(env: Env) -> NumV:
            out = inner(env)
            return out if isinstance(out, NumV) else env.nan()

        return run

    def compile(self, expr: Any) -> Compiled:
        q = self.q
        if isinstance(expr, n.Num):
            # Constants are 0-d arrays: numpy broadcasts them against the columns.
            const = NumV(np.array(float(expr.value)), np.array(float(expr.value)))
            return lambda env: const
        if isinstance(expr, n.Code):
            v = float(expr.value)
            code = NumV(np.array(v), np.array(math.nan if expr.label in self.nr_labels else v))
            return lambda env: code
        if isinstance(expr, n.Ref):
            name = expr.name
            entry = q.symbols.get(name)
            if entry is None:
                return lambda env: env.nan()
            kind = q.value_kind(name)
            if kind == "bool":
                return lambda env: env.bools.get(name) or env.unknown()
            if kind in ("coded", "number"):
                return lambda env: env.values.get(name) or env.nan()
            return lambda env: env.nan()
        if isinstance(expr, n.Neg):
            sub = self.number(expr.operand)

            def neg(env: Env) -> NumV:
                v = -sub(env).num
                return NumV(v, v)

            return neg
        if isinstance(expr, n.Arith):
            left, right, op = self.number(expr.left), self.number(expr.right), expr.op

            def arith(env: Env) -> NumV:
                a, b = left(env).num, right(env).num
                with np.errstate(all="ignore"):
                    if op == "+":
                        v = a + b
                    elif op == "-":
                        v = a - b
                    elif op == "*":
                        v = a * b
                    else:
                        v = np.where(b == 0, np.nan, a / np.where(b == 0, 1, b))
                v = np.where(np.isfinite(v), v, np.nan)
                return NumV(v, v)

            return arith
        if isinstance(expr, n.Compare):
            left, right, rel = self.compile(expr.left), self.compile(expr.right), expr.op

            def compare(env: Env) -> TV:
                a, b = left(env), right(env)
                if not isinstance(a, NumV) or not isinstance(b, NumV):
                    return env.unknown()
                if rel in ("=", "!="):
                    x, y = a.raw, b.raw
                else:
                    x, y = a.num, b.num
                known = ~np.isnan(x) & ~np.isnan(y)
                with np.errstate(invalid="ignore"):
                    eq = close(x, y)
                    res = {
                        "=": lambda: eq,
                        "!=": lambda: ~eq,
                        "<": lambda: np.less(x, y) & ~eq,
                        "<=": lambda: np.less(x, y) | eq,
                        ">": lambda: np.greater(x, y) & ~eq,
                        ">=": lambda: np.greater(x, y) | eq,
                    }[rel]()
                return TV(known & res, known & ~res)

            return compare
        if isinstance(expr, n.InList):
            subject = self.number(expr.subject)
            values = np.array(
                [float(v.value) for v in expr.values if isinstance(v, (n.Num, n.Code))], dtype=np.float64
            )

            def in_list(env: Env) -> TV:
                s = subject(env).raw
                known = ~np.isnan(s)
                hit = np.isin(s, values)
                for v in values:
                    hit |= close(s, v)
                return TV(known & hit, known & ~hit)

            return in_list
        if isinstance(expr, n.InRange):
            subject, lo, hi = self.number(expr.subject), expr.lo, expr.hi

            def in_range(env: Env) -> TV:
                s = subject(env).num
                known = ~np.isnan(s)
                with np.errstate(invalid="ignore"):
                    hit = ((s >= lo) | close(s, lo)) & ((s <= hi) | close(s, hi))
                return TV(known & hit, known & ~hit)

            return in_range
        if isinstance(expr, n.Has):
            if not isinstance(expr.subject, n.Ref):
                return lambda env: env.unknown()
            name, mode = expr.subject.name, expr.mode
            wanted = [int(v.value) for v in expr.values if isinstance(v, (n.Code, n.Num))]

            def has(env: Env) -> TV:
                got = env.sets.get(name)
                if got is None:
                    return env.unknown()
                chosen, present, options = got
                cols = [chosen[:, options.index(v)] if v in options else np.zeros(env.rows, dtype=bool) for v in wanted]
                if not cols:
                    hit = np.full(env.rows, mode == "all")
                elif mode == "all":
                    hit = np.logical_and.reduce(cols)
                else:
                    hit = np.logical_or.reduce(cols)
                return TV(present & hit, present & ~hit)

            return has
        if isinstance(expr, n.Func):
            name, func = expr.name, expr.func
            if func == "count":

                def count(env: Env) -> NumV:
                    got = env.sets.get(name)
                    if got is None:
                        return env.nan()
                    chosen, present, _ = got
                    v = np.where(present, chosen.sum(axis=1).astype(np.float64), np.nan)
                    return NumV(v, v)

                return count
            table = "answered" if func == "answered" else "asked"
            entry = q.symbols.get(name)
            always = func == "asked" and entry is not None and entry.kind == "sample"

            def known_func(env: Env) -> TV:
                if always:
                    return env.true()
                got = getattr(env, table).get(name)
                t = got if got is not None else np.zeros(env.rows, dtype=bool)
                return TV(t, ~t)

            return known_func
        if isinstance(expr, n.Not):
            sub = self.boolean(expr.operand)

            def negate(env: Env) -> TV:
                s = sub(env)
                return TV(s.f, s.t)

            return negate
        if isinstance(expr, (n.And, n.Or)):
            parts = [self.boolean(o) for o in expr.operands]
            join = kleene_and if isinstance(expr, n.And) else kleene_or
            return lambda env: join([p(env) for p in parts])
        return lambda env: env.unknown()


class ColumnCompiler(Compiler):
    """A compiler that also reads names outside the questionnaire (numbers and flags
    given per respondent, e.g. completeness measures); they shadow spec names."""

    def __init__(self, q: Questionnaire, numbers: Iterable[str] = (), flags: Iterable[str] = ()) -> None:
        super().__init__(q)
        self.numbers = set(numbers)
        self.flags = set(flags)

    def compile(self, expr: Any) -> Compiled:
        if isinstance(expr, n.Ref) and expr.name in self.flags:
            name = expr.name
            return lambda env: env.bools.get(name) or env.unknown()
        if isinstance(expr, n.Ref) and expr.name in self.numbers:
            name = expr.name
            return lambda env: env.values.get(name) or env.nan()
        return super().compile(expr)


def evaluate_columns(
    q: Questionnaire,
    expr: Any,
    rows: int,
    *,
    numbers: Mapping[str, np.ndarray] | None = None,
    flags: Mapping[str, np.ndarray] | None = None,
    answered: Mapping[str, np.ndarray] | None = None,
    asked: Mapping[str, np.ndarray] | None = None,
) -> TV:
    """One condition over given per-respondent arrays, with the routing's three-valued
    semantics: `numbers` (NaN = no value), `flags` (known true/false), and the
    `answered(...)` / `asked(...)` masks of items."""
    numbers, flags = numbers or {}, flags or {}
    env = Env(rows)
    for name, v in numbers.items():
        a = np.asarray(v, dtype=np.float64)
        env.values[name] = NumV(a, a)
    for name, m in flags.items():
        b = np.asarray(m, dtype=bool)
        env.bools[name] = TV(b, ~b)
    env.answered.update(answered or {})
    env.asked.update(asked or {})
    return ColumnCompiler(q, numbers, flags).boolean(expr)(env)


@dataclass
class Blocked:
    """Why due was false for the rows of an off-route answer: the first guard that held."""

    rows: np.ndarray  # chunk-local rows
    reason: np.ndarray  # index into `guards` of the entry's plan
    keys: np.ndarray  # rows × facts: value keys of the names the guard reads


@dataclass
class Guard:
    """One reason an entry may not be reached: a stop, a skip, a context or own condition."""

    kind: str  # stop | skip | context | own
    entry: Entry | n.Section | n.Grid  # the stop, skip or item; the owning section/grid for context
    expr: Any  # the condition
    reads: list[tuple[str, str]]  # (fact kind, name) the message reports


@dataclass
class ChunkState:
    rows: int
    env: Env
    stop_at: np.ndarray  # entry index of the stop that fired, -1 if none
    check_applies: dict[str, np.ndarray]
    check_fails: dict[str, np.ndarray]
    blocked: dict[str, Blocked]
    lets: dict[str, Any]


def reads_of(q: Questionnaire, expr: Any, _depth: int = 0) -> list[tuple[str, str]]:
    """The facts a root-cause message states for a condition: (how, name) pairs, `how`
    being value / answered / asked; a derived value is followed by its own inputs, marked
    `input:HOW`, so the message can say why it was false or unknown."""
    out: list[tuple[str, str]] = []

    def add(item: tuple[str, str]) -> None:
        if item not in out:
            out.append(item)

    for node in n.walk(expr):
        if isinstance(node, n.Ref) and node.name in q.symbols:
            add(("value", node.name))
            entry = q.symbols[node.name]
            if entry.kind == "let" and entry.own is not None and _depth < 3:
                for how, name in reads_of(q, entry.own, _depth + 1):
                    add((how if how.startswith("input:") else f"input:{how}", name))
        elif isinstance(node, n.Has) and isinstance(node.subject, n.Ref) and node.subject.name in q.symbols:
            add(("value", node.subject.name))
        elif isinstance(node, n.Func):
            add((node.func, node.name))
    return out


def _names_read(q: Questionnaire) -> set[str]:
    """The names whose values some condition, derived value or check reads."""
    out: set[str] = set()
    for e in q.entries:
        exprs = [expr for _, expr in e.context if expr is not None] + [x for x in (e.own, e.require) if x is not None]
        for expr in exprs:
            for node in n.walk(expr):
                if isinstance(node, n.Ref):
                    out.add(node.name)
                elif isinstance(node, n.Has) and isinstance(node.subject, n.Ref):
                    out.add(node.subject.name)
                elif isinstance(node, n.Func):
                    out.add(node.name)
    return out


class Evaluator:
    """Compiled routing for one questionnaire; `run` evaluates one chunk."""

    def __init__(self, q: Questionnaire, layout: Layout) -> None:
        self.q = q
        self.layout = layout
        c = Compiler(q)
        self.compiler = c
        self.context: dict[int, list[tuple[Any, Compiled]]] = {}
        self.own: dict[int, Compiled] = {}
        self.require: dict[int, Compiled] = {}
        self.guards: dict[int, list[Guard]] = {}
        for e in q.entries:
            self.context[e.index] = [(owner, c.boolean(expr)) for owner, expr in e.context if expr is not None]
            if e.kind == "let":
                self.own[e.index] = c.compile(e.own) if e.own is not None else (lambda env: env.unknown())
            elif e.own is not None:
                self.own[e.index] = c.boolean(e.own)
            if e.kind == "check" and e.require is not None:
                self.require[e.index] = c.boolean(e.require)
        self.read = _names_read(q)

    def guards_of(self, e: Entry) -> list[Guard]:
        if e.index not in self.guards:
            q = self.q
            stops, skips = q.guards(e)
            out = [Guard("stop", s, s.own, []) for s in stops]
            out += [Guard("skip", s, s.own, []) for s in skips]
            out += [Guard("context", owner, expr, reads_of(q, expr)) for owner, expr in e.context if expr is not None]
            if e.own is not None:
                out.append(Guard("own", e, e.own, reads_of(q, e.own)))
            self.guards[e.index] = out
        return self.guards[e.index]

    def run(self, cells: dict[str, Cells], rows: int, supply: Supplier | None = None) -> ChunkState:
        """Evaluate one chunk. `supply(entry, due)`, when given, makes an item's cells
        from its due mask (the simulator uses it); otherwise `cells` holds them."""
        env = Env(rows)
        stop_at = np.full(rows, -1, dtype=np.int32)
        skip_until = np.full(rows, -1, dtype=np.int32)
        state = ChunkState(rows, env, stop_at, {}, {}, {}, {})
        for e in self.q.entries:
            if e.kind == "let":
                out = self.own[e.index](env)
                shape = (rows,)
                if isinstance(out, TV) and out.t.shape != shape:
                    out = TV(np.broadcast_to(out.t, shape).copy(), np.broadcast_to(out.f, shape).copy())
                elif isinstance(out, NumV) and out.num.shape != shape:
                    out = NumV(np.broadcast_to(out.raw, shape).copy(), np.broadcast_to(out.num, shape).copy())
                if isinstance(out, TV):
                    env.bools[e.name] = out
                elif isinstance(out, NumV):
                    env.values[e.name] = NumV(out.num, out.num)
                state.lets[e.name] = out
                continue
            if e.kind == "sample":
                got = supply(e, np.ones(rows, dtype=bool)) if supply is not None else cells.get(e.name)
                self._set_value(env, e, got, np.ones(rows, dtype=bool))
                continue
            alive = (stop_at < 0) & (skip_until <= e.index)
            ctx = [fn(env) for _, fn in self.context[e.index]]
            reached = alive.copy()
            for tv in ctx:
                reached &= tv.t
            own = self.own[e.index](env) if e.index in self.own else None
            cond = reached & own.t if own is not None else reached
            if e.kind == "stop":
                stop_at[cond & (stop_at < 0)] = e.index
            elif e.kind == "skip":
                if e.skip_target is not None:
                    skip_until[:] = np.where(cond, np.maximum(skip_until, e.skip_target), skip_until)
            elif e.kind == "check":
                state.check_applies[e.name] = cond
                req = self.require.get(e.index)
                fails = cond & req(env).f if req is not None else np.zeros(rows, dtype=bool)
                state.check_fails[e.name] = fails
            elif e.kind == "item":
                c = supply(e, cond) if supply is not None else cells.get(e.name)
                env.due[e.name] = cond
                env.asked[e.name] = cond
                if c is not None:
                    env.present[e.name] = c.present
                    env.valid[e.name] = c.valid
                    off = c.present & ~cond
                    if off.any():
                        state.blocked[e.name] = self._blocked(e, env, off, stop_at, skip_until, ctx, own)
                self._set_value(env, e, c, cond)
        return state

    def _set_value(self, env: Env, e: Entry, c: Cells | None, due: np.ndarray) -> None:
        name = e.name
        if e.kind == "sample":
            env.due[name] = due
        if c is None:
            env.answered[name] = np.zeros(env.rows, dtype=bool)
            return
        use = due & c.valid
        env.answered[name] = use
        if name not in self.read:
            return  # no condition, derived value or check reads its value
        if c.chosen is not None:
            env.sets[name] = (c.chosen & use[:, None], use, c.plan.options)
        elif c.value is not None:
            raw = np.where(use, c.value, np.nan)
            num = np.where(c.nr, np.nan, raw) if c.nr is not None and c.nr.any() else raw
            env.values[name] = NumV(raw, num)

    def _blocked(
        self,
        e: Entry,
        env: Env,
        off: np.ndarray,
        stop_at: np.ndarray,
        skip_until: np.ndarray,
        ctx: list[TV],
        own: TV | None,
    ) -> Blocked:
        guards = self.guards_of(e)
        rows = np.flatnonzero(off)
        reason = np.full(len(rows), -1, dtype=np.int32)
        todo = np.ones(len(rows), dtype=bool)
        for gi, g in enumerate(guards):
            if g.kind == "stop":
                assert isinstance(g.entry, Entry)  # a stop's guard holds the stop's entry
                hit = stop_at[rows] == g.entry.index
            elif g.kind == "skip":
                # A skip spanning this entry fired when the running limit passed it.
                hit = skip_until[rows] > e.index
            elif g.kind == "context":
                pos = sum(1 for x in guards[:gi] if x.kind == "context")
                hit = ~ctx[pos].t[rows]
            else:
                hit = ~own.t[rows] if own is not None else np.zeros(len(rows), dtype=bool)
            sel = todo & hit
            reason[sel] = gi
            todo &= ~sel
        width = max((len(g.reads) for g in guards), default=0)
        keys = np.full((len(rows), max(width, 1)), UNKNOWN)
        for gi, g in enumerate(guards):
            sel = reason == gi
            if not sel.any():
                continue
            for j, (how, name) in enumerate(g.reads):
                keys[sel, j] = self.fact_key(env, how, name, rows[sel])
        return Blocked(rows, reason, keys)

    def fact_key(self, env: Env, how: str, name: str, rows: np.ndarray) -> np.ndarray:
        """A number standing for what a name held for these rows (see NOT_ASKED etc.)."""
        how = how.removeprefix("input:")
        if how in ("answered", "asked"):
            got = getattr(env, how).get(name)
            return np.where(got[rows], 1.0, 0.0) if got is not None else np.zeros(len(rows))
        if name in env.bools:
            tv = env.bools[name]
            return np.where(tv.t[rows], 1.0, np.where(tv.f[rows], 0.0, UNKNOWN))
        entry = self.q.symbols.get(name)
        if entry is not None and entry.kind == "let":
            value = env.values.get(name)
            if value is None:
                return np.full(len(rows), UNKNOWN)
            return np.where(np.isnan(value.raw[rows]), UNKNOWN, value.raw[rows])
        due = env.due.get(name)
        present = env.present.get(name)
        valid = env.valid.get(name)
        if due is None:
            return np.full(len(rows), NOT_ASKED)
        d = due[rows]
        p = present[rows] if present is not None else np.zeros(len(rows), dtype=bool)
        v = valid[rows] if valid is not None else np.zeros(len(rows), dtype=bool)
        state = np.where(~d & p, OFF_ROUTE, np.where(~d, NOT_ASKED, np.where(~p, BLANK, INVALID)))
        if name in env.sets:
            chosen, use, _ = env.sets[name]
            bits = (chosen[rows].astype(np.int64) << np.arange(chosen.shape[1], dtype=np.int64)).sum(axis=1)
            return np.where(use[rows], bits.astype(np.float64), state)
        val = env.values.get(name)
        if val is None:
            return np.where(d & p & v, UNKNOWN, state)
        return np.where(d & v, val.raw[rows], state)
