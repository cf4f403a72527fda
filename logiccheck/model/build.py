"""Parse tree to typed nodes. Lark trees keep `meta`; we copy it into every node.

Nodes are made with `nodes.construct` (no validation): the parse tree already guarantees their shape, and
validating some 50,000 nodes of a large spec again costs about half a second.
"""

from __future__ import annotations

from typing import Any, cast

from lark import Token, Tree

from logiccheck.diagnostics import Diagnostic, Severity, Span
from logiccheck.model import nodes as n

# Which options each statement accepts; anything else is reported where it stands.
_ALLOWED = {
    "survey": set(),
    "sample": set(),
    "section": {"when", "shuffled"},
    "grid": {"when", "shuffled", "gate", "key", "required", "strict", "seconds"},
    "row": {"when", "gate", "key", "required", "strict", "seconds"},
    "item": {"when", "gate", "key", "required", "strict", "seconds"},
    "skip": {"when"},
    "stop": {"when"},
    "check": {"when", "require", "soft"},
}


def _token(node: Token | Tree) -> Token:
    """A parse-tree child that the grammar always makes a token (a name, string or number).

    Lark types every child as token-or-tree; the grammar decides which, so this only
    tells the type checker what the grammar guarantees."""
    return cast(Token, node)


def _unquote(raw: str) -> str:
    body = raw[1:-1]
    return body.replace('\\"', '"').replace("\\\\", "\\")


