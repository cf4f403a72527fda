"""The questionnaire as z3 formulas, following the routing semantics (DEVELOPERS.md) and DEVELOPERS.md exactly.

One respondent is one assignment of the variables below:

* per item with a value, `val:NAME` (Int for `single` and `number`, Real for
  `decimal`; for `multi` one Bool `opt:NAME:VALUE` per option) and `ans{tag}:NAME`
  (answered). Values are shared between encodings of two versions of a spec (same
  names, same variables); every routing variable carries the encoding's `tag`.
* per statement `reach{tag}:INDEX` (reached: section/grid conditions true, no earlier
  stop fired, no spanning skip fired) and per item `ask{tag}:NAME` (asked = reached and
  own condition true). `alive{tag}:J` says that none of the first J stops fired.

Conditions are encoded in Kleene's strong three-valued logic as a pair of Bools
(is true, is false); unknown is neither. Every constraint is a named `Conjunct` that
points back at the source, so an unsat core reads as an explanation.
"""

from __future__ import annotations

import bisect
import math
import weakref
from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any, Literal, TypeAlias

import z3

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

Reading = Literal["ours", "blank", "code"]
"""`ours` is the routing semantics (DEVELOPERS.md). `blank`: a missing value is a value unequal to every code, so a
comparison that ours calls unknown is false (`!=`: true) and logic is two-valued.
`code`: a non-response code is its plain number (ordering and arithmetic read it)."""

Truth = tuple[z3.BoolRef, z3.BoolRef]

TRUE = z3.BoolVal(True)
FALSE = z3.BoolVal(False)


class EncodingError(Exception):
    """An expression the encoding cannot read (it failed to resolve)."""


@dataclass(frozen=True)
class Conjunct:
    """One named constraint: `formula` holds for every respondent.

    `kind` is one of domain, multi, answered, required, context, own, asked-if, stop,
    skip, reach-if; `entry` is the statement (or block start) it belongs to; `text`
    says it in the spec's terms, `span` is where."""

    label: str
    formula: z3.BoolRef
    kind: str
    span: Span
    text: str
    entry: int | None = None
    cond: str | None = None  # the condition's source text, where there is one
    subject: str | None = None  # "entry:INDEX" or "block:NAME": what it constrains


@dataclass
class Value:
    """A value expression: `known` (has a value), the value, and whether it is a
    non-response code (ordering and arithmetic on it are unknown in our reading)."""

    known: z3.BoolRef
    val: z3.ArithRef
    nr: z3.BoolRef


@dataclass
class Block:
    """A section or grid, reached like a statement standing at its first entry."""

    name: str
    node: Any
    start: int
    context: list[tuple[Any, Any]] = field(default_factory=list)


def _mk(fn: Any, parts: list[z3.BoolRef]) -> z3.BoolRef:
    # The C API directly: z3.And/z3.Or coerce every argument, which dominates build time.
    ctx = parts[0].ctx
    arr = (z3.Ast * len(parts))()
    for i, p in enumerate(parts):
        arr[i] = p.as_ast()
    return z3.BoolRef(fn(ctx.ref(), len(parts), arr), ctx)


_INTS: dict[int, z3.ArithRef] = {}


def _int(value: int) -> z3.ArithRef:
    hit = _INTS.get(value)
    if hit is None:
        hit = _INTS[value] = z3.IntVal(value)
    return hit


def _eq(a: z3.ArithRef, b: z3.ArithRef) -> z3.BoolRef:
    """a == b through the C API when the sorts agree (z3's `==` coerces in Python)."""
    ref = a.ctx.ref()
    x, y = a.as_ast(), b.as_ast()
    if z3.Z3_get_sort_kind(ref, z3.Z3_get_sort(ref, x)) == z3.Z3_get_sort_kind(ref, z3.Z3_get_sort(ref, y)):
        return z3.BoolRef(z3.Z3_mk_eq(ref, x, y), a.ctx)
    return a == b


def _and(parts: Iterable[z3.BoolRef]) -> z3.BoolRef:
    """Conjunction, folding the constants TRUE and FALSE (compared by identity)."""
    out = []
    for p in parts:
        if p is FALSE:
            return FALSE
        if p is not TRUE:
            out.append(p)
    if not out:
        return TRUE
    return out[0] if len(out) == 1 else _mk(z3.Z3_mk_and, out)


def _or(parts: Iterable[z3.BoolRef]) -> z3.BoolRef:
    out = []
    for p in parts:
        if p is TRUE:
            return TRUE
        if p is not FALSE:
            out.append(p)
    if not out:
        return FALSE
    return out[0] if len(out) == 1 else _mk(z3.Z3_mk_or, out)


def _not(p: z3.BoolRef) -> z3.BoolRef:
    if p is TRUE:
        return FALSE
    if p is FALSE:
        return TRUE
    return z3.BoolRef(z3.Z3_mk_not(p.ctx.ref(), p.as_ast()), p.ctx)


