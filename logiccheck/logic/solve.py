"""Solver queries on an `Encoding`: batched satisfiability and explained unsat cores."""

from __future__ import annotations

from collections.abc import Callable, Hashable, Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field

import z3

from logiccheck.logic.encoding import FALSE, Conjunct, Encoding, JointModel, Model, _implies, _or

# Conjunct kinds that say something in the spec's terms; the others are plumbing.
TELLING = ("domain", "required", "context", "own", "stop", "skip", "target")


@dataclass
class Stats:
    calls: int = 0


@dataclass
class Cover:
    """Which keys have a satisfying respondent (`models[key]`) and which have none."""

    models: dict[Hashable, Model] = field(default_factory=dict)
    unsat: set[Hashable] = field(default_factory=set)


class Refuted(Exception):
    """A part's model does not extend to the guards before it: decide it whole."""


class Outer:
    """The guards' side of a split part: whether values of the shared variables extend
    to the constraints of the subjects behind the guards, with a model when they do.

    One solver serves part after part while what it holds stays apart from the part's
    own subjects (the subjects behind guards grow along the questionnaire: the stops so
    far); the constraints of a closed set of subjects never rule out values of others."""

    def __init__(self, queries: Queries) -> None:
        self.queries = queries
        self.solver: z3.Solver | None = None
        self.held: set[str] = set()
        self.behind: frozenset[str] = frozenset()
        self.found: dict[tuple[tuple[int, int], ...], z3.ModelRef | None] = {}

    def prepare(self, subjects: set[str], own: set[str]) -> None:
        if self.solver is None or self.held & own:
            self.solver = z3.SimpleSolver()
            self.held = set()
        new = subjects - self.held
        _assert(self.solver, [c.formula for c in self.queries.conjuncts_of(new)])
        self.held |= new
        self.behind = frozenset(self.held)
        self.found = {}

    def extend(self, values: list[tuple[z3.ExprRef, z3.ExprRef]]) -> z3.ModelRef | None:
        assert self.solver is not None
        key = tuple((var.get_id(), value.get_id()) for var, value in values)
        if key in self.found:
            return self.found[key]
        self.queries.stats.calls += 1
        fixed = [_eq_value(var, value) for var, value in values]
        model = self.solver.model() if self.solver.check(*fixed) == z3.sat else None
        self.found[key] = model
        return model