class Builder:
    """Builds a Spec; problems that the grammar lets through become diagnostics."""

    def __init__(self, file: str) -> None:
        self.file = file
        self.diagnostics: list[Diagnostic] = []
        # Scales may stand at the top or inside a section; they are declarations, not
        # routing, so they are gathered here rather than kept in the statement order.
        self.scales: list[n.Scale] = []

    # -- positions
    def span_tree(self, tree: Tree) -> Span:
        meta = tree.meta
        if getattr(meta, "empty", True):
            return n.construct(Span, file=self.file, line=1, column=1)
        return n.construct(Span,
            file=self.file,
            line=meta.line,
            column=meta.column,
            end_line=meta.end_line,
            end_column=meta.end_column,
        )

    def span_tok(self, node: Token | Tree) -> Span:
        tok = _token(node)
        return n.construct(Span,
            file=self.file,
            line=tok.line or 1,
            column=tok.column or 1,
            end_line=tok.end_line,
            end_column=tok.end_column,
        )

    def span_of(self, node: Any) -> Span:
        return self.span_tok(node) if isinstance(node, Token) else self.span_tree(node)

    def error(self, span: Span, message: str) -> None:
        self.diagnostics.append(
            Diagnostic(check="syntax-error", severity=Severity.error, span=span, message=message)
        )

    # -- top level
    def build(self, tree: Tree | None) -> n.Spec:
        spec = n.construct(n.Spec, file=self.file)
        if tree is None:
            return spec
        for child in tree.children:
            if not isinstance(child, Tree):
                continue
            kind = child.data
            if kind == "survey":
                if spec.name is not None:
                    self.error(self.span_tree(child), "a spec has one `survey` line; this is a second one")
                name, title = child.children[0], child.children[1]
                spec.name, spec.title = str(name), _unquote(str(title))
                spec.survey_span = self.span_tok(name)
                self.options("survey", child.children[2:])
            elif kind == "codes_def":
                spec.codes.append(self.codes_def(child))
            elif kind == "nonresponse":
                spec.nonresponse.extend(self.code_lines(child.children))
            else:
                stmt = self.statement(child, None)
                if stmt is not None:
                    spec.body.append(stmt)
        spec.scales = self.scales
        return spec

    def code_line(self, tree: Tree) -> n.CodeOption:
        label, _eq, value, text = tree.children
        return n.construct(n.CodeOption,
            span=self.span_tok(label),
            label=str(label),
            value=self.signed_int(value),
            text=_unquote(str(text)),
        )

    def code_lines(self, children: list[Any]) -> list[n.CodeOption]:
        return [self.code_line(c) for c in children if isinstance(c, Tree) and c.data == "code_line"]

    def codes_def(self, tree: Tree) -> n.CodeList:
        name = tree.children[0]
        return n.construct(n.CodeList,
            span=self.span_tok(name), name=str(name), options=self.code_lines(tree.children[1:])
        )

    def signed_int(self, tree: Tree) -> int:
        value = self.signed_num(tree)
        if not float(value).is_integer():
            self.error(self.span_tree(tree), f"a code value must be a whole number, not {value:g}")
        return int(value)

    def signed_num(self, tree: Tree) -> float:
        minus, number = tree.children
        value = float(_token(number))
        return -value if minus is not None else value

    # -- types
    def type_spec(self, tree: Tree) -> n.TypeSpec:
        span = self.span_tree(tree)
        kind = tree.data[2:]
        if kind in ("single", "multi"):
            ref = tree.children[0]
            if ref.data == "codes_named":
                tok = ref.children[0]
                return n.construct(n.TypeSpec, span=span, kind=kind, codes_name=str(tok), codes_span=self.span_tok(tok))
            options = [
                n.construct(n.CodeOption,
                    span=self.span_tok(c.children[0]),
                    label=str(c.children[0]),
                    value=self.signed_int(c.children[2]),
                    text=_unquote(str(c.children[3])),
                )
                for c in ref.children
                if isinstance(c, Tree)
            ]
            inline = n.construct(n.CodeList, span=self.span_tree(ref), name="", options=options, inline=True)
            return n.construct(n.TypeSpec, span=span, kind=kind, inline_codes=inline, codes_span=inline.span)
        if kind in ("number", "decimal"):
            rng = tree.children[0]
            lo, hi = self.signed_num(rng.children[0]), self.signed_num(rng.children[1])
            if kind == "number" and not (float(lo).is_integer() and float(hi).is_integer()):
                self.error(self.span_tree(rng), "a `number` range takes whole numbers; use `decimal` for fractions")
            if lo > hi:
                self.error(self.span_tree(rng), f"the range {lo:g}..{hi:g} is empty: the low end is above the high end")
            return n.construct(n.TypeSpec, span=span, kind=kind, lo=lo, hi=hi)
        return n.construct(n.TypeSpec, span=span, kind=kind)

    # -- options
    def options(self, stmt: str, children: list[Any]) -> dict[str, Any]:
        found: dict[str, Any] = {}
        flat: list[Tree] = []
        for child in children:
            if isinstance(child, Tree) and child.data == "clause_line":
                flat.extend(c for c in child.children if isinstance(c, Tree))
            elif isinstance(child, Tree) and child.data.startswith("opt_"):
                flat.append(child)
        value: object  # True for a flag, seconds, or an expression node
        for opt in flat:
            if opt.data == "opt_flag":
                word, value = str(opt.children[0]), True
            elif opt.data == "opt_seconds":
                word, value = "seconds", float(_token(opt.children[0]))
            else:
                word, value = opt.data[4:], self.expr(opt.children[0])
            if word not in _ALLOWED[stmt]:
                allowed = ", ".join(f"`{w}`" for w in sorted(_ALLOWED[stmt])) or "no options"
                self.error(self.span_tree(opt), f"`{word}` does not belong on a `{stmt}` line (it takes {allowed})")
                continue
            if word in found:
                self.error(self.span_tree(opt), f"`{word}` is given twice on this `{stmt}`")
                continue
            found[word] = value
        return found

    def flags(self, opts: dict[str, Any]) -> n.Flags:
        return n.construct(n.Flags,
            gate=bool(opts.get("gate")),
            key=bool(opts.get("key")),
            required=bool(opts.get("required")),
            strict=bool(opts.get("strict")),
            shuffled=bool(opts.get("shuffled")),
            soft=bool(opts.get("soft")),
            seconds=opts.get("seconds"),
        )

    # -- statements
    def statement(self, tree: Tree, grid: str | None) -> Any:
        kind = tree.data
        ch = tree.children
        span = self.span_tree(tree)
        if kind == "sample":
            name = ch[0]
            self.options("sample", ch[2:])
            return n.construct(n.Sample, span=span, name=str(name), name_span=self.span_tok(name), type=self.type_spec(ch[1]))
        if kind == "item":
            name, tspec, text = ch[0], ch[1], ch[2]
            opts = self.options("item", ch[3:])
            return n.construct(n.Item,
                span=span,
                name=str(name),
                name_span=self.span_tok(name),
                type=self.type_spec(tspec),
                text=_unquote(str(text)),
                text_span=self.span_tok(text),
                when=opts.get("when"),
                flags=self.flags(opts),
            )
        if kind == "let":
            name, _eq, expr = ch
            return n.construct(n.Let, span=span, name=str(name), name_span=self.span_tok(name), expr=self.expr(expr))
        if kind == "skip":
            target = ch[0]
            opts = self.options("skip", ch[1:])
            return n.construct(n.Skip, span=span, target=str(target), target_span=self.span_tok(target), when=opts.get("when"))
        if kind == "stop":
            name, text = ch[0], ch[1]
            opts = self.options("stop", ch[2:])
            return n.construct(n.Stop,
                span=span,
                name=str(name),
                name_span=self.span_tok(name),
                text=_unquote(str(text)),
                text_span=self.span_tok(text),
                when=opts.get("when"),
            )
        if kind == "check":
            name, text = ch[0], ch[1]
            opts = self.options("check", ch[2:])
            if "require" not in opts:
                self.error(self.span_tok(name), "a `check` needs `require COND`: the rule that must hold")
            return n.construct(n.Check,
                span=span,
                name=str(name),
                name_span=self.span_tok(name),
                text=_unquote(str(text)),
                when=opts.get("when"),
                require=opts.get("require"),
                soft=bool(opts.get("soft")),
            )
        if kind == "scale":
            self.scales.append(self.scale(tree))
            return None
        if kind == "section":
            name, title = ch[0], ch[1]
            rest = [c for c in ch[2:] if c is not None]
            opts = self.options("section", [c for c in rest if c.data.startswith(("opt_", "clause_line"))])
            body = [self.statement(c, None) for c in rest if not c.data.startswith(("opt_", "clause_line"))]
            return n.construct(n.Section,
                span=span,
                name=str(name),
                name_span=self.span_tok(name),
                title=_unquote(str(title)),
                when=opts.get("when"),
                shuffled=bool(opts.get("shuffled")),
                body=[b for b in body if b is not None],
            )
        if kind == "grid":
            name, tspec, text = ch[0], ch[1], ch[2]
            rest = [c for c in ch[3:] if c is not None]
            opts = self.options("grid", [c for c in rest if c.data != "row"])
            gtype = self.type_spec(tspec)
            if gtype.kind in ("note", "text") and False:
                pass
            rows = []
            for row in (c for c in rest if c.data == "row"):
                rname, rtext = row.children[0], row.children[1]
                ropts = self.options("row", row.children[2:])
                merged = {k: v for k, v in opts.items() if k not in ("when", "shuffled")}
                merged.update({k: v for k, v in ropts.items() if k != "when"})
                rows.append(
                    n.construct(n.Item,
                        span=self.span_tree(row),
                        name=str(rname),
                        name_span=self.span_tok(rname),
                        type=gtype,
                        text=_unquote(str(rtext)),
                        text_span=self.span_tok(rtext),
                        when=ropts.get("when"),
                        flags=self.flags(merged),
                        grid=str(name),
                    )
                )
            if not rows:
                self.error(self.span_tok(name), f"grid `{name}` has no rows; indent one `row_name \"text\"` line per row under it")
            return n.construct(n.Grid,
                span=span,
                name=str(name),
                name_span=self.span_tok(name),
                type=gtype,
                text=_unquote(str(text)),
                text_span=self.span_tok(text),
                when=opts.get("when"),
                shuffled=bool(opts.get("shuffled")),
                rows=rows,
            )
        return None

    def scale(self, tree: Tree) -> n.Scale:
        name, title = tree.children[0], tree.children[1]
        values: dict[str, Any] = {}
        items: list[n.ScaleItem] = []
        for child in tree.children[2:]:
            if not isinstance(child, Tree):
                continue
            if child.data == "scale_line":
                item, mark = child.children[0], child.children[1]
                items.append(n.construct(n.ScaleItem,
                    span=self.span_tok(item),
                    name=str(item),
                    reversed=mark is not None,
                    reversed_span=self.span_tok(mark) if mark is not None else None,
                ))
                continue
            word = child.data[6:]  # scale_min, scale_top
            number = child.children[-1]
            span = self.span_tree(child)
            if word in values:
                shown = "min" if word == "min" else "score top"
                self.error(span, f"`{shown}` is given twice on this `scale`")
                continue
            value = float(_token(number))
            if not value.is_integer() or value < 1:
                shown = "min" if word == "min" else "score top"
                self.error(self.span_tok(number), f"`{shown}` takes a whole number of 1 or more, not {number}")
                continue
            values[word] = (int(value), span)
        if not items:
            self.error(self.span_tok(name), f"scale `{name}` has no items; indent one item name per line under it")
        minimum, top = values.get("min"), values.get("top")
        return n.construct(n.Scale,
            span=self.span_tree(tree),
            name=str(name),
            name_span=self.span_tok(name),
            title=_unquote(str(title)),
            title_span=self.span_tok(title),
            items=items,
            min=minimum[0] if minimum else None,
            min_span=minimum[1] if minimum else None,
            top=top[0] if top else None,
            top_span=top[1] if top else None,
        )

    # -- expressions
    def expr(self, node: Any) -> Any:
        span = self.span_of(node)
        if isinstance(node, Token):
            if node.type == "NAME":
                return n.construct(n.Ref, span=span, name=str(node))
            return n.construct(n.Num, span=span, value=float(node))
        kind = node.data
        ch = node.children
        if kind == "num":
            return n.construct(n.Num, span=span, value=float(ch[0]))
        if kind == "ref":
            return n.construct(n.Ref, span=span, name=str(ch[0]))
        if kind == "signed_num":
            return n.construct(n.Num, span=span, value=self.signed_num(node))
        if kind == "neg":
            operand = self.expr(ch[1])
            if isinstance(operand, n.Num):
                return n.construct(n.Num, span=span, value=-operand.value)
            return n.construct(n.Neg, span=span, operand=operand)
        if kind == "arith":
            return n.construct(n.Arith, span=span, op=str(ch[1]), left=self.expr(ch[0]), right=self.expr(ch[2]))
        if kind == "compare":
            return n.construct(n.Compare, span=span, op=str(ch[1]), left=self.expr(ch[0]), right=self.expr(ch[2]))
        if kind == "in_list":
            return n.construct(n.InList, span=span, subject=self.expr(ch[0]), values=[self.expr(c) for c in ch[1:]])
        if kind == "in_range":
            rng = ch[1]
            return n.construct(n.InRange,
                span=span,
                subject=self.expr(ch[0]),
                lo=self.signed_num(rng.children[0]),
                hi=self.signed_num(rng.children[1]),
            )
        if kind in ("has_one", "has_any", "has_all"):
            return n.construct(n.Has, span=span, mode=kind[4:], subject=self.expr(ch[0]), values=[self.expr(c) for c in ch[1:]])
        if kind in ("count_", "answered_", "asked_"):
            return n.construct(n.Func, span=span, func=kind[:-1], name=str(ch[0]), name_span=self.span_tok(ch[0]))
        if kind == "not_":
            return n.construct(n.Not, span=span, operand=self.expr(ch[0]))
        if kind in ("and_", "or_"):
            cls = n.And if kind == "and_" else n.Or
            operands: list[Any] = []
            for c in ch:
                sub = self.expr(c)
                if isinstance(sub, cls):
                    operands.extend(sub.operands)
                else:
                    operands.append(sub)
            return n.construct(cls, span=span, operands=operands)
        raise ValueError(f"unexpected tree node {kind}")


def build_spec(tree: Tree | None, file: str) -> tuple[n.Spec, list[Diagnostic]]:
    """Typed nodes for a parse tree, with the diagnostics found while building."""
    builder = Builder(file)
    spec = builder.build(tree)
    return spec, builder.diagnostics
