"""Who is asked each item, in two versions of a spec, over one shared respondent.

Both versions are encoded by `logic.Encoding` (tags `@old` and `@new`: routing
variables apart). A respondent is the answers they would give if asked, shared by both:

* the new version's value variables are renamed apart, then linked to the old ones item
  by item (a renamed item to its old name). Codes are linked **by label**: a recode (the
  same answer stored under another number) does not change who is asked, and is reported
  separately; ordering comparisons still use each version's own values.
* the respondent's answer space is the union of both versions' (an option or range only
  one version has is still a possible answer), so the domain constraints of linked items
  are replaced by their union.
* an item asked in both versions is answered in both or in neither.

Two versions route an item alike when no respondent is asked it in one and not in the
other; the solver proves that, or gives such a respondent.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import z3

from logiccheck.logic import Encoding, EncodingError
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

NO_ANSWER = "(no answer)"
ANSWERED = "(answered)"


@dataclass
class RoutingResult:
    """`same` proven, or a witness respondent (`witness`) with where they are asked."""

    same: bool
    witness: dict[str, str] | None = None
    asked_old: bool | None = None
    asked_new: bool | None = None
    error: str | None = None


def _valued(q: Questionnaire) -> dict[str, Entry]:
    """Items and sample variables that hold a value, by name (first definition)."""
    out: dict[str, Entry] = {}
    for e in q.entries:
        if e.kind in ("item", "sample") and e.stmt.type.kind != "note" and q.symbols.get(e.name) is e:
            out[e.name] = e
    return out


def _labels(q: Questionnaire, e: Entry) -> dict[str, int]:
    codes = q.item_codes(e.stmt)
    out = {o.label: o.value for o in (codes.options if codes else [])}
    if e.kind == "item" and q.allows_nonresponse(e.stmt):
        out.update({o.label: o.value for o in q.nonresponse})
    return out


def _refs(expr: Any) -> set[str]:
    names = set()
    for node in n.walk(expr):
        if isinstance(node, (n.Ref, n.Func)):
            names.add(node.name)
    return names


def support(q: Questionnaire, start: str | Entry) -> set[str]:
    """Every name whose value or routing can decide whether `start` (a name, or a
    statement such as a stop or check) is asked, fires or fails."""
    seen: set[str] = set()
    todo: list[str | Entry] = [start]
    while todo:
        current = todo.pop()
        entry = q.symbols.get(current) if isinstance(current, str) else current
        if entry is None:
            continue
        if isinstance(current, str):
            if current in seen:
                continue
            seen.add(current)
        exprs = list(entry.conditions()) if entry.kind != "let" else [entry.own]
        if entry.require is not None:
            exprs.append(entry.require)
        stops, skips = q.guards(entry)
        for guard in (*stops, *skips):
            exprs.extend(guard.conditions())
        for expr in exprs:
            todo.extend(_refs(expr) - seen)
    return seen


def cone(q: Questionnaire, start: Entry) -> set[int]:
    """The statements whose constraints can bear on `start`: those its conditions read
    (and what theirs read), and the stops and skips before each of them."""
    seen: set[int] = set()
    todo = [start]
    while todo:
        entry = todo.pop()
        if entry.index in seen:
            continue
        seen.add(entry.index)
        exprs = list(entry.conditions()) if entry.kind != "let" else [entry.own]
        if entry.require is not None:
            exprs.append(entry.require)
        stops, skips = q.guards(entry)
        todo.extend(g for g in (*stops, *skips) if g.index not in seen)
        for expr in exprs:
            for name in _refs(expr):
                ref = q.symbols.get(name)
                if ref is not None and ref.index not in seen:
                    todo.append(ref)
    return seen


class CrossVersion:
    """Both versions over one respondent; `compare(old_name, new_name)` per item."""

    def __init__(self, old: Questionnaire, new: Questionnaire, new_to_old: dict[str, str]) -> None:
        self.q_old, self.q_new = old, new
        self.enc_old = Encoding(old, tag="@old")
        self.enc_new = Encoding(new, tag="@new")
        self.new_to_old = new_to_old
        self.old_to_new = {was: now for now, was in new_to_old.items()}
        self._subst: list[tuple[Any, Any]] = []
        self._renamed_vars: dict[str, Any] = {}
        self._label_vars: dict[str, tuple[Any, list[str]]] = {}
        self._build()

    # ------------------------------------------------------------ the shared respondent
    def _apart(self, var: Any) -> Any:
        """The new version's copy of a value variable."""
        key = var.decl().name()
        if key not in self._renamed_vars:
            fresh = z3.Const(f"{key}@new", var.sort())
            self._renamed_vars[key] = fresh
            self._subst.append((var, fresh))
        return self._renamed_vars[key]

    def _build(self) -> None:
        old_vals, new_vals = _valued(self.q_old), _valued(self.q_new)
        # Rename every value and option variable of the new version apart.
        for name, e in new_vals.items():
            kind = e.stmt.type.kind
            if kind in ("single", "number", "decimal"):
                self._apart(self.enc_new.value(name))
            elif kind == "multi":
                for value in _labels(self.q_new, e).values():
                    self._apart(self.enc_new.option(name, value))
        linked_old: set[int] = set()
        linked_new: set[int] = set()
        self._by_key: dict[str, list[Any]] = {}
        for new_name, ne in new_vals.items():
            old_name = self.new_to_old.get(new_name, new_name)
            oe = old_vals.get(old_name)
            if oe is None or oe.stmt.type.kind != ne.stmt.type.kind or oe.kind != ne.kind:
                continue  # nothing to link: a new item, or a type change
            links = self._by_key.setdefault(old_name, [])
            kind = ne.stmt.type.kind
            if kind == "text":
                pass
            elif kind == "multi":
                lo, ln = _labels(self.q_old, oe), _labels(self.q_new, ne)
                for label in set(lo) & set(ln):
                    links.append(self.enc_old.option(old_name, lo[label]) == self.new_var_option(new_name, ln[label]))
            elif kind == "single":
                lo, ln = _labels(self.q_old, oe), _labels(self.q_new, ne)
                labels = list(dict.fromkeys([*lo, *ln]))
                choice = z3.Int(f"label:{old_name}")
                self._label_vars[old_name] = (choice, labels)
                links.append(z3.And(choice >= 0, choice < len(labels)))
                for table, var in ((lo, self.enc_old.value(old_name)), (ln, self.new_var_value(new_name))):
                    # A label this version lacks maps to a value it does not use.
                    spare = min([*table.values(), 0]) - 1
                    expr: Any = z3.IntVal(spare)
                    for i, label in enumerate(labels):
                        expr = z3.If(choice == i, table.get(label, spare), expr)
                    links.append(var == expr)
                linked_old.add(oe.index)
                linked_new.add(ne.index)
            else:
                links.extend(self._number_links(oe, ne, old_name, new_name))
                linked_old.add(oe.index)
                linked_new.add(ne.index)
            if ne.kind == "item":
                ask_o, ask_n = self.enc_old.asked(old_name), self.enc_new.asked(new_name)
                ans_o, ans_n = self.enc_old.answered(old_name), self.enc_new.answered(new_name)
                links.append(z3.Implies(z3.And(ask_o, ask_n), ans_o == ans_n))
        new_formulas = self._all_to_new([c.formula for c in self.enc_new.conjuncts])
        domains_old = {c.entry: c.formula for c in self.enc_old.conjuncts if c.kind == "domain"}
        domains_new = {c.entry: f for c, f in zip(self.enc_new.conjuncts, new_formulas, strict=True) if c.kind == "domain"}
        # Facts by the statement they belong to (None: a section's or grid's own reach),
        # so a query asserts only those that can bear on it.
        self._by_entry: dict[tuple[str, int | None], list[Any]] = {}
        for c in self.enc_old.conjuncts:
            if not (c.kind == "domain" and c.entry in linked_old):
                self._by_entry.setdefault(("old", c.entry), []).append(c.formula)
        for c, formula in zip(self.enc_new.conjuncts, new_formulas, strict=True):
            if not (c.kind == "domain" and c.entry in linked_new):
                self._by_entry.setdefault(("new", c.entry), []).append(formula)
        # Linked numbers: the union of both ranges (singles are bounded by their label).
        for new_name, ne in new_vals.items():
            old_name = self.new_to_old.get(new_name, new_name)
            oe = old_vals.get(old_name)
            if oe is None or ne.index not in linked_new or ne.stmt.type.kind == "single":
                continue
            parts = [d for d in (domains_old.get(oe.index), domains_new.get(ne.index)) if d is not None]
            if parts:
                self._by_key.setdefault(old_name, []).append(z3.Or(parts))

    def _number_links(self, oe: Entry, ne: Entry, old_name: str, new_name: str) -> list[Any]:
        """One answer in both versions of a number item. A non-response answer is linked
        by its label, as codes are: `dk` recoded from 98 to 97 is the same answer."""
        vo, vn = self.enc_old.value(old_name), self.new_var_value(new_name)
        nr_old = {o.label: o.value for o in self.q_old.nonresponse} if self.q_old.allows_nonresponse(oe.stmt) else {}
        nr_new = {o.label: o.value for o in self.q_new.nonresponse} if self.q_new.allows_nonresponse(ne.stmt) else {}
        if nr_old == nr_new:
            return [vo == vn]
        out: list[Any] = []
        for label in sorted(set(nr_old) & set(nr_new)):
            out.append((vo == nr_old[label]) == (vn == nr_new[label]))
        special_old = z3.Or([vo == v for v in nr_old.values()]) if nr_old else z3.BoolVal(False)
        special_new = z3.Or([vn == v for v in nr_new.values()]) if nr_new else z3.BoolVal(False)
        # A substantive answer is the same number in both; a non-response answer in one
        # version is never a substantive answer in the other.
        out.append(z3.Implies(z3.Not(special_old), z3.Or(vo == vn, special_new)))
        out.append(z3.Implies(z3.Not(special_new), z3.Or(vo == vn, special_old)))
        out.append(z3.Implies(z3.And(z3.Not(special_old), z3.Not(special_new)), vo == vn))
        out.append(z3.Implies(special_old, z3.Or(special_new, z3.Not(self.enc_new.answered(new_name)))))
        out.append(z3.Implies(special_new, z3.Or(special_old, z3.Not(self.enc_old.answered(old_name)))))
        return out

    def _facts_for(self, e_old: Entry, e_new: Entry) -> list[Any]:
        cone_old, cone_new = cone(self.q_old, e_old), cone(self.q_new, e_new)
        keys = {self.q_old.entries[i].name for i in cone_old} | {
            self.new_to_old.get(self.q_new.entries[i].name, self.q_new.entries[i].name) for i in cone_new
        }
        # Facts without a statement define only the sections' and grids' own reach
        # variables, which no item, stop or check constraint reads: left out.
        out: list[Any] = []
        for i in sorted(cone_old):
            out.extend(self._by_entry.get(("old", i), []))
        for i in sorted(cone_new):
            out.extend(self._by_entry.get(("new", i), []))
        for key in sorted(keys):
            out.extend(self._by_key.get(key, []))
        return out

    def new_var_value(self, name: str) -> Any:
        return self._apart(self.enc_new.value(name))

    def new_var_option(self, name: str, value: int) -> Any:
        return self._apart(self.enc_new.option(name, value))

    def _all_to_new(self, formulas: list[Any]) -> list[Any]:
        # One substitution over all of them: z3's Python layer checks every pair per call.
        if not self._subst or not formulas:
            return list(formulas)
        marks = [z3.Bool(f"__part{i}") for i in range(len(formulas))]
        bundle = z3.And([m == f for m, f in zip(marks, formulas, strict=True)])
        done = z3.substitute(bundle, *self._subst)
        parts = done.children() if z3.is_and(done) else [done]
        assert len(parts) == len(formulas)
        return [p.arg(1) for p in parts]

    # ------------------------------------------------------------ queries
    # ------------------------------------------------------------ queries
    def _opaque(self, q: Questionnaire, enc: Encoding, start: Entry) -> str | None:
        if start.index in enc.unencodable:
            return "its conditions cannot be read"
        for dep in support(q, start):
            entry = q.symbols.get(dep)
            if entry is not None and entry.index in enc.unencodable:
                return f"the conditions of `{dep}` cannot be read"
        guards = q.guards(start)
        if any(g.index in enc.unencodable for g in (*guards[0], *guards[1])):
            return "an earlier stop or skip cannot be read"
        return None

    def compare(self, old_name: str, new_name: str, timeout_ms: int = 20000) -> RoutingResult:
        """Is the item asked of the same respondents in both versions?"""
        e_old, e_new = self.q_old.symbols[old_name], self.q_new.symbols[new_name]
        return self._query(e_old, e_new, self.enc_old.asked, self.enc_new.asked, timeout_ms)

    def compare_statement(self, e_old: Entry, e_new: Entry, timeout_ms: int = 20000) -> RoutingResult:
        """A stop: does it fire for the same respondents? A check: does it fail for them?"""
        if e_old.kind == "stop":
            return self._query(e_old, e_new, self.enc_old.fires, self.enc_new.fires, timeout_ms)
        return self._query(e_old, e_new, self.enc_old.fails, self.enc_new.fails, timeout_ms)

    def _query(self, e_old: Entry, e_new: Entry, f_old: Any, f_new: Any, timeout_ms: int) -> RoutingResult:
        why = self._opaque(self.q_old, self.enc_old, e_old) or self._opaque(self.q_new, self.enc_new, e_new)
        if why is not None:
            return RoutingResult(same=False, error=why)
        try:
            a_old = f_old(e_old.name if e_old.kind == "item" else e_old)
            a_new = f_new(e_new.name if e_new.kind == "item" else e_new)
        except (EncodingError, KeyError) as err:
            return RoutingResult(same=False, error=str(err))
        solver = z3.Solver()
        solver.set("timeout", timeout_ms)
        solver.add(*self._facts_for(e_old, e_new))
        solver.add(z3.Xor(a_old, a_new))
        verdict = solver.check()
        model = solver.model() if verdict == z3.sat else None
        if verdict == z3.unsat:
            return RoutingResult(same=True)
        if model is None:
            return RoutingResult(same=False, error="the solver gave up (timeout)")
        names = support(self.q_old, e_old) | {self.new_to_old.get(x, x) for x in support(self.q_new, e_new)}
        if e_old.kind == "item":
            names.discard(e_old.name)
        return RoutingResult(
            same=False,
            witness=self._witness(model, names),
            asked_old=z3.is_true(model.eval(a_old, model_completion=True)),
            asked_new=z3.is_true(model.eval(a_new, model_completion=True)),
        )

    # ------------------------------------------------------------ witnesses
    def _witness(self, model: z3.ModelRef, old_names: set[str]) -> dict[str, str]:
        """The answers the respondent would give, named as the new version names them;
        items asked in neither version are left out (their answers cannot matter). An
        item whose type changed has two answers, `NAME (old)` and `NAME (new)`."""
        old_vals, new_vals = _valued(self.q_old), _valued(self.q_new)
        order = {name: i for i, name in enumerate([e.name for e in self.q_new.entries])}
        out: dict[str, str] = {}

        def rank(old_name: str) -> int:
            return order.get(self.old_to_new.get(old_name, old_name), -1)

        for key in sorted(old_names, key=rank):
            new_name = self.old_to_new.get(key, key)
            oe, ne = old_vals.get(key), new_vals.get(new_name)
            sides = []
            if oe is not None:
                sides.append(("old", oe, key))
            if ne is not None:
                sides.append(("new", ne, new_name))
            if oe is not None and ne is not None and oe.stmt.type.kind != ne.stmt.type.kind:
                for which, entry, name in sides:
                    shown = self._answer(model, which, entry, name, key)
                    if shown is not None:
                        out[f"{new_name} ({which})"] = shown
                continue
            # Read the answer from a version that asks the item (or a sample variable).
            for which, entry, name in sides:
                shown = self._answer(model, which, entry, name, key)
                if shown is not None:
                    out[new_name] = shown
                    break
        return out

    def _answer(self, model: z3.ModelRef, which: str, entry: Entry, name: str, key: str) -> str | None:
        """The answer in one version, or None where that version does not ask it."""
        def ev(x: Any) -> Any:
            return model.eval(x, model_completion=True)

        enc = self.enc_old if which == "old" else self.enc_new
        if entry.kind != "sample" and not z3.is_true(ev(enc.asked(name))):
            return None
        if not z3.is_true(ev(enc.answered(name))):
            return NO_ANSWER
        q = self.q_old if which == "old" else self.q_new
        kind = entry.stmt.type.kind
        if kind == "text":
            return ANSWERED
        if kind == "multi":
            def chosen(v: int) -> Any:
                return self.enc_old.option(name, v) if which == "old" else self.new_var_option(name, v)

            return ", ".join(lb for lb, v in _labels(q, entry).items() if z3.is_true(ev(chosen(v))))
        raw = ev(self.enc_old.value(name) if which == "old" else self.new_var_value(name))
        if kind == "single" and key in self._label_vars:
            choice, labels = self._label_vars[key]
            return labels[ev(choice).as_long()]
        if kind == "single":
            labels_by_value = {v: lb for lb, v in _labels(q, entry).items()}
            return labels_by_value.get(raw.as_long(), str(raw.as_long()))
        if z3.is_int_value(raw):
            if q.allows_nonresponse(entry.stmt):
                # A non-response answer by its label: its value may differ by version.
                label = next((o.label for o in q.nonresponse if o.value == raw.as_long()), None)
                if label is not None:
                    return label
            return str(raw.as_long())
        return raw.as_decimal(6).rstrip("?")
