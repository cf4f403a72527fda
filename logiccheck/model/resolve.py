"""Resolve names, code labels and types; flatten statements into questionnaire order."""

from __future__ import annotations

import re
from typing import Any

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Problem, Questionnaire, Reference, RefRole, ValueKind

PIPE = re.compile(r"\{([a-z_][a-z0-9_]*)\}")
BOOLEAN_NODES = (n.Compare, n.InList, n.InRange, n.Has, n.Not, n.And, n.Or)


def pipes_in(text: str, span: Span) -> list[tuple[str, Span]]:
    """Names piped into a quoted text, with their positions (text on one line)."""
    out: list[tuple[str, Span]] = []
    if "{" not in text:
        return out
    for match in PIPE.finditer(text):
        # +1 for the opening quote; the text is on the span's line.
        col = span.column + 1 + match.start(1)
        out.append(
            (
                match.group(1),
                Span.model_construct(file=span.file, line=span.line, column=col, end_line=span.line, end_column=col + len(match.group(1))),
            )
        )
    return out


class Resolver:
    def __init__(self, spec: n.Spec, text: str) -> None:
        self.q = Questionnaire(spec=spec, text=text)
        self.block_when: dict[int, Any] = {}  # id(section or grid) -> resolved condition
        self.peeking: set[str] = set()  # derived values whose kind is being inferred

    # ------------------------------------------------------------ flatten
    def run(self) -> Questionnaire:
        q = self.q
        spec = q.spec
        for codes in spec.codes:
            if codes.name in q.codes:
                first = q.codes[codes.name]
                q.problems.append(
                    Problem(
                        "duplicate-name",
                        codes.span,
                        f"codes `{codes.name}` is defined twice",
                        related=[(first.span, "first defined here")],
                    )
                )
                continue
            q.codes[codes.name] = codes
        q.nonresponse = list(spec.nonresponse)
        for stmt in spec.body:
            self.flatten(stmt, section=None, context=[])
        self.resolve_targets()
        for entry in q.entries:
            self.resolve_entry(entry)
        for scale in spec.scales:
            self.declare_scale(scale)
        return q

    def declare_scale(self, scale: n.Scale) -> None:
        """Scales have a namespace of their own; their items must be items or grid rows,
        each named once (what kind of item is judged by `scale-mixed-answers`)."""
        q = self.q
        first = q.scales.get(scale.name)
        if first is not None:
            q.problems.append(
                Problem(
                    "duplicate-name",
                    scale.name_span,
                    f"scale `{scale.name}` is already defined (line {first.name_span.line})",
                    item=scale.name,
                    related=[(first.name_span, "first defined here")],
                )
            )
            return
        q.scales[scale.name] = scale
        seen: dict[str, n.ScaleItem] = {}
        for member in scale.items:
            if member.name in seen:
                q.problems.append(
                    Problem(
                        "duplicate-name",
                        member.span,
                        f"`{member.name}` is already in scale `{scale.name}` (line {seen[member.name].span.line}); list each item once",
                        item=member.name,
                        related=[(seen[member.name].span, "first listed here")],
                    )
                )
                continue
            seen[member.name] = member
            if member.name not in q.symbols:
                q.problems.append(
                    Problem("unknown-name", member.span, f"scale `{scale.name}` lists `{member.name}`, which is not defined", item=member.name)
                )

    def declare(self, entry: Entry, name: str, span: Span) -> None:
        """Items, rows, derived values and sample variables share one namespace."""
        q = self.q
        previous = q.symbols.get(name)
        if previous is not None:
            q.problems.append(
                Problem(
                    "duplicate-name",
                    span,
                    f"`{name}` is already defined (line {previous.span.line}); every item, row, derived value and sample variable needs a name of its own",
                    item=name,
                    related=[(previous.span, "first defined here")],
                )
            )
            return
        q.symbols[name] = entry

    def declare_block(self, block: n.Section | n.Grid) -> None:
        """Sections and grids share a namespace of their own."""
        q = self.q
        other = q.sections.get(block.name) or q.grids.get(block.name)
        if other is not None:
            q.problems.append(
                Problem(
                    "duplicate-name",
                    block.name_span,
                    f"`{block.name}` is already the name of a section or grid (line {other.name_span.line})",
                    item=block.name,
                    related=[(other.name_span, "first defined here")],
                )
            )
            return
        if isinstance(block, n.Section):
            q.sections[block.name] = block
        else:
            q.grids[block.name] = block

    def add(self, stmt: Any, section: n.Section | None, grid: n.Grid | None, context: list[tuple[Any, Any]]) -> Entry:
        entry = Entry(index=len(self.q.entries), stmt=stmt, section=section, grid=grid, context=list(context))
        self.q.entries.append(entry)
        return entry

    def flatten(self, stmt: Any, section: n.Section | None, context: list[tuple[Any, Any]]) -> None:
        q = self.q
        if isinstance(stmt, n.Section):
            self.declare_block(stmt)
            q.section_start.setdefault(stmt.name, len(q.entries))
            inner = [*context, (stmt, stmt.when)]
            for child in stmt.body:
                self.flatten(child, stmt, inner)
            return
        if isinstance(stmt, n.Grid):
            self.declare_block(stmt)
            q.section_start.setdefault(stmt.name, len(q.entries))
            inner = [*context, (stmt, stmt.when)]
            for number, row in enumerate(stmt.rows):
                entry = self.add(row, section, stmt, inner)
                self.declare(entry, row.name, row.name_span)
                if number == 0:
                    self.check_codes_name(stmt.type, entry)
            return
        entry = self.add(stmt, section, None, context)
        if isinstance(stmt, (n.Item, n.Sample, n.Let)):
            self.declare(entry, stmt.name, stmt.name_span)
        if isinstance(stmt, (n.Item, n.Sample)):
            self.check_codes_name(stmt.type, entry)

    def check_codes_name(self, spec: n.TypeSpec, entry: Entry) -> None:
        if spec.codes_name is not None and spec.codes_name not in self.q.codes:
            span = spec.codes_span or spec.span
            self.q.problems.append(
                Problem("unknown-name", span, f"no answer list is called `{spec.codes_name}`", item=spec.codes_name)
            )
            self.q.broken.add(entry.index)

    def resolve_targets(self) -> None:
        q = self.q
        for entry in q.entries:
            if entry.kind != "skip":
                continue
            target = entry.stmt.target
            if target in q.symbols and q.symbols[target].kind != "sample":
                entry.skip_target = q.symbols[target].index
            elif target in q.section_start:
                entry.skip_target = q.section_start[target]
            q.references.append(Reference(entry.index, target, entry.stmt.target_span, "skip-target"))
            if entry.skip_target is None:
                q.problems.append(
                    Problem(
                        "unknown-name",
                        entry.stmt.target_span,
                        f"`skip to {target}`: no item or section is called `{target}`",
                        item=target,
                    )
                )

    # ------------------------------------------------------------ expressions
    def resolve_entry(self, entry: Entry) -> None:
        stmt = entry.stmt
        resolved_context = []
        for owner, expr in entry.context:
            # Section and grid conditions are shared: resolve each once.
            if expr is not None and id(owner) not in self.block_when:
                self.block_when[id(owner)] = self.boolean(expr, entry, "context")
            resolved_context.append((owner, self.block_when.get(id(owner))))
        entry.context = resolved_context
        if isinstance(stmt, n.Let):
            kind = self.kind_of_expr(stmt.expr, entry, "let")
            entry.own = self.resolve(stmt.expr, entry, "let")
            self.q.let_kinds[stmt.name] = kind
            if kind not in ("bool", "number"):
                self.type_problem(stmt.expr.span, "a derived value must be a condition or a number", entry)
        elif isinstance(stmt, (n.Item, n.Skip, n.Stop)):
            if stmt.when is not None:
                entry.own = self.boolean(stmt.when, entry, "condition")
        elif isinstance(stmt, n.Check):
            if stmt.when is not None:
                entry.own = self.boolean(stmt.when, entry, "check")
            if stmt.require is not None:
                entry.require = self.boolean(stmt.require, entry, "check")
        for text, span in entry.texts():
            for name, pspan in pipes_in(text, span):
                self.q.references.append(Reference(entry.index, name, pspan, "pipe"))
                if name not in self.q.symbols:
                    self.unknown(name, pspan, entry)

    def boolean(self, expr: Any, entry: Entry, role: RefRole) -> Any:
        kind = self.kind_of_expr(expr, entry, role)
        if kind not in ("bool", "unknown"):
            self.type_problem(expr.span, f"a condition must be true or false, but this is a {_kind_word(kind)}", entry)
        return self.resolve(expr, entry, role)

    def type_problem(self, span: Span, message: str, entry: Entry) -> None:
        self.q.problems.append(Problem("type-mismatch", span, message, item=entry.name or None))
        self.q.broken.add(entry.index)

    def unknown(self, name: str, span: Span, entry: Entry) -> None:
        self.q.problems.append(Problem("unknown-name", span, name, item=entry.name or None))
        self.q.broken.add(entry.index)

    def var_kind(self, name: str) -> ValueKind:
        q = self.q
        entry = q.symbols.get(name)
        if entry is None:
            return "unknown"
        if entry.kind == "let":
            if name not in q.let_kinds:
                # Not resolved yet (a forward or circular reference): infer without judging,
                # and stop at a name already being inferred (a loop).
                if name in self.peeking:
                    return "unknown"
                self.peeking.add(name)
                try:
                    return self.kind_of_expr(entry.stmt.expr, entry, "peek", judge=False)
                finally:
                    self.peeking.discard(name)
            return q.let_kinds[name]
        return q.value_kind(name)

    def kind_of_expr(self, expr: Any, entry: Entry, role: str, judge: bool = True, _depth: int = 0) -> ValueKind:
        """The kind of value an expression yields; records type problems when judging."""
        if _depth > 50:
            return "unknown"
        if isinstance(expr, n.Num):
            return "number"
        if isinstance(expr, n.Ref):
            return self.var_kind(expr.name)
        if isinstance(expr, n.Func):
            return "number" if expr.func == "count" else "bool"
        if isinstance(expr, (n.Neg, n.Arith)):
            for sub in n.children(expr):
                k = self.kind_of_expr(sub, entry, role, judge=judge, _depth=_depth + 1)
                if judge and k not in ("number", "unknown"):
                    self.type_problem(sub.span, f"arithmetic needs numbers, but this is a {_kind_word(k)}", entry)
            return "number"
        if isinstance(expr, (n.Not, n.And, n.Or)):
            for sub in n.children(expr):
                k = self.kind_of_expr(sub, entry, role, judge=judge, _depth=_depth + 1)
                if judge and k not in ("bool", "unknown"):
                    word = {"not": "`not`", "and": "`and`", "or": "`or`"}[expr.kind]
                    self.type_problem(sub.span, f"{word} needs conditions, but this is a {_kind_word(k)}", entry)
            return "bool"
        if isinstance(expr, BOOLEAN_NODES):
            return "bool"
        return "unknown"

    def resolve(self, expr: Any, entry: Entry, role: RefRole) -> Any:
        """A copy of `expr` with code labels turned into Code nodes; records problems."""
        q = self.q
        if isinstance(expr, n.Ref):
            self.reference(expr.name, expr.span, entry, role)
            return expr
        if isinstance(expr, n.Num):
            return expr
        if isinstance(expr, n.Func):
            self.reference(expr.name, expr.name_span, entry, role)
            target = q.symbols.get(expr.name)
            kind = self.var_kind(expr.name) if target else "unknown"
            if target is not None:
                if expr.func == "count" and kind != "set":
                    self.type_problem(expr.span, f"`count()` counts the options chosen in a `multi` item; `{expr.name}` is a {_kind_word(kind)}", entry)
                if expr.func in ("answered", "asked") and target.kind == "let":
                    self.type_problem(expr.span, f"`{expr.func}()` takes an item; `{expr.name}` is a derived value", entry)
                if expr.func == "asked" and target.kind == "sample":
                    self.type_problem(expr.span, f"`{expr.name}` is a sample variable: it is never asked, always known", entry)
                if expr.func == "answered" and kind == "note":
                    self.type_problem(expr.span, f"`{expr.name}` is a note: it is shown, never answered", entry)
            return expr
        if isinstance(expr, n.Compare):
            left_kind = self.kind_of_expr(expr.left, entry, role, judge=False)
            right_kind = self.kind_of_expr(expr.right, entry, role, judge=False)
            if left_kind in ("bool",) or right_kind in ("bool",):
                self.type_problem(expr.span, "a comparison takes values, not conditions", entry)
            coded_side = self.coded_subject(expr.left)
            if coded_side is not None and self.is_constant(expr.right):
                left = self.resolve(expr.left, entry, role)
                right = self.code_constant(expr.right, coded_side, entry)
                return expr.model_copy(update={"left": left, "right": right})
            coded_right = self.coded_subject(expr.right)
            if coded_right is not None and self.is_constant(expr.left):
                right = self.resolve(expr.right, entry, role)
                left = self.code_constant(expr.left, coded_right, entry)
                return expr.model_copy(update={"left": left, "right": right})
            for side, kind in ((expr.left, left_kind), (expr.right, right_kind)):
                if kind == "set":
                    self.type_problem(side.span, f"`{getattr(side, 'name', '?')}` is a `multi` item: use `has`, `has any (...)` or `count()`", entry)
                elif kind in ("text", "note"):
                    self.type_problem(side.span, f"`{getattr(side, 'name', '?')}` is a {_kind_word(kind)} item and cannot be compared; use `answered()`", entry)
            if left_kind == "coded" and right_kind == "number" and not self.is_constant(expr.right):
                self.type_problem(expr.span, "a coded item compared with a number expression; compare with one of its labels", entry)
            # A bare label beside a number item.
            for side, other in ((expr.right, left_kind), (expr.left, right_kind)):
                if isinstance(side, n.Ref) and side.name not in q.symbols and other == "number":
                    if self.is_any_label(side.name):
                        self.type_problem(side.span, f"`{side.name}` is a code label, but it is compared with a number", entry)
                        return expr
            unknown_side = any(
                isinstance(side, n.Ref) and side.name not in q.symbols and not self.is_any_label(side.name)
                for side in (expr.left, expr.right)
            )
            sides: dict[str, Any] = {}
            for key, side in (("left", expr.left), ("right", expr.right)):
                if isinstance(side, n.Ref) and side.name not in q.symbols:
                    # A label beside a name that is not coded was judged above; beside
                    # an unknown name it is most likely that item's label.
                    if self.is_any_label(side.name) or (unknown_side and self.is_constant_like(expr, side)):
                        continue
                sides[key] = self.resolve(side, entry, role)
            return expr.model_copy(update=sides)
        if isinstance(expr, n.InList):
            coded = self.coded_subject(expr.subject)
            subject = self.resolve(expr.subject, entry, role)
            kind = self.kind_of_expr(expr.subject, entry, role, judge=False)
            if coded is not None:
                values = [self.code_constant(v, coded, entry) for v in expr.values]
            else:
                if kind in ("set", "text", "note", "bool"):
                    self.type_problem(expr.subject.span, f"`in (...)` needs a coded or number value, but this is a {_kind_word(kind)}", entry)
                values = []
                for v in expr.values:
                    if isinstance(v, n.Ref):
                        if self.is_any_label(v.name) and v.name not in q.symbols:
                            self.type_problem(v.span, f"`{v.name}` is a code label, but the value tested is a number", entry)
                        else:
                            self.unknown(v.name, v.span, entry)
                    values.append(v)
            return expr.model_copy(update={"subject": subject, "values": values})
        if isinstance(expr, n.InRange):
            kind = self.kind_of_expr(expr.subject, entry, role, judge=False)
            if kind in ("set", "text", "note", "bool"):
                self.type_problem(expr.subject.span, f"`in LO..HI` needs a number, but this is a {_kind_word(kind)}", entry)
            return expr.model_copy(update={"subject": self.resolve(expr.subject, entry, role)})
        if isinstance(expr, n.Has):
            subject = self.resolve(expr.subject, entry, role)
            kind = self.kind_of_expr(expr.subject, entry, role, judge=False)
            if not isinstance(expr.subject, n.Ref) or kind not in ("set", "unknown"):
                self.type_problem(expr.subject.span, f"`has` tests a `multi` item, but this is a {_kind_word(kind)}", entry)
                return expr.model_copy(update={"subject": subject})
            target = q.symbols.get(expr.subject.name)
            if target is None:
                return expr.model_copy(update={"subject": subject})
            values = [self.code_constant(v, target.stmt, entry) for v in expr.values]
            return expr.model_copy(update={"subject": subject, "values": values})
        # Boolean connectives and arithmetic: resolve the parts.
        update: dict[str, Any] = {}
        if isinstance(expr, (n.Not, n.Neg)):
            update["operand"] = self.resolve(expr.operand, entry, role)
        elif isinstance(expr, n.Arith):
            update["left"] = self.resolve(expr.left, entry, role)
            update["right"] = self.resolve(expr.right, entry, role)
        elif isinstance(expr, (n.And, n.Or)):
            update["operands"] = [self.resolve(o, entry, role) for o in expr.operands]
        return expr.model_copy(update=update) if update else expr

    def reference(self, name: str, span: Span, entry: Entry, role: RefRole) -> None:
        q = self.q
        q.references.append(Reference(entry.index, name, span, role))
        if name not in q.symbols:
            if name in q.sections or name in q.grids:
                self.type_problem(span, f"`{name}` is a section or grid, not a value; name one of its items", entry)
            else:
                self.unknown(name, span, entry)

    def coded_subject(self, expr: Any) -> n.Item | n.Sample | None:
        if isinstance(expr, n.Ref):
            target = self.q.symbols.get(expr.name)
            if target is not None and target.kind in ("item", "sample") and target.stmt.type.kind == "single":
                return target.stmt
        return None

    def is_constant(self, expr: Any) -> bool:
        if isinstance(expr, n.Num):
            return True
        return isinstance(expr, n.Ref) and expr.name not in self.q.symbols

    def is_constant_like(self, expr: n.Compare, side: n.Ref) -> bool:
        """`side` is the right-hand name beside an undefined left-hand name."""
        other = expr.left if side is expr.right else expr.right
        return side is expr.right and isinstance(other, n.Ref) and other.name not in self.q.symbols

    def is_any_label(self, name: str) -> bool:
        if not hasattr(self, "_labels"):
            q = self.q
            labels = {o.label for o in q.nonresponse}
            for codes in q.codes.values():
                labels.update(o.label for o in codes.options)
            for entry in q.entries:
                t = getattr(entry.stmt, "type", None)
                if t is not None and t.inline_codes is not None:
                    labels.update(o.label for o in t.inline_codes.options)
            self._labels = labels
        return name in self._labels

    def code_constant(self, expr: Any, item: n.Item | n.Sample, entry: Entry) -> Any:
        """A label or value written beside a coded item, checked against its codes."""
        q = self.q
        codes = q.item_codes(item)
        options = list(codes.options) if codes is not None else []
        allowed = options + (q.nonresponse if q.allows_nonresponse(item) else [])
        if codes is None:
            return expr
        if isinstance(expr, n.Ref):
            for option in allowed:
                if option.label == expr.name:
                    return n.Code(span=expr.span, value=option.value, label=option.label)
            extra = ""
            if any(o.label == expr.name for o in q.nonresponse) and not q.allows_nonresponse(item):
                extra = f" (`{expr.name}` is a non-response code, and `{item.name}` is `strict`)"
            q.problems.append(
                Problem(
                    "unknown-code",
                    expr.span,
                    f"`{item.name}` has no code labelled `{expr.name}`{extra}",
                    item=item.name,
                    related=[(item.name_span, f"`{item.name}` is defined here")],
                )
            )
            q.broken.add(entry.index)
            return expr
        if isinstance(expr, n.Num):
            for option in allowed:
                if option.value == expr.value:
                    return n.Code(span=expr.span, value=option.value, label=option.label)
            q.problems.append(
                Problem(
                    "unknown-code",
                    expr.span,
                    f"`{item.name}` has no code with value {expr.value:g}",
                    item=item.name,
                    related=[(item.name_span, f"`{item.name}` is defined here")],
                )
            )
            q.broken.add(entry.index)
            return expr
        self.type_problem(expr.span, f"compare `{item.name}` with one of its labels or code values", entry)
        return expr


def _kind_word(kind: str) -> str:
    return {
        "coded": "coded (single) value",
        "set": "`multi` item",
        "number": "number",
        "text": "text",
        "note": "note",
        "bool": "condition",
        "unknown": "value of unknown type",
    }.get(kind, kind)


def resolve(spec: n.Spec, text: str) -> Questionnaire:
    """The resolved questionnaire; problems are kept on it for the checks to report."""
    return Resolver(spec, text).run()
