"""Every routing fact the routing checks report, decided in few batched solver calls."""

from __future__ import annotations

import re
from collections.abc import Hashable, Iterable
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import z3

from logiccheck.diagnostics import Span
from logiccheck.graph.deps import reads_of
from logiccheck.logic.encoding import FALSE, TRUE, Conjunct, Encoding, EncodingError, Model, Reading, _and, _not
from logiccheck.logic.solve import Cover, Outer, Queries, Refuted, Stats, uncompacted_models
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire
from logiccheck.model.resolve import pipes_in

COMPARISONS = (n.Compare, n.InList, n.InRange, n.Has)
OTHER_READINGS: tuple[Reading, ...] = ("blank", "code")
GROUP_QUESTIONS = 300  # questions per solver, summed over independent parts (measured: bench_lint.py)
SPLIT_GUARDS = True  # solve groups apart from the stops before them (False: whole, for tests)


@dataclass
class Statement:
    """A place where a condition is read: an entry's own condition, a check's
    `require`, or a section/grid condition. `reach` is who reaches it."""

    key: str  # "entry:INDEX", "require:INDEX" or "block:NAME"
    expr: Any
    at: int
    reach: z3.BoolRef
    span: Span
    entry: Entry | None
    effect: str  # "true": a condition that routes; "value": a derived value

    @property
    def root(self) -> str:
        """The subject questions about this statement start from: its section or grid
        (`block:NAME`, the only statements without an entry), else its entry."""
        if self.key.startswith("block:") or self.entry is None:
            return self.key
        return f"entry:{self.entry.index}"


@dataclass
class RoutingFacts:
    """Answers to every routing question; `models` holds one witness per satisfiable one."""

    cover: Cover = field(default_factory=Cover)

    def possible(self, key: Hashable) -> bool:
        return key in self.cover.models

    def model(self, key: Hashable) -> Model | None:
        return self.cover.models.get(key)