def _implies(a: z3.BoolRef, b: z3.BoolRef) -> z3.BoolRef:
    if a is FALSE or b is TRUE:
        return TRUE
    if a is TRUE:
        return b
    return z3.BoolRef(z3.Z3_mk_implies(a.ctx.ref(), a.as_ast(), b.as_ast()), a.ctx)


class JointModel:
    """A respondent made of two models that agree on the variables both read: `own`,
    of a part's own constraints, and `outer`, of the guards before it (earlier stops,
    sample variables). Reads like a z3 model (`eval`)."""

    def __init__(self, own: z3.ModelRef, outer: z3.ModelRef, behind: frozenset[str]) -> None:
        self.own = own
        self.outer = outer
        self.behind = behind  # the subjects `outer` decides (see `Conjunct.subject`)

    def pick(self, const: z3.ExprRef) -> z3.ModelRef:
        """The model that decides a constant: `own` where it has a value, else `outer`
        (the C API directly: this runs for every name of every witness)."""
        ref = const.ctx.ref()
        decl = z3.Z3_get_app_decl(ref, const.as_ast())
        if z3.Z3_model_has_interp(ref, self.own.model, decl) or not z3.Z3_model_has_interp(ref, self.outer.model, decl):
            return self.own
        return self.outer

    def eval(self, term: z3.ExprRef, model_completion: bool = False) -> z3.ExprRef:
        if _is_constant(term):
            return self.pick(term).eval(term, model_completion=model_completion)
        pairs = []
        for const in _constants(term):
            if self.pick(const) is self.outer:
                pairs.append((const, self.outer.eval(const)))
        return self.own.eval(z3.substitute(term, *pairs) if pairs else term, model_completion=model_completion)


Model: TypeAlias = "z3.ModelRef | JointModel"
"""What `witness` reads: a z3 model, or two joined."""


