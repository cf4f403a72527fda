"""Typed nodes of a spec. Every node keeps its span (file, line, column, end)."""

from __future__ import annotations

from typing import Annotated, Any, Literal, TypeVar, Union

from pydantic import BaseModel, ConfigDict, Field

from logiccheck.diagnostics import Span

M = TypeVar("M", bound=BaseModel)


def construct(cls: type[M], **values: Any) -> M:
    """Make a model from values already known to be valid (built from a parse tree).

    Like pydantic's `model_construct`, only faster: the defaults of each class are
    looked up once. Fields left out get their default (a factory is called each time)."""
    defaults = _DEFAULTS.get(cls)
    if defaults is None:
        defaults = _DEFAULTS[cls] = [
            (name, field.default_factory, field.default)
            for name, field in cls.model_fields.items()
            if not field.is_required()
        ]
    fields_set = set(values)
    for name, factory, default in defaults:
        if name not in values:
            values[name] = factory() if factory is not None else default  # type: ignore[call-arg]
    obj = cls.__new__(cls)
    object.__setattr__(obj, "__dict__", values)
    object.__setattr__(obj, "__pydantic_fields_set__", fields_set)
    object.__setattr__(obj, "__pydantic_extra__", None)
    object.__setattr__(obj, "__pydantic_private__", None)
    return obj


_DEFAULTS: dict[type, list[tuple[str, Any, Any]]] = {}


class Node(BaseModel):
    model_config = ConfigDict(arbitrary_types_allowed=True)

    span: Span


# ---------------------------------------------------------------- expressions
class Num(Node):
    kind: Literal["num"] = "num"
    value: float

    @property
    def is_int(self) -> bool:
        return float(self.value).is_integer()


class Ref(Node):
    """A bare name: an item, derived value or sample variable, or (beside a coded item)
    a code label. The resolver decides which."""

    kind: Literal["ref"] = "ref"
    name: str


class Code(Node):
    """A code of a coded item, written as a label or as its value (set by the resolver)."""

    kind: Literal["code"] = "code"
    value: int
    label: str


class Neg(Node):
    kind: Literal["neg"] = "neg"
    operand: Expr


class Arith(Node):
    kind: Literal["arith"] = "arith"
    op: Literal["+", "-", "*", "/"]
    left: Expr
    right: Expr


class Compare(Node):
    kind: Literal["compare"] = "compare"
    op: Literal["=", "!=", "<", "<=", ">", ">="]
    left: Expr
    right: Expr


class InList(Node):
    kind: Literal["in_list"] = "in_list"
    subject: Expr
    values: list[Expr]


class InRange(Node):
    kind: Literal["in_range"] = "in_range"
    subject: Expr
    lo: float
    hi: float


class Has(Node):
    kind: Literal["has"] = "has"
    mode: Literal["one", "any", "all"]
    subject: Expr
    values: list[Expr]


class Func(Node):
    """`count(x)`, `answered(x)` or `asked(x)`."""

    kind: Literal["func"] = "func"
    func: Literal["count", "answered", "asked"]
    name: str
    name_span: Span


class Not(Node):
    kind: Literal["not"] = "not"
    operand: Expr


class And(Node):
    kind: Literal["and"] = "and"
    operands: list[Expr]


class Or(Node):
    kind: Literal["or"] = "or"
    operands: list[Expr]


Expr = Annotated[
    Union[Num, Ref, Code, Neg, Arith, Compare, InList, InRange, Has, Func, Not, And, Or],
    Field(discriminator="kind"),
]

for _cls in (Neg, Arith, Compare, InList, InRange, Has, Not, And, Or):
    _cls.model_rebuild()


def children(expr: BaseModel) -> list[Node]:
    """Direct sub-expressions, in reading order."""
    if isinstance(expr, (Neg, Not)):
        return [expr.operand]
    if isinstance(expr, (Arith, Compare)):
        return [expr.left, expr.right]
    if isinstance(expr, (InList, Has)):
        return [expr.subject, *expr.values]
    if isinstance(expr, InRange):
        return [expr.subject]
    if isinstance(expr, (And, Or)):
        return list(expr.operands)
    return []