class Queries:
    """One incremental solver over every constraint of an encoding.

    `cover` decides many questions "is there a respondent with F?" at once: it asks for
    the disjunction of the open ones, marks every question the model satisfies, and
    repeats; when the disjunction is unsatisfiable, the rest have no respondent."""

    def __init__(self, enc: Encoding, stats: Stats | None = None) -> None:
        self.enc = enc
        self.stats = stats or Stats()
        self._lits: dict[str, Conjunct] = {c.label: c for c in enc.conjuncts}
        self._rank: dict[str, int] = {c.label: i for i, c in enumerate(enc.conjuncts)}
        self.phase: int | None = 5  # random phases: models spread over many branches
        self.relevancy = 0
        self.by_subject: dict[str | None, list[Conjunct]] = {}
        for c in enc.conjuncts:
            self.by_subject.setdefault(c.subject, []).append(c)

    def conjuncts_of(self, subjects: Iterable[str] | None) -> list[Conjunct]:
        """The constraints of some subjects (all of them for None). Checking a question
        against the constraints of the subjects it depends on is exact: every other
        constraint defines a variable from others or can be met by leaving an item
        unanswered."""
        if subjects is None:
            return list(self.enc.conjuncts)
        out: list[Conjunct] = []
        # Sorted: subjects often come as a set, and the order constraints are asserted
        # in steers which model z3 finds, so set order would change witnesses per run.
        for subject in sorted(s for s in subjects if s is not None):
            out.extend(self.by_subject.get(subject, ()))
        return out

    def check(self, *formulas: z3.BoolRef, subjects: Iterable[str] | None = None) -> z3.ModelRef | None:
        """One question against the constraints of `subjects` (all for None)."""
        self.stats.calls += 1
        s = z3.Solver()
        _assert(s, [c.formula for c in self.conjuncts_of(subjects)])
        if s.check(*formulas) == z3.sat:
            return s.model()
        return None

    def cover(self, questions: dict[Hashable, z3.BoolRef], subjects: Iterable[str] | None = None,
              first: Callable[[Hashable], bool] | None = None,
              outer: tuple[Outer, list[z3.ExprRef]] | None = None) -> Cover:
        """Decide every question with few calls, in two phases.

        1. Ask for as many open questions at once as possible (a conjunction of
           assumptions); when that has no respondent, the unsat core names the
           conflicting questions: set one aside and ask again. A question whose core is
           itself alone has no respondent. Each model answers every question it
           satisfies.
        2. What is still open is asked as one disjunction until that has no respondent
           (all remaining are impossible) -- few calls when most are impossible.

        With `outer` (the guards' side and the variables `subjects` share with it),
        `subjects` leave the guards out: an impossible question stays impossible with
        more constraints, and each model is joined with one of the guards' that agrees
        on the shared variables; when there is none, `Refuted` is raised."""
        out = Cover()
        pending: dict[Hashable, z3.BoolRef] = {}
        for key, f in questions.items():
            if f is FALSE:
                out.unsat.add(key)
            else:
                pending[key] = f
        # The same formula asked twice (z3 shares equal terms) is decided once.
        alias: dict[Hashable, Hashable] = {}
        by_id: dict[int, Hashable] = {}
        for key in list(pending):
            fid = pending[key].get_id()
            if fid in by_id:
                alias[key] = by_id[fid]
                del pending[key]
            else:
                by_id[fid] = key
        keys = list(pending)
        names = [f"q!{i}" for i in range(len(keys))]
        lits = {key: z3.Bool(name) for key, name in zip(keys, names, strict=True)}
        by_lit = dict(zip(names, keys, strict=True))
        # A fresh solver per batch of questions: one that kept the learnt state of
        # earlier batches was several times slower.
        self.solver = z3.SimpleSolver()
        if self.phase is not None:
            self.solver.set("phase_selection", self.phase)
        # Relevancy propagation costs more than it saves on these many small Boolean
        # definitions (measured with benchmarks/bench_routing.py).
        self.solver.set("relevancy", self.relevancy)
        _assert(self.solver, [c.formula for c in self.conjuncts_of(subjects)])
        self.solver.push()
        try:
            _assert(self.solver, [_implies(lits[key], pending[key]) for key in keys])
            reader = _Reader(pending)

            def mark(model: z3.ModelRef) -> None:
                found: Model = model
                if outer is not None:
                    side, shared = outer
                    # Only what the part's model gives a value: the others the part does
                    # not read (a stop's reach variable, read behind the guard only).
                    values = [(v, model.get_interp(v.decl())) for v in shared]
                    joined = side.extend([(v, value) for v, value in values if value is not None])
                    if joined is None:
                        raise Refuted
                    found = JointModel(model, joined, side.behind)
                for key in reader.true_in(model, pending):
                    out.models[key] = found
                    del pending[key]

            # Phase 1 on the questions marked `first` (e.g. reachability): most of them
            # hold together, so one conjunction usually answers them all.
            batch = [k for k in keys if first is not None and first(k)]
            budget = 6
            while batch and budget > 0:
                budget -= 1
                self.stats.calls += 1
                if _check(self.solver, [lits[k] for k in batch]) == z3.sat:
                    mark(self.solver.model())
                    break
                core = [by_lit[str(c)] for c in self.solver.unsat_core() if str(c) in by_lit]
                if len(core) == 1:
                    out.unsat.add(core[0])
                    pending.pop(core[0], None)
                drop = set(core if len(core) <= 1 else core[len(core) // 2 :])
                batch = [k for k in batch if k not in drop and k in pending]
            while pending:
                self.stats.calls += 1
                if self.solver.check(_or([lits[k] for k in pending])) != z3.sat:
                    out.unsat.update(pending)
                    break
                mark(self.solver.model())
        finally:
            self.solver.pop()
        for key, other in alias.items():
            if other in out.models:
                out.models[key] = out.models[other]
            else:
                out.unsat.add(key)
        return out

    # ------------------------------------------------------------ explanations
    def core(self, targets: Iterable[tuple[z3.BoolRef, Conjunct]], subjects: Iterable[str] | None = None,
             limit: int = 40) -> list[Conjunct] | None:
        """A minimised set of named constraints that, with the targets, has no
        respondent (None if there is one). Targets are (formula, how to say it)."""
        s = z3.Solver()
        conjuncts = self.conjuncts_of(subjects)
        named = [z3.Bool(c.label) for c in conjuncts]
        _assert(s, [_implies(lit, c.formula) for lit, c in zip(named, conjuncts, strict=True)])
        s.push()
        try:
            own: dict[str, Conjunct] = {}
            for i, (formula, conj) in enumerate(targets):
                lit = z3.Bool(f"target!{i}")
                own[str(lit)] = conj
                s.add(z3.Implies(lit, formula))
            lits = [z3.Bool(label) for label in own] + named
            self.stats.calls += 1
            if _check(s, lits) != z3.unsat:
                return None
            core = list(s.unsat_core())
            # Deletion-based minimisation: drop each literal the core does not need.
            if len(core) <= limit:
                i = 0
                while i < len(core):
                    trial = core[:i] + core[i + 1 :]
                    self.stats.calls += 1
                    if _check(s, trial) == z3.unsat:
                        core = list(s.unsat_core()) if len(s.unsat_core()) < len(trial) else trial
                    else:
                        i += 1
            # In the spec's order (targets first), not z3's: the order of a core follows
            # term ids, which any earlier solver work shifts.
            names = sorted((str(lit) for lit in core), key=lambda x: (x not in own, self._rank.get(x, 0), x))
            return [own.get(name) or self._lits[name] for name in names]
        finally:
            s.pop()


@contextmanager
def uncompacted_models() -> Iterator[None]:
    """Models without compaction (merging function tables), a global z3 setting, for
    the duration: ours have no functions, and compacting took a third of each call
    (measured with benchmarks/bench_lint.py)."""
    before = z3.get_param("model.compact")
    z3.set_param("model.compact", False)
    try:
        yield
    finally:
        z3.set_param("model.compact", before)


def _check(solver: z3.Solver, assumptions: list[z3.BoolRef]) -> z3.CheckSatResult:
    """`solver.check(*assumptions)` through the C API: `check` converts every literal in Python."""
    arr = (z3.Ast * len(assumptions))()
    for i, a in enumerate(assumptions):
        arr[i] = a.as_ast()
    return z3.CheckSatResult(z3.Z3_solver_check_assumptions(solver.ctx.ref(), solver.solver, len(assumptions), arr))


def add_all(solver: z3.Solver, formulas: list[z3.BoolRef]) -> None:
    """`solver.add(*formulas)` without its Python conversions (thousands of constraints)."""
    _assert(solver, formulas)


def _assert(solver: z3.Solver, formulas: list[z3.BoolRef]) -> None:
    # The C API directly: Solver.add checks and converts every argument in Python.
    ref = solver.ctx.ref()
    for f in formulas:
        z3.Z3_solver_assert(ref, solver.solver, f.as_ast())


class _Reader:
    """Reads the truth of many formulas in a model with one evaluation per chunk."""

    CHUNK = 256

    def __init__(self, formulas: dict[Hashable, z3.BoolRef]) -> None:
        keys = list(formulas)
        self.chunks: list[tuple[list[Hashable], z3.BitVecRef]] = []
        for i in range(0, len(keys), self.CHUNK):
            part = keys[i : i + self.CHUNK]
            ctx = formulas[part[0]].ctx
            one, zero = z3.BitVecVal(1, 1), z3.BitVecVal(0, 1)
            ref = ctx.ref()
            term = None
            for k in part:
                # Wrap each new term at once: the wrapper holds the reference count.
                bit = z3.BitVecRef(z3.Z3_mk_ite(ref, formulas[k].as_ast(), one.as_ast(), zero.as_ast()), ctx)
                term = bit if term is None else z3.BitVecRef(z3.Z3_mk_concat(ref, term.as_ast(), bit.as_ast()), ctx)
            self.chunks.append((part, term))

    def true_in(self, model: z3.ModelRef, open_keys: dict[Hashable, z3.BoolRef]) -> list[Hashable]:
        out = []
        for part, term in self.chunks:
            if not any(k in open_keys for k in part):
                continue
            value = model.eval(term, model_completion=True).as_long()
            width = len(part)
            for j, k in enumerate(part):
                if k in open_keys and (value >> (width - 1 - j)) & 1:
                    out.append(k)
        return out


def _eq_value(var: z3.ExprRef, value: z3.ExprRef) -> z3.BoolRef:
    if z3.is_bool(var):
        return var if z3.is_true(value) else z3.Not(var)
    return var == value