class Encoding:
    """z3 formulas for one questionnaire.

    Public API (kept stable for other commands):
      `asked(name)`, `answered(name)`, `value(name)`, `option(name, code)`,
      `reached(entry)`, `fires(entry)` (stop/skip), `applies(entry)` / `fails(entry)`
      (check), `block_reached(name)`, `truth(expr, reading=, at=)`, `facts()`,
      `conjuncts`, `solver()`, `witness(model, names)`.
    """

    def __init__(self, q: Questionnaire, *, tag: str = "") -> None:
        self.q = q
        self.tag = tag
        self.conjuncts: list[Conjunct] = []
        self.unencodable: set[int] = set(q.broken)  # entries whose conditions cannot be read
        self.nr_values = sorted({o.value for o in q.nonresponse})
        self.nr_labels = {o.label for o in q.nonresponse}
        self._values: dict[str, z3.ArithRef] = {}
        self._options: dict[str, dict[int, z3.BoolRef]] = {}
        self._answered: dict[str, z3.BoolRef] = {}
        self._asked: dict[str, z3.BoolRef] = {}
        self._reach: dict[int, z3.BoolRef] = {}
        self._alive: list[z3.BoolRef] = []  # _alive[j]: none of the first j stops fired
        self._stop_rank: dict[int, int] = {}  # entry index -> position among stops
        self._truth_cache: dict[tuple[int, str, int], Truth] = {}
        self._nr: dict[str, z3.BoolRef] = {}
        self._order: dict[str, int] = {}
        self._lines: list[str] = []
        self._value_cache: dict[tuple[int, str, int], Value] = {}
        self.blocks: dict[str, Block] = {}
        self._block_reach: dict[str, z3.BoolRef] = {}
        # model -> name -> how the witness says it (models are compared by identity).
        self._stop_at: list[int] = []  # entry index of each stop, in order
        self._spans: dict[int, list[Entry]] = {}
        self._built = False  # every statement's reach variable exists
        self._described: weakref.WeakKeyDictionary[z3.ModelRef, dict[str, str]] = weakref.WeakKeyDictionary()
        self._build()

    # ------------------------------------------------------------ variables
    def _var_name(self, kind: str, name: str) -> str:
        return f"{kind}{self.tag}:{name}"

    def is_own(self, entry: Entry) -> bool:
        """False for a second definition of a name (the first one stands)."""
        return entry.kind not in ("item", "sample", "let") or self.q.symbols.get(entry.name) is entry

    def value(self, name: str) -> z3.ArithRef:
        """The recorded value of a single, number or decimal item or sample variable."""
        return self._values[name]

    def option(self, name: str, code: int) -> z3.BoolRef:
        """Whether option `code` of a multi item is chosen."""
        return self._options[name][code]

    def answered(self, name: str) -> z3.BoolRef:
        """Has a value (for a sample variable: always)."""
        return self._answered[name]

    def asked(self, name: str) -> z3.BoolRef:
        """Asked (for a note: shown)."""
        return self._asked[name]

    def reached(self, entry: Entry | int) -> z3.BoolRef:
        """Context true, no earlier stop fired, no spanning skip fired."""
        index = entry if isinstance(entry, int) else entry.index
        return self._reach[index]

    def block_reached(self, name: str) -> z3.BoolRef:
        """A section or grid is reached: its conditions (and the outer ones) are true at
        its first statement, no earlier stop fired, no spanning skip fired."""
        return self._block_reach[name]

    def fires(self, entry: Entry) -> z3.BoolRef:
        """A stop or skip fires: reached, and its condition true (or none)."""
        t, _ = self.own_truth(entry)
        return _and([self.reached(entry), t])

    def applies(self, entry: Entry) -> z3.BoolRef:
        """A check applies: reached and its `when` true (or none)."""
        return self.fires(entry)

    def fails(self, entry: Entry) -> z3.BoolRef:
        """A check fails: it applies and `require` is false."""
        if entry.require is None:
            return FALSE
        _, f = self.truth(entry.require, at=entry.index)
        return _and([self.applies(entry), f])

    def own_truth(self, entry: Entry, reading: Reading = "ours") -> Truth:
        if entry.own is None:
            return TRUE, FALSE
        return self.truth(entry.own, reading=reading, at=entry.index)

    def facts(self) -> list[z3.BoolRef]:
        """Every constraint of the respondent space (assert them all in a solver)."""
        return [c.formula for c in self.conjuncts]

    def solver(self) -> z3.Solver:
        s = z3.Solver()
        s.add(*self.facts())
        return s

    # ------------------------------------------------------------ building
    def _add(self, formula: z3.BoolRef, kind: str, span: Span, text: str, entry: int | None = None,
             cond: str | None = None, subject: str | None = None) -> None:
        if formula is TRUE:
            return
        label = f"c{self.tag}:{len(self.conjuncts)}"
        if subject is None and entry is not None:
            subject = f"entry:{entry}"
        self.conjuncts.append(Conjunct(label, formula, kind, span, text, entry, cond, subject))

    def source(self, span: Span) -> str:
        """The spec text of a span (one line, or the first line of several)."""
        if not self._lines:
            self._lines.extend(self.q.lines)
        line = self._lines[span.line - 1] if 1 <= span.line <= len(self._lines) else ""
        if span.end_line in (None, span.line) and span.end_column is not None:
            return line[span.column - 1 : span.end_column - 1].strip()
        return line[span.column - 1 :].strip()

    def _build(self) -> None:
        q = self.q
        for entry in q.entries:
            if not self.is_own(entry):
                continue
            if entry.kind == "item":
                self._declare_item(entry)
            elif entry.kind == "sample":
                self._declare_sample(entry)
        # Blocks: sections and grids, in order of their first statement.
        for entry in q.entries:
            for owner, _expr in entry.context:
                if owner.name in self.blocks or owner.name not in q.section_start:
                    continue
                if (q.sections.get(owner.name) or q.grids.get(owner.name)) is not owner:
                    continue
                prefix = []
                for o, e in entry.context:
                    prefix.append((o, e))
                    if o is owner:
                        break
                self.blocks[owner.name] = Block(owner.name, owner, q.section_start[owner.name], prefix)
        stops = [e for e in q.entries if e.kind == "stop"]
        for rank, e in enumerate(stops):
            self._stop_rank[e.index] = rank
        self._alive = [TRUE] + [z3.Bool(self._var_name("alive", str(j + 1))) for j in range(len(stops))]
        for entry in q.entries:
            if entry.kind in ("let", "sample") or not self.is_own(entry):
                continue
            self._reach[entry.index] = z3.Bool(self._var_name("reach", str(entry.index)))
        for block in self.blocks.values():
            self._block_reach[block.name] = z3.Bool(self._var_name("reach", f"block:{block.name}"))
        self._built = True
        # Definitions, in questionnaire order.
        blocks_at: dict[int, list[Block]] = {}
        for block in self.blocks.values():
            blocks_at.setdefault(block.start, []).append(block)
        for entry in q.entries:
            for block in blocks_at.get(entry.index, []):
                word = _block_word(block.node)
                self._define_reach(self._block_reach[block.name], block.start, block.context,
                                   f"{word} `{block.name}`", None, block.node.name_span, f"block:{block.name}")
            if entry.index not in self._reach:
                continue
            self._define_entry(entry)

    def _declare_item(self, entry: Entry) -> None:
        q = self.q
        item: n.Item = entry.stmt
        name = item.name
        kind = item.type.kind
        ask = z3.Bool(self._var_name("ask", name))
        self._asked[name] = ask
        if kind == "note":
            self._answered[name] = FALSE
            return
        ans = z3.Bool(self._var_name("ans", name))
        self._answered[name] = ans
        span = item.name_span
        self._add(_implies(ans, ask), "answered", span, f"`{name}` has an answer only if it is asked", entry.index)
        if item.flags.required:
            self._add(_implies(ask, ans), "required", span, f"`{name}` is `required`: answered whenever asked",
                      entry.index)
        nr = self.nr_values if q.allows_nonresponse(item) else []
        if kind == "single":
            codes = q.item_codes(item)
            values = sorted({o.value for o in codes.options}) if codes else []
            v = z3.Int(f"val:{name}")
            self._values[name] = v
            allowed = sorted(set(values) | set(nr))
            if allowed:
                self._add(_or([_eq(v, _int(a)) for a in allowed]), "domain", span,
                          f"`{name}` takes the codes {', '.join(str(a) for a in allowed)}", entry.index)
        elif kind in ("number", "decimal"):
            lo = item.type.lo if item.type.lo is not None else -math.inf
            hi = item.type.hi if item.type.hi is not None else math.inf
            if kind == "number":
                v = z3.Int(f"val:{name}")
                bounds = []
                if lo != -math.inf:
                    bounds.append(v >= math.ceil(lo))
                if hi != math.inf:
                    bounds.append(v <= math.floor(hi))
            else:
                v = z3.Real(f"val:{name}")
                bounds = []
                if lo != -math.inf:
                    bounds.append(v >= z3.RealVal(str(lo)))
                if hi != math.inf:
                    bounds.append(v <= z3.RealVal(str(hi)))
            self._values[name] = v
            extra = f" or a non-response code ({', '.join(map(str, nr))})" if nr else ""
            self._add(_or([_and(bounds), *[v == c for c in nr]]), "domain", span,
                      f"`{name}` is a number from {lo:g} to {hi:g}{extra}", entry.index)
        elif kind == "multi":
            codes = q.item_codes(item)
            opts = {o.value: z3.Bool(f"opt:{name}:{o.value}") for o in (codes.options if codes else [])}
            self._options[name] = opts
            # Options are read only through `answered`, so they stay free when unanswered.
            self._add(_implies(ans, _or(list(opts.values()))), "multi", span,
                      f"`{name}` has an answer when at least one option is chosen", entry.index)

    def _declare_sample(self, entry: Entry) -> None:
        q = self.q
        stmt: n.Sample = entry.stmt
        name = stmt.name
        self._answered[name] = TRUE
        span = stmt.name_span
        kind = stmt.type.kind
        if kind == "single":
            codes = q.item_codes(stmt)
            values = sorted({o.value for o in codes.options}) if codes else []
            v = z3.Int(f"val:{name}")
            self._values[name] = v
            if values:
                self._add(_or([v == a for a in values]), "domain", span,
                          f"`{name}` takes the codes {', '.join(map(str, values))}", entry.index)
        elif kind in ("number", "decimal"):
            v = z3.Int(f"val:{name}") if kind == "number" else z3.Real(f"val:{name}")
            self._values[name] = v
            bounds = []
            if stmt.type.lo is not None:
                bounds.append(v >= (math.ceil(stmt.type.lo) if kind == "number" else z3.RealVal(str(stmt.type.lo))))
            if stmt.type.hi is not None:
                bounds.append(v <= (math.floor(stmt.type.hi) if kind == "number" else z3.RealVal(str(stmt.type.hi))))
            self._add(_and(bounds), "domain", span, f"`{name}` is a number in its range", entry.index)
        elif kind == "multi":
            codes = q.item_codes(stmt)
            self._options[name] = {o.value: z3.Bool(f"opt:{name}:{o.value}") for o in (codes.options if codes else [])}

    def _alive_before(self, index: int) -> tuple[z3.BoolRef, Entry | None]:
        """No stop before `index` fired (and the last such stop, if any)."""
        stops = self.q._stops()
        if len(self._stop_at) != len(stops):
            self._stop_at = [e.index for e in stops]
        # Bisect, not a scan: this is asked for every statement (stops x statements).
        k = bisect.bisect_left(self._stop_at, index)
        if k == 0:
            return TRUE, None
        last = stops[k - 1]
        return self._alive[self._stop_rank[last.index] + 1], last

    def _spanning_skips(self, index: int) -> list[Entry]:
        """The skips before `index` that land after it (asked for every statement, more
        than once: kept per index once every statement's reach variable exists)."""
        hit = self._spans.get(index)
        if hit is None:
            hit = [
                e for e in self.q._skips()
                if e.index < index and e.skip_target is not None and e.skip_target > index and e.index in self._reach
            ]
            if self._built:
                self._spans[index] = hit
        return hit

    def _define_reach(self, reach: z3.BoolRef, index: int, context: list[tuple[Any, Any]], what: str,
                      entry: int | None, span: Span, subject: str) -> None:
        parts = []
        for owner, expr in context:
            if expr is None:
                continue
            at = self.q.section_start.get(owner.name, index)
            for conj in conjuncts_of(expr):
                t = self._safe_truth(conj, at, entry)
                text = self.source(conj.span)
                self._add(_implies(reach, t), "context", conj.span,
                          f"{what} is only reached when `{text}` ({_block_word(owner)} `{owner.name}`, line {conj.span.line})",
                          entry, text, subject)
                parts.append(t)
        alive, last = self._alive_before(index)
        if last is not None:
            self._add(_implies(reach, alive), "alive", last.stmt.name_span,
                      f"{what} is only reached when no earlier stop fired", entry, None, subject)
            parts.append(alive)
        for skip in self._spanning_skips(index):
            fires = self._fires_term(skip)
            cond = self.source(skip.own.span) if skip.own is not None else None
            when = f" when `{cond}`" if cond else ""
            self._add(_implies(reach, _not(fires)), "skip", skip.stmt.span,
                      f"`skip to {skip.stmt.target}` (line {skip.stmt.span.line}) passes over {what}{when}", entry, cond,
                      subject)
            parts.append(_not(fires))
        self._add(_implies(_and(parts), reach), "reach-if", span, f"{what} is reached whenever that holds", entry,
                  None, subject)

    def _safe_truth(self, expr: Any, at: int, entry: int | None) -> z3.BoolRef:
        try:
            return self.truth(expr, at=at)[0]
        except EncodingError:
            if entry is not None:
                self.unencodable.add(entry)
            return z3.Bool(self._var_name("opaque", str(id(expr))))

    def _fires_term(self, entry: Entry) -> z3.BoolRef:
        if entry.own is None:
            return self.reached(entry)
        return _and([self.reached(entry), self._safe_truth(entry.own, entry.index, entry.index)])

    def _define_entry(self, entry: Entry) -> None:
        stmt = entry.stmt
        label = _entry_word(entry)
        self._define_reach(self.reached(entry), entry.index, entry.context, label, entry.index, entry.span,
                           f"entry:{entry.index}")
        if entry.kind == "item":
            ask = self._asked[entry.name]
            own = TRUE
            if entry.own is not None:
                own = self._safe_truth(entry.own, entry.index, entry.index)
                for conj in conjuncts_of(entry.own):
                    t = self._safe_truth(conj, entry.index, entry.index)
                    text = self.source(conj.span)
                    self._add(_implies(ask, t), "own", conj.span,
                              f"`{entry.name}` is only asked when `{text}` (line {conj.span.line})", entry.index, text,
                              f"entry:{entry.index}")
            self._add(_implies(ask, self.reached(entry)), "asked-reach", entry.span,
                      f"`{entry.name}` is asked only where it is reached", entry.index)
            self._add(_implies(_and([self.reached(entry), own]), ask), "asked-if", entry.span,
                      f"`{entry.name}` is asked whenever it is reached and its condition holds", entry.index)
        elif entry.kind == "stop":
            rank = self._stop_rank[entry.index]
            before, after = self._alive[rank], self._alive[rank + 1]
            fires = self._fires_term(entry)
            cond = self.source(entry.own.span) if entry.own is not None else None
            when = f" when `{cond}`" if cond else ""
            self._add(after == _and([before, _not(fires)]), "stop", stmt.name_span,
                      f"stop `{stmt.name}` (line {stmt.span.line}) ends the interview{when}", entry.index, cond)

    # ------------------------------------------------------------ expressions
    def truth(self, expr: Any, reading: Reading = "ours", at: int | None = None) -> Truth:
        """(is true, is false) of a condition, read at statement position `at` (an item
        at or after `at` has no value yet; default: after the last statement)."""
        if at is None:
            at = len(self.q.entries)
        key = (id(expr), reading, at)
        hit = self._truth_cache.get(key)
        if hit is None:
            hit = self._truth(expr, reading, at)
            self._truth_cache[key] = hit
        return hit

    def _visible(self, name: str, at: int) -> Entry | None:
        entry = self.q.symbols.get(name)
        if entry is None:
            raise EncodingError(f"`{name}` is not defined")
        if entry.kind == "sample" or entry.index < at:
            return entry
        return None  # not yet asked or computed at this point

    def _truth(self, expr: Any, reading: Reading, at: int) -> Truth:
        if isinstance(expr, n.Not):
            t, f = self.truth(expr.operand, reading, at)
            return f, t
        if isinstance(expr, n.And):
            pairs = [self.truth(o, reading, at) for o in expr.operands]
            return _and(p[0] for p in pairs), _or(p[1] for p in pairs)
        if isinstance(expr, n.Or):
            pairs = [self.truth(o, reading, at) for o in expr.operands]
            return _or(p[0] for p in pairs), _and(p[1] for p in pairs)
        if isinstance(expr, n.Ref):
            entry = self._visible(expr.name, at)
            if entry is None:
                return self._unknown(reading)
            if entry.kind != "let" or self.q.let_kinds.get(expr.name) != "bool":
                raise EncodingError(f"`{expr.name}` is not a condition")
            if entry.index in self.q.broken:
                raise EncodingError(f"`{expr.name}` failed to resolve")
            return self.truth(entry.own, reading, entry.index)
        if isinstance(expr, n.Func):
            if expr.func == "count":
                raise EncodingError("`count()` is a number, not a condition")
            entry = self._visible(expr.name, at)
            if entry is None:
                return FALSE, TRUE
            if expr.func == "answered":
                a = self._answered.get(expr.name)
            else:
                a = self._asked.get(expr.name)
            if a is None:
                raise EncodingError(f"`{expr.func}({expr.name})` cannot be read")
            return a, _not(a)
        if isinstance(expr, n.Compare):
            left = self.val(expr.left, reading, at)
            right = self.val(expr.right, reading, at)
            if expr.op in ("=", "!="):
                known = _and([left.known, right.known])
                rel = _eq(left.val, right.val)
            else:
                known = _and([left.known, right.known])
                if reading != "code":
                    known = _and([known, _not(left.nr), _not(right.nr)])
                rel = {"<": left.val < right.val, "<=": left.val <= right.val,
                       ">": left.val > right.val, ">=": left.val >= right.val}[expr.op]
            if expr.op == "!=":
                rel = _not(rel)
                if reading == "blank":
                    t = _or([_not(known), rel])
                    return t, _not(t)
            return self._pair(known, rel, reading)
        if isinstance(expr, n.InList):
            subject = self.val(expr.subject, reading, at)
            pairs = []
            for v in expr.values:
                other = self.val(v, reading, at)
                pairs.append(self._pair(_and([subject.known, other.known]), _eq(subject.val, other.val), reading))
            return _or(p[0] for p in pairs), _and(p[1] for p in pairs)
        if isinstance(expr, n.InRange):
            subject = self.val(expr.subject, reading, at)
            known = subject.known if reading == "code" else _and([subject.known, _not(subject.nr)])
            rel = _and([subject.val >= z3.RealVal(str(expr.lo)), subject.val <= z3.RealVal(str(expr.hi))])
            return self._pair(known, rel, reading)
        if isinstance(expr, n.Has):
            if not isinstance(expr.subject, n.Ref):
                raise EncodingError("`has` needs a multi item")
            entry = self._visible(expr.subject.name, at)
            if entry is None:
                return self._unknown(reading)
            opts = self._options.get(expr.subject.name)
            if opts is None:
                raise EncodingError(f"`{expr.subject.name}` is not a multi item")
            chosen = []
            for v in expr.values:
                if not isinstance(v, n.Code) or v.value not in opts:
                    raise EncodingError("`has` needs option labels")
                chosen.append(opts[v.value])
            rel = _or(chosen) if expr.mode == "any" else _and(chosen)
            return self._pair(self._answered[expr.subject.name], rel, reading)
        raise EncodingError(f"a {getattr(expr, 'kind', type(expr).__name__)} is not a condition")

    def _unknown(self, reading: Reading) -> Truth:
        return (FALSE, TRUE) if reading == "blank" else (FALSE, FALSE)

    @staticmethod
    def _pair(known: z3.BoolRef, rel: z3.BoolRef, reading: Reading) -> Truth:
        t = _and([known, rel])
        if reading == "blank":
            return t, _not(t)
        return t, _and([known, _not(rel)])

    def val(self, expr: Any, reading: Reading = "ours", at: int | None = None) -> Value:
        """A number or code expression (known, value, is a non-response code)."""
        if at is None:
            at = len(self.q.entries)
        key = (id(expr), reading, at)
        hit = self._value_cache.get(key)
        if hit is None:
            hit = self._val(expr, reading, at)
            self._value_cache[key] = hit
        return hit

    def _val(self, expr: Any, reading: Reading, at: int) -> Value:
        if isinstance(expr, n.Num):
            v = _int(int(expr.value)) if expr.is_int else z3.RealVal(str(expr.value))
            return Value(TRUE, v, FALSE)
        if isinstance(expr, n.Code):
            return Value(TRUE, _int(expr.value), TRUE if expr.label in self.nr_labels else FALSE)
        if isinstance(expr, n.Ref):
            entry = self._visible(expr.name, at)
            if entry is None:
                return Value(FALSE, _int(0), FALSE)
            if entry.kind == "let":
                if entry.index in self.q.broken or self.q.let_kinds.get(expr.name) != "number":
                    raise EncodingError(f"`{expr.name}` is not a number")
                return self.val(entry.own, reading, entry.index)
            v = self._values.get(expr.name)
            if v is None:
                raise EncodingError(f"`{expr.name}` has no number or code value")
            nr = self._nr.get(expr.name)
            if nr is None:
                allows = entry.kind == "item" and self.q.allows_nonresponse(entry.stmt)
                nr = _or([v == c for c in self.nr_values]) if allows else FALSE
                self._nr[expr.name] = nr
            return Value(self._answered[expr.name], v, nr)
        if isinstance(expr, n.Func) and expr.func == "count":
            entry = self._visible(expr.name, at)
            opts = self._options.get(expr.name)
            if opts is None:
                raise EncodingError(f"`count({expr.name})` needs a multi item")
            if entry is None:
                return Value(FALSE, _int(0), FALSE)
            total = z3.Sum([z3.If(o, 1, 0) for o in opts.values()]) if opts else _int(0)
            return Value(self._answered[expr.name], total, FALSE)
        if isinstance(expr, n.Neg):
            inner = self.val(expr.operand, reading, at)
            known = inner.known if reading == "code" else _and([inner.known, _not(inner.nr)])
            return Value(known, -inner.val, FALSE)
        if isinstance(expr, n.Arith):
            left = self.val(expr.left, reading, at)
            right = self.val(expr.right, reading, at)
            known = _and([left.known, right.known])
            if reading != "code":
                known = _and([known, _not(left.nr), _not(right.nr)])
            if expr.op == "+":
                v = left.val + right.val
            elif expr.op == "-":
                v = left.val - right.val
            elif expr.op == "*":
                v = left.val * right.val
            else:
                # Real division; dividing by zero gives no value.
                known = _and([known, right.val != 0])
                num = z3.ToReal(left.val) if left.val.is_int() else left.val
                den = z3.ToReal(right.val) if right.val.is_int() else right.val
                v = num / den
            return Value(known, v, FALSE)
        raise EncodingError(f"a {getattr(expr, 'kind', type(expr).__name__)} is not a value")

    # ------------------------------------------------------------ witnesses
    def witness(self, model: Model, names: Iterable[str] | None = None) -> dict[str, str]:
        """A respondent from a model: item = label / number / `blank` / `not asked`,
        sample variable = label. `names` limits and orders it; default: every item
        and sample variable in questionnaire order."""
        order = self._order
        if not order:
            order.update({e.name: e.index for e in self.q.entries if e.kind in ("item", "sample") and self.is_own(e)})
        if names is None:
            wanted = sorted(order, key=order.__getitem__)
        else:
            wanted = sorted({x for x in names if x in order}, key=order.__getitem__)
        return self._described_in(model, wanted)

    def _described_in(self, model: Model, names: list[str]) -> dict[str, str]:
        """`describe` of each name, kept per model: witnesses from one model share most
        names (the stops before a statement and what decides them), and a joined model
        reads the names behind its guards in a model many joined models share."""
        if isinstance(model, JointModel):
            # Each name is read in the model of the side its statement is on.
            behind = [x for x in names if f"entry:{self.q.symbols[x].index}" in model.behind]
            found = self._described_in(model.outer, behind) if behind else {}
            if len(behind) < len(names):
                skip = set(behind)
                found.update(self._described_in(model.own, [x for x in names if x not in skip]))
            return {x: found[x] for x in names}
        known = self._described.get(model)
        if known is None:
            known = self._described[model] = {}
        todo = [x for x in names if x not in known]
        if todo:
            known.update(self._describe_many(model, todo))
        return {name: known[name] for name in names}

    def _describe_many(self, model: z3.ModelRef, names: list[str]) -> dict[str, str]:
        """`describe` for many names, reading values through the C API."""
        out: dict[str, str] = {}
        items = [x for x in names if self.q.symbols[x].kind == "item"]
        asked = dict(zip(items, _bits(model, [self._asked[x] for x in items]), strict=True))
        shown = [x for x in items if asked[x] and self.q.symbols[x].stmt.type.kind != "note"]
        answered = dict(zip(shown, _bits(model, [self._answered[x] for x in shown]), strict=True))
        multis = [x for x in names if self.q.symbols[x].stmt.type.kind == "multi"
                  and (x not in asked or answered.get(x, False))]
        options = [(x, code) for x in multis for code in self._options[x]]
        chosen = dict(zip(options, _bits(model, [self._options[x][c] for x, c in options]), strict=True))
        for name in names:
            entry = self.q.symbols[name]
            kind = entry.stmt.type.kind
            if name in asked:
                if not asked[name]:
                    out[name] = "not asked"
                    continue
                if kind == "note":
                    out[name] = "shown"
                    continue
                if not answered[name]:
                    out[name] = "blank"
                    continue
                if kind == "text":
                    out[name] = "(some text)"
                    continue
            if kind == "multi":
                codes = self.q.item_codes(entry.stmt)
                labels = [o.label for o in (codes.options if codes else []) if chosen[(name, o.value)]]
                out[name] = ", ".join(labels) if labels else "none"
                continue
            out[name] = self._label(model, entry)
        return out

    def describe(self, model: Model, name: str) -> str:
        entry = self.q.symbols[name]
        if entry.kind == "item":
            if not z3.is_true(model.eval(self._asked[name], model_completion=True)):
                return "not asked"
            if entry.stmt.type.kind == "note":
                return "shown"
            if not z3.is_true(model.eval(self._answered[name], model_completion=True)):
                return "blank"
            if entry.stmt.type.kind == "text":
                return "(some text)"
        return self._label(model, entry)

    def _label(self, model: z3.ModelRef, entry: Entry) -> str:
        name = entry.name
        kind = entry.stmt.type.kind
        if kind == "multi":
            codes = self.q.item_codes(entry.stmt)
            chosen = [o.label for o in (codes.options if codes else [])
                      if z3.is_true(model.eval(self._options[name][o.value], model_completion=True))]
            return ", ".join(chosen) if chosen else "none"
        if name not in self._values:
            return "?"
        raw = _value(model, self._values[name])
        if kind == "single":
            number = raw.as_long()
            codes = self.q.item_codes(entry.stmt)
            options = list(codes.options if codes else [])
            if entry.kind == "item" and self.q.allows_nonresponse(entry.stmt):
                options += self.q.nonresponse
            for o in options:
                if o.value == number:
                    return o.label
            return str(number)
        if z3.is_int_value(raw):
            number = raw.as_long()
        else:
            frac = raw.as_fraction()
            number = float(frac) if frac.denominator != 1 else int(frac)
        if entry.kind == "item" and self.q.allows_nonresponse(entry.stmt):
            for o in self.q.nonresponse:
                if o.value == number:
                    return o.label
        return f"{number:g}" if isinstance(number, float) else str(number)