def walk(expr: BaseModel | None):  # type: ignore[no-untyped-def]
    """Every node of an expression, parents before children."""
    if expr is None:
        return
    stack = [expr]
    while stack:
        node = stack.pop()
        yield node
        stack.extend(reversed(children(node)))


# ---------------------------------------------------------------- answer lists
class CodeOption(Node):
    label: str
    value: int
    text: str


class CodeList(Node):
    name: str
    options: list[CodeOption]
    inline: bool = False

    def by_label(self) -> dict[str, CodeOption]:
        return {o.label: o for o in self.options}

    def by_value(self) -> dict[int, CodeOption]:
        return {o.value: o for o in self.options}


TypeKind = Literal["single", "multi", "number", "decimal", "text", "note"]


class TypeSpec(Node):
    kind: TypeKind
    codes_name: str | None = None
    codes_span: Span | None = None
    inline_codes: CodeList | None = None
    lo: float | None = None
    hi: float | None = None

    @property
    def coded(self) -> bool:
        return self.kind in ("single", "multi")


# ---------------------------------------------------------------- statements
class Flags(BaseModel):
    gate: bool = False
    key: bool = False
    required: bool = False
    strict: bool = False
    shuffled: bool = False
    soft: bool = False
    seconds: float | None = None


class Item(Node):
    """A question (or a grid row, which is an item of its own)."""

    stmt: Literal["item"] = "item"
    name: str
    name_span: Span
    type: TypeSpec
    text: str
    text_span: Span
    when: Expr | None = None
    flags: Flags = Field(default_factory=Flags)
    grid: str | None = None


class Sample(Node):
    stmt: Literal["sample"] = "sample"
    name: str
    name_span: Span
    type: TypeSpec


class Let(Node):
    stmt: Literal["let"] = "let"
    name: str
    name_span: Span
    expr: Expr


class Skip(Node):
    stmt: Literal["skip"] = "skip"
    target: str
    target_span: Span
    when: Expr | None = None


class Stop(Node):
    stmt: Literal["stop"] = "stop"
    name: str
    name_span: Span
    text: str
    text_span: Span
    when: Expr | None = None


class Check(Node):
    stmt: Literal["check"] = "check"
    name: str
    name_span: Span
    text: str
    when: Expr | None = None
    require: Expr | None = None
    soft: bool = False


class Grid(Node):
    stmt: Literal["grid"] = "grid"
    name: str
    name_span: Span
    type: TypeSpec
    text: str
    text_span: Span
    when: Expr | None = None
    shuffled: bool = False
    rows: list[Item] = Field(default_factory=list)


class ScaleItem(Node):
    """One line of a scale: an item or grid row, maybe scored the other way round."""

    name: str
    reversed: bool = False
    reversed_span: Span | None = None


class Scale(Node):
    """Items that measure one theme, scored together (a composite)."""

    stmt: Literal["scale"] = "scale"
    name: str
    name_span: Span
    title: str
    title_span: Span
    items: list[ScaleItem] = Field(default_factory=list)
    min: int | None = None  # fewest answered items for a score; None = half, rounded up
    min_span: Span | None = None
    top: int | None = None  # `score top K`: top-box scoring
    top_span: Span | None = None

    @property
    def min_answered(self) -> int:
        """The `min` written, else half of the items rounded up (common practice, no source)."""
        return self.min if self.min is not None else -(-len(self.items) // 2)


class Section(Node):
    stmt: Literal["section"] = "section"
    name: str
    name_span: Span
    title: str
    when: Expr | None = None
    shuffled: bool = False
    body: list[Statement] = Field(default_factory=list)
    scales: list[Scale] = Field(default_factory=list)  # wherever they stand, in spec order


Statement = Annotated[
    Union[Item, Sample, Let, Skip, Stop, Check, Grid, Section], Field(discriminator="stmt")
]
Section.model_rebuild()


class Spec(BaseModel):
    """One parsed spec file, before name resolution."""

    file: str
    name: str | None = None
    title: str | None = None
    survey_span: Span | None = None
    codes: list[CodeList] = Field(default_factory=list)
    nonresponse: list[CodeOption] = Field(default_factory=list)
    body: list[Statement] = Field(default_factory=list)
    scales: list[Scale] = Field(default_factory=list)  # wherever they stand, in spec order