class RoutingAnalysis:
    """Build the encoding, pose every question at once, and explain on demand."""

    def __init__(self, q: Questionnaire) -> None:
        self.q = q
        self.stats = Stats()
        self.enc = Encoding(q)
        self.queries = Queries(self.enc, self.stats)
        self.tainted = self._tainted()
        self.statements = self._statements()
        self.questions: dict[Hashable, z3.BoolRef] = {}
        self.roots: dict[Hashable, list[str]] = {}  # question -> subjects it is about
        self.comparisons: list[tuple[Statement, Any]] = []
        self.pipes: list[tuple[Entry, str, Span, z3.BoolRef]] = []
        self._names_cache: dict[int, list[str]] = {}  # id of an expression of `q` -> names
        self._cones: dict[int, dict[str, None]] = {}  # id of an expression of `q` -> its cone
        self._pose()
        self.graph = self._subject_graph()
        self.facts = RoutingFacts(self._solve())

    # ------------------------------------------------------------ what depends on errors
    def _tainted(self) -> set[int]:
        """Entries whose routing cannot be analysed: a condition failed to resolve, or
        they depend on one that did (reads it, or stand after a stop or inside a skip
        that did)."""
        q = self.q
        bad: set[int] = set(self.enc.unencodable)
        # A block condition is resolved once, with its first statement: when that one is
        # broken, the block's condition may be, so every statement in it is skipped.
        bad_blocks = {
            id(owner)
            for e in q.entries
            if e.index in bad
            for owner, _ in e.context
            if q.section_start.get(owner.name) == e.index
        }
        for entry in q.entries:
            if entry.index in bad:
                continue
            names = [r.name for r in reads_of(q, entry) if r.via != "pipe"]
            hit = any(
                q.symbols[x].index in bad and (q.symbols[x].index < entry.index or q.symbols[x].kind == "sample")
                for x in names
            )
            stops, skips = q.guards(entry)
            hit = hit or any(s.index in bad for s in stops) or any(s.index in bad for s in skips)
            hit = hit or any(id(owner) in bad_blocks for owner, _ in entry.context)
            if hit:
                bad.add(entry.index)
        return bad

    def error_roots(self) -> dict[int, list[int]]:
        """Each entry with an error of its own, with the entries that depend on it."""
        own = sorted(self.enc.unencodable)
        out: dict[int, list[int]] = {i: [] for i in own}
        for i in sorted(self.tainted - set(own)):
            # Blame the nearest earlier root (good enough for a note).
            earlier = [r for r in own if r < i]
            if earlier:
                out[earlier[-1]].append(i)
        return out

    def ok(self, entry: Entry) -> bool:
        return entry.index not in self.tainted

    def block_ok(self, name: str) -> bool:
        """The block's first statement can be analysed (its condition resolved)."""
        start = self.enc.blocks[name].start
        return start < len(self.q.entries) and self.ok(self.q.entries[start])

    # ------------------------------------------------------------ the questions
    def _statements(self) -> list[Statement]:
        q, enc = self.q, self.enc
        out = []
        for block in enc.blocks.values():
            expr = block.context[-1][1] if block.context else None
            if expr is None or not self.block_ok(block.name):
                continue
            # Reaching a block's condition: the outer conditions hold (each read where its
            # block starts), no earlier stop fired, no skip spans the block's start.
            outer = []
            try:
                for o, e in block.context[:-1]:
                    if e is not None:
                        outer.append(enc.truth(e, at=q.section_start.get(o.name, block.start))[0])
            except EncodingError:
                continue
            reach = _and([*outer, self._alive_at(block.start)])
            out.append(Statement(f"block:{block.name}", expr, block.start, reach, expr.span, None, "true"))
        for entry in q.entries:
            if entry.index not in enc._reach or not self.ok(entry):
                continue
            if entry.own is not None:
                out.append(Statement(f"entry:{entry.index}", entry.own, entry.index, enc.reached(entry),
                                     entry.own.span, entry, "true"))
            if entry.kind == "check" and entry.require is not None:
                out.append(Statement(f"require:{entry.index}", entry.require, entry.index, enc.applies(entry),
                                     entry.require.span, entry, "true"))
        for entry in q.entries:
            if entry.kind == "let" and enc.is_own(entry) and self.ok(entry) and entry.own is not None:
                out.append(Statement(f"let:{entry.index}", entry.own, entry.index, TRUE, entry.own.span, entry,
                                     "value"))
        return out

    def _alive_at(self, index: int) -> z3.BoolRef:
        alive, _ = self.enc._alive_before(index)
        skips = [_not(self.enc._fires_term(s)) for s in self.enc._spanning_skips(index)]
        return _and([alive, *skips])

    def _ask(self, key: Hashable, formula: z3.BoolRef, roots: list[str]) -> None:
        self.questions[key] = formula
        self.roots[key] = roots

    def _pose(self) -> None:
        q, enc = self.q, self.enc
        ask = _Asker(self)
        for entry in q.entries:
            if entry.index not in enc._reach or not self.ok(entry):
                continue
            i = entry.index
            ask.roots = [f"entry:{i}"]
            if entry.kind == "item":
                ask[("asked", i)] = enc.asked(entry.name)
                ask[("reached", i)] = enc.reached(entry)
                t, _ = enc.own_truth(entry)
                if entry.own is not None:
                    ask[("not-own", i)] = _and([enc.reached(entry), _not(t)])
            elif entry.kind in ("stop", "check", "skip"):
                ask[("reached", i)] = enc.reached(entry)
                t, _ = enc.own_truth(entry)
                ask[("fires", i)] = enc.fires(entry)
                if entry.own is not None:
                    ask[("not-fires", i)] = _and([enc.reached(entry), _not(t)])
                if entry.kind == "check" and entry.require is not None:
                    ask[("fails", i)] = enc.fails(entry)
                    passes, _ = enc.truth(entry.require, at=entry.index)
                    ask[("passes", i)] = _and([enc.applies(entry), passes])
        for name in enc.blocks:
            if self.block_ok(name):
                ask.roots = [f"block:{name}"]
                ask[("block", name)] = enc.block_reached(name)
        for st in self.statements:
            ask.roots = [st.root]
            if st.key.startswith("block:"):
                ask[("st-reach", st.key)] = st.reach
            try:
                whole_covered = st.key.startswith("entry:") and st.entry is not None \
                    and st.entry.kind in ("item", "stop", "check")
                for node in n.walk(st.expr):
                    # A whole item, stop or check condition is judged by the checks on
                    # those statements (unreachable-item, always-asked, stop-never, ...).
                    if isinstance(node, COMPARISONS) and not (whole_covered and node is st.expr):
                        t, f = enc.truth(node, at=st.at)
                        k = len(self.comparisons)
                        self.comparisons.append((st, node))
                        ask[("cmp-true", k)] = _and([st.reach, t])
                        ask[("cmp-false", k)] = _and([st.reach, f])
                if st.effect == "value":
                    continue  # a derived value is judged where a statement reads it
                ours = enc.truth(st.expr, at=st.at)
                for reading in OTHER_READINGS:
                    # Whether the condition holds (asked, fires, applies, passes).
                    other = enc.truth(st.expr, reading=reading, at=st.at)
                    ask[("sensitive", st.key, reading)] = _and([st.reach, _xor(ours[0], other[0])])
            except EncodingError:
                continue
        for entry in q.entries:
            if not self.ok(entry) or entry.index not in enc._reach:
                continue
            shown = self._shown(entry)
            if shown is None:
                continue
            for text, span in entry.texts():
                for name, pspan in pipes_in(text, span):
                    missing = self._missing(name, entry.index)
                    if missing is None:
                        continue
                    k = len(self.pipes)
                    self.pipes.append((entry, name, pspan, shown))
                    ask.roots = [f"entry:{entry.index}", f"entry:{self.q.symbols[name].index}"]
                    ask[("pipe", k)] = _and([shown, missing])

    # ------------------------------------------------------------ independent parts
    def _subject_graph(self) -> nx.DiGraph:
        """Subject a -> subject b: a's constraints mention b's variables. `guard` edges
        (to the last stop before a statement, to a sample variable) are left out when
        splitting into parts; each part's solver still holds the closure of its
        questions, so every answer stays exact."""
        q, enc = self.q, self.enc
        g = nx.DiGraph()
        stops = q._stops()

        def last_stop(index: int) -> str | None:
            before = [s for s in stops if s.index < index]
            return f"entry:{before[-1].index}" if before else None

        def names_in(expr: Any) -> list[str]:
            return [node.name for node in n.walk(expr) if isinstance(node, (n.Ref, n.Func)) and node.name in q.symbols]

        for entry in q.entries:
            if not enc.is_own(entry):
                continue
            node = f"entry:{entry.index}"
            g.add_node(node)
            for read in reads_of(q, entry):
                target = q.symbols[read.name]
                g.add_edge(node, f"entry:{target.index}", guard=target.kind == "sample")
            stop = last_stop(entry.index)
            if stop is not None:
                g.add_edge(node, stop, guard=True)
            for skip in enc._spanning_skips(entry.index):
                g.add_edge(node, f"entry:{skip.index}")
        for block in enc.blocks.values():
            node = f"block:{block.name}"
            g.add_node(node)
            for owner, expr in block.context:
                if owner is not block.node and owner.name in enc.blocks:
                    g.add_edge(node, f"block:{owner.name}")
                for name in names_in(expr):
                    target = q.symbols[name]
                    g.add_edge(node, f"entry:{target.index}", guard=target.kind == "sample")
            stop = last_stop(block.start)
            if stop is not None:
                g.add_edge(node, stop, guard=True)
            for skip in enc._spanning_skips(block.start):
                g.add_edge(node, f"entry:{skip.index}")
        return g

    def _solve(self, only: tuple[str, ...] | None = None) -> Cover:
        """Split the questions into independent parts and cover each part alone
        (`only`: just the questions of those kinds, for measuring)."""
        g = self.graph
        split = nx.Graph()
        split.add_nodes_from(g.nodes)
        split.add_edges_from((a, b) for a, b, d in g.edges(data=True) if not d.get("guard"))
        part_of: dict[str, int] = {}
        for k, comp in enumerate(nx.connected_components(split)):
            for node in comp:
                part_of[node] = k
        parts: dict[int, dict[Hashable, z3.BoolRef]] = {}
        part_roots: dict[int, set[str]] = {}
        for key, formula in self.questions.items():
            if only is not None and _kind_of(key) not in only:
                continue
            roots = [r for r in self.roots[key] if r in part_of]
            k = part_of[roots[0]] if roots else -1
            parts.setdefault(k, {})[key] = formula
            part_roots.setdefault(k, set()).update(roots)
        self.parts = len(parts)
        # Independent parts are solved a few at a time: one model then answers questions
        # in all of them, which saves more calls than the larger solver costs.
        groups: list[tuple[dict[Hashable, z3.BoolRef], set[str] | None]] = []
        current: dict[Hashable, z3.BoolRef] = {}
        group_roots: set[str] = set()
        for k in sorted(parts, key=lambda k: (k < 0, k)):
            if k < 0:
                groups.append((parts[k], None))
                continue
            current.update(parts[k])
            group_roots |= part_roots[k]
            if len(current) >= GROUP_QUESTIONS:
                groups.append((current, group_roots))
                current, group_roots = {}, set()
        if current:
            groups.append((current, group_roots))
        total = Cover()
        outer = Outer(self.queries)
        with uncompacted_models():
            for questions, subjects in groups:
                got = self._cover(questions, subjects, outer)
                total.models.update(got.models)
                total.unsat.update(got.unsat)
        return total

    def _cover(self, questions: dict[Hashable, z3.BoolRef], roots: set[str] | None, outer: Outer) -> Cover:
        """Cover one group. The stops before it (and sample variables) are behind guard
        edges; their constraints grow with the questionnaire (every earlier stop and
        what decides it), so the group is first solved without them and each model
        joined with one of theirs (see `_split`)."""
        first = lambda key: _kind_of(key) in ("asked", "reached", "block")  # noqa: E731
        if roots is None:
            return self.queries.cover(questions, None, first=first)
        try:
            split = self._split(roots) if SPLIT_GUARDS else None
        except _NoSplit:
            split = None
        if split is not None:
            own, behind, shared = split
            outer.prepare(behind, own)
            try:
                return self.queries.cover(questions, own, first=first, outer=(outer, shared))
            except Refuted:
                pass
        return self.queries.cover(questions, self.closure(roots), first=first)

    def _split(self, roots: set[str]) -> tuple[set[str], set[str], list[z3.ExprRef]] | None:
        """(own, behind, shared) for a group's roots: `own` is what they reach without
        crossing a guard edge, `behind` the rest of their closure, `shared` the variables
        own constraints read of it (a stop's `alive` and reach, a sample variable's
        value). Solving `own` with its models joined to `behind`'s on `shared` is exact
        because nothing behind reads back into `own`; when something does, or nothing is
        behind a guard, None (the group is solved whole)."""
        g = self.graph
        own = self.closure(roots, guards=False)
        # A sample variable's domain is a constraint of its own, reading nothing: kept
        # with the part, so its models take only values the variable can have.
        samples = {b for a in own for b in g.successors(a) if self._is_sample(b)}
        own |= self.closure(samples, guards=False)
        behind = self.closure(roots) - own
        if not behind:
            return None
        shared: dict[int, z3.ExprRef] = {}
        for a in sorted(own):
            for b in g.successors(a):
                if b not in behind:
                    continue
                for v in self._guard_vars(b):
                    shared.setdefault(v.get_id(), v)
        for name in sorted(samples):
            # Stops behind may read them too: both sides take the part's value.
            for v in self._guard_vars(name):
                shared.setdefault(v.get_id(), v)
        for b in behind:
            if any(c in own and c not in samples for c in g.successors(b)):
                return None
        return own, behind, list(shared.values())

    def _is_sample(self, subject: str) -> bool:
        kind, _, rest = subject.partition(":")
        return kind == "entry" and self.q.entries[int(rest)].kind == "sample"

    def _guard_vars(self, subject: str) -> list[z3.ExprRef]:
        """The variables of a guard edge's target that others' constraints read."""
        kind, _, rest = subject.partition(":")
        entry = self.q.entries[int(rest)] if kind == "entry" else None
        if entry is not None and entry.kind == "stop" and entry.index in self.enc._stop_rank:
            return [self.enc._alive[self.enc._stop_rank[entry.index] + 1], self.enc.reached(entry)]
        if entry is not None and entry.kind == "sample":
            name = entry.name
            if name in self.enc._values:
                return [self.enc._values[name]]
            return list(self.enc._options.get(name, {}).values())
        raise _NoSplit(subject)

    def closure(self, roots: Iterable[str], guards: bool = True) -> set[str]:
        """The subjects whose constraints decide questions about `roots` (with
        `guards=False`: those reached without crossing a guard edge)."""
        g = self.graph
        seen = set()
        stack = [r for r in roots if r in g]
        while stack:
            node = stack.pop()
            if node in seen:
                continue
            seen.add(node)
            if guards:
                stack.extend(g.successors(node))
            else:
                stack.extend(b for b, d in g[node].items() if not d.get("guard"))
        return seen

    def _shown(self, entry: Entry) -> z3.BoolRef | None:
        if entry.kind == "item":
            return self.enc.asked(entry.name)
        if entry.kind == "stop":
            return self.enc.fires(entry)
        return None

    def _missing(self, name: str, at: int) -> z3.BoolRef | None:
        """The piped value has none (None: not something the encoding reads)."""
        target = self.q.symbols.get(name)
        if target is None:
            return None
        if target.kind == "sample":
            return FALSE
        if target.index >= at:
            return TRUE
        if target.kind == "let":
            if target.index in self.tainted:
                return None
            try:
                if self.q.let_kinds.get(name) == "bool":
                    t, f = self.enc.truth(target.own, at=target.index)
                    return _not(z3.Or(t, f))
                return _not(self.enc.val(target.own, at=target.index).known)
            except EncodingError:
                return None
        if target.kind == "item":
            if target.index in self.tainted:
                return None
            return _not(self.enc.answered(name))
        return None

    # ------------------------------------------------------------ explanations
    def why_not(self, formula: z3.BoolRef, conj: Conjunct, roots: list[str]) -> list[Conjunct] | None:
        """A minimised unsat core for `formula`, `conj` saying the target itself."""
        return self.queries.core([(formula, conj)], self.closure(roots))

    def witness_for(self, model: Model, names: list[str]) -> dict[str, str]:
        return self.enc.witness(model, names)

    def cone(self, exprs: list[Any], entry: Entry | None = None) -> list[str]:
        """Items and sample variables a finding is about: those the expressions read,
        the statement's section/grid conditions read, and (transitively) what decides
        whether those items were asked. (A set in effect: witnesses sort it.)"""
        roots: list[Any] = [e for e in exprs if e is not None]
        if entry is not None:
            roots.extend(expr for _, expr in entry.context if expr is not None)
            if entry.own is not None:
                roots.append(entry.own)
            stops, skips = self.q.guards(entry)
            for g in [*stops, *skips]:
                if g.own is not None:
                    roots.append(g.own)
        out: dict[str, None] = {}
        for expr in roots:
            out.update(self._cone_of(expr))
        return list(out)

    def _cone_of(self, root: Any) -> dict[str, None]:
        """`cone` of one expression, kept: every finding's cone takes in the conditions
        of all the stops before it."""
        hit = self._cones.get(id(root))
        if hit is not None:
            return hit
        names: dict[str, None] = {}
        stack: list[Any] = [root]
        seen_lets: set[str] = set()
        while stack:
            expr = stack.pop()
            for name in self._names_in(expr):
                target = self.q.symbols[name]
                if target.kind == "let":
                    if name not in seen_lets:
                        seen_lets.add(name)
                        stack.append(target.own)
                    continue
                if name in names:
                    continue
                names[name] = None
                if target.kind == "item":
                    stack.extend(e for e in target.conditions())
        self._cones[id(root)] = names
        return names

    def _names_in(self, expr: Any) -> list[str]:
        """The defined names an expression reads, in walk order (kept: every finding's
        cone walks the conditions of the stops before it, the same few many times)."""
        hit = self._names_cache.get(id(expr))
        if hit is None:
            hit = [node.name for node in n.walk(expr)
                   if isinstance(node, (n.Ref, n.Func)) and node.name in self.q.symbols]
            self._names_cache[id(expr)] = hit
        return hit


def _kind_of(key: Hashable) -> Hashable:
    """The kind of a question: the first part of its key (every key is a tuple)."""
    return key[0] if isinstance(key, tuple) else key


def _xor(a: z3.BoolRef, b: z3.BoolRef) -> z3.BoolRef:
    if a is b or a.get_id() == b.get_id():
        return FALSE
    return z3.Xor(a, b)


class _NoSplit(Exception):
    """A guard edge to something other than a stop or a sample variable."""


class _Asker:
    """`ask[key] = formula` records the question with the current roots."""

    def __init__(self, analysis: RoutingAnalysis) -> None:
        self.analysis = analysis
        self.roots: list[str] = []

    def __setitem__(self, key: Hashable, formula: z3.BoolRef) -> None:
        self.analysis._ask(key, formula, list(self.roots))


def sentence(text: str) -> str:
    """Tidy a conjunct's text for a message."""
    return re.sub(r"\s+", " ", text).strip()