def conjuncts_of(expr: Any) -> list[Any]:
    """The top-level `and` parts of a condition (Kleene: true exactly when all are)."""
    if isinstance(expr, n.And):
        out = []
        for o in expr.operands:
            out.extend(conjuncts_of(o))
        return out
    return [expr]


def _block_word(owner: Any) -> str:
    return "grid" if isinstance(owner, n.Grid) else "section"


def _entry_word(entry: Entry) -> str:
    if entry.kind == "item":
        return f"`{entry.name}`"
    if entry.kind == "check":
        return f"check `{entry.name}`"
    if entry.kind == "stop":
        return f"stop `{entry.name}`"
    if entry.kind == "skip":
        return f"`skip to {entry.stmt.target}`"
    return f"`{entry.name}`"


def _bits(model: z3.ModelRef, terms: list[z3.BoolRef]) -> list[bool]:
    """The truth of Boolean variables (or the constants TRUE and FALSE) in `model`, as
    `model.eval` with model completion reads them: a variable the model leaves open is
    false. Through the C API: each Python-level call into z3 costs more than the work."""
    out: list[bool] = []
    for t in terms:
        if t is TRUE or t is FALSE:
            out.append(t is TRUE)
            continue
        ref = t.ctx.ref()
        value = z3.Z3_model_get_const_interp(ref, model.model, z3.Z3_get_app_decl(ref, t.as_ast()))
        out.append(bool(value) and z3.Z3_get_bool_value(ref, value) == z3.Z3_L_TRUE)
    return out


