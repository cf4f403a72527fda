"""Checks on answer lists: duplicates, empty lists, and codes that cannot be told apart."""

from __future__ import annotations

from collections.abc import Iterable, Iterator

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.diagnostics import Diagnostic
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire


def answer_lists(q: Questionnaire) -> Iterator[tuple[n.CodeList, str]]:
    """Every codes list and inline list once (grid rows share one), with a word for it."""
    for codes in q.spec.codes:
        yield codes, f"codes `{codes.name}`"
    seen: set[int] = set()
    for entry in q.entries:
        spec = getattr(entry.stmt, "type", None)
        if spec is None or spec.inline_codes is None or id(spec.inline_codes) in seen:
            continue
        seen.add(id(spec.inline_codes))
        owner = entry.grid.name if entry.grid is not None else entry.name
        word = "grid" if entry.grid is not None else "item"
        yield spec.inline_codes, f"the answer list of {word} `{owner}`"


@register(
    "duplicate-code",
    severity="error",
    stage="spec",
    summary="An answer list gives one value or one label to two options.",
    what="Two options with the same value or the same label in a `codes` list, an inline "
    "`{ ... }` list or the `nonresponse` list; also a code label that is also a "
    "non-response label (so `x = dk` could mean either). A code whose value equals a "
    "non-response value is `code-collision`, reported per list where an item allows "
    "non-response codes.",
    why="The export holds only the value, and conditions name the label: with two options "
    "sharing one, the answers (and the conditions on them) cannot be told apart.",
    bad='codes often\n  daily = 1 "Every day"\n  weekly = 1 "Every week"',
    good='codes often\n  daily = 1 "Every day"\n  weekly = 2 "Every week"',
)
def duplicate_code(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    nr_labels = {o.label: o for o in q.nonresponse}
    yield from _duplicates(ctx, q.nonresponse, "the `nonresponse` list", None)
    for codes, word in answer_lists(q):
        yield from _duplicates(ctx, codes.options, word, codes.name or None)
        for option in codes.options:
            nr = nr_labels.get(option.label)
            if nr is not None:
                yield ctx.diag(
                    "duplicate-code",
                    option.span,
                    f"in {word}, the label `{option.label}` is also a non-response label; "
                    f"a condition `= {option.label}` could mean either",
                    item=codes.name or None,
                    related=[(nr.span, f"non-response `{nr.label}` = {nr.value} is here")],
                )


def _duplicates(ctx: LintContext, options: list[n.CodeOption], word: str, name: str | None) -> Iterator[Diagnostic]:
    by_value: dict[int, n.CodeOption] = {}
    by_label: dict[str, n.CodeOption] = {}
    for option in options:
        first = by_value.setdefault(option.value, option)
        if first is not option:
            yield ctx.diag(
                "duplicate-code",
                option.span,
                f"in {word}, `{option.label}` has value {option.value}, which `{first.label}` already has",
                item=name,
                related=[(first.span, f"`{first.label}` = {first.value} is here")],
            )
        first = by_label.setdefault(option.label, option)
        if first is not option:
            yield ctx.diag(
                "duplicate-code",
                option.span,
                f"in {word}, the label `{option.label}` is given twice",
                item=name,
                related=[(first.span, f"`{option.label}` is first given here")],
            )


@register(
    "empty-codes",
    severity="error",
    stage="spec",
    summary="An answer list has no options.",
    what="A `codes` list with no indented option lines, or an inline list `{ }` with "
    "nothing between the braces.",
    why="An item with no options cannot be answered: every respondent routed to it is "
    "stuck or skips it, and every condition on it is never true.",
    bad='codes rating\nscore: single rating "How was it?"',
    good='codes rating\n  good = 1 "Good"\n  poor = 2 "Poor"\nscore: single rating "How was it?"',
)
def empty_codes(ctx: LintContext) -> Iterable[Diagnostic]:
    for codes, word in answer_lists(ctx.q):
        if not codes.options:
            hint = "indent one `label = VALUE \"text\"` line per option under it" if not codes.inline else (
                'write the options between the braces, e.g. { yes = 1 "Yes", no = 2 "No" }'
            )
            yield ctx.diag("empty-codes", codes.span, f"{word} has no options; {hint}", item=codes.name or None)


def _users(q: Questionnaire, codes: n.CodeList) -> list[n.Item]:
    """Items (and rows) that read `codes` and accept non-response codes."""
    out = []
    for entry in q.entries:
        if entry.kind != "item":
            continue
        item = entry.stmt
        if q.item_codes(item) is codes and q.allows_nonresponse(item):
            out.append(item)
    return out


@register(
    "code-collision",
    severity="error",
    stage="spec",
    summary="A non-response code can also be a real answer, so the value cannot be read.",
    what="A non-response value (e.g. 98 \"Don't know\") inside the range of a `number` or "
    "`decimal` item, or equal to one of the codes of a `single` item, where the item is "
    "not `strict` and so accepts non-response codes.",
    why="In the export, 98 then means both \"98 years\" (or the option coded 98) and "
    "\"don't know\": nobody can tell which, and every condition and count on the item is "
    "wrong for some respondents.",
    bad='nonresponse\n  dk = 98 "Don\'t know"\nvisits: number 0..100 "How many visits?"',
    good='nonresponse\n  dk = 98 "Don\'t know"\nvisits: number 0..60 "How many visits?"',
)
def code_collision(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    if not q.nonresponse:
        return
    seen: set[tuple[int, int]] = set()
    for entry in q.entries:
        if entry.kind != "item" or not q.allows_nonresponse(entry.stmt):
            continue
        item = entry.stmt
        spec = item.type
        owner = f"grid `{entry.grid.name}`" if entry.grid is not None else f"`{item.name}`"
        if spec.kind in ("number", "decimal") and spec.lo is not None and spec.hi is not None:
            inside = [nr for nr in q.nonresponse if spec.lo <= nr.value <= spec.hi]
            if not inside or (id(spec), 0) in seen:
                continue
            seen.add((id(spec), 0))
            codes_word = ", ".join(f"`{nr.label}` = {nr.value}" for nr in inside)
            yield ctx.diag(
                "code-collision",
                spec.span,
                f"non-response {codes_word} lie{'s' if len(inside) == 1 else ''} inside the range "
                f"{spec.lo:g}..{spec.hi:g} of {owner}, so a recorded {inside[0].value} cannot be read; "
                f"narrow the range or mark the item `strict`",
                item=item.name,
                related=[(nr.span, f"non-response `{nr.label}` is defined here") for nr in inside],
            )
        elif spec.kind == "single":
            codes = q.item_codes(item)
            if codes is None:
                continue
            values = codes.by_value()
            for nr in q.nonresponse:
                option = values.get(nr.value)
                key = (id(codes), nr.value + 1)
                if option is None or key in seen:
                    continue
                seen.add(key)
                users = _users(q, codes) if not codes.inline else [item]
                where = f"{word_list(users)}" if users else owner
                yield ctx.diag(
                    "code-collision",
                    option.span,
                    f"`{option.label}` = {option.value} has the value of non-response `{nr.label}`, and "
                    f"{where} accept{'s' if len(users) == 1 else ''} non-response codes; give `{option.label}` "
                    f"another value or mark the item `strict`",
                    item=item.name,
                    related=[(nr.span, f"non-response `{nr.label}` is defined here"),
                             (item.name_span, f"`{item.name}` uses this list")],
                )


def word_list(items: list[n.Item], limit: int = 3) -> str:
    names = [f"`{i.name}`" for i in items[:limit]]
    more = len(items) - limit
    return ", ".join(names) + (f" and {more} more" if more > 0 else "")