def _value(model: z3.ModelRef, var: z3.ExprRef) -> z3.ExprRef:
    """`model.eval(var, model_completion=True)` for a variable the model gives a value,
    without z3's evaluator (the usual case, for every name of every witness)."""
    ref = var.ctx.ref()
    value = z3.Z3_model_get_const_interp(ref, model.model, z3.Z3_get_app_decl(ref, var.as_ast()))
    if value:
        return z3.z3._to_expr_ref(value, var.ctx)
    return model.eval(var, model_completion=True)


def _is_constant(term: z3.ExprRef) -> bool:
    """An uninterpreted constant (a variable), read through the C API."""
    ref = term.ctx.ref()
    ast = term.as_ast()
    if z3.Z3_get_ast_kind(ref, ast) != z3.Z3_APP_AST or z3.Z3_get_app_num_args(ref, ast) != 0:
        return False
    return bool(z3.Z3_get_decl_kind(ref, z3.Z3_get_app_decl(ref, ast)) == z3.Z3_OP_UNINTERPRETED)


def _constants(term: z3.ExprRef) -> list[z3.ExprRef]:
    """The uninterpreted constants in a term, each once (through the C API)."""
    ctx = term.ctx
    ref = ctx.ref()
    out: list[z3.ExprRef] = []
    seen: set[int] = set()
    stack = [term.as_ast()]
    while stack:
        ast = stack.pop()
        aid = z3.Z3_get_ast_id(ref, ast)
        if aid in seen:
            continue
        seen.add(aid)
        if z3.Z3_get_ast_kind(ref, ast) != z3.Z3_APP_AST:
            continue
        n_args = z3.Z3_get_app_num_args(ref, ast)
        if n_args == 0:
            if z3.Z3_get_decl_kind(ref, z3.Z3_get_app_decl(ref, ast)) == z3.Z3_OP_UNINTERPRETED:
                out.append(z3.z3._to_expr_ref(ast, ctx))
            continue
        stack.extend(z3.Z3_get_app_arg(ref, ast, i) for i in range(n_args))
    return out
