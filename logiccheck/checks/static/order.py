"""Checks on questionnaire order: reading ahead, jumping back, reading shuffled siblings."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.diagnostics import Diagnostic
from logiccheck.graph import reads_of
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


def _block_word(owner: Any) -> str:
    return f"{'grid' if isinstance(owner, n.Grid) else 'section'} `{owner.name}`"


def block_starts(q: Questionnaire) -> dict[int, int]:
    """id(section or grid) -> index of its first entry."""
    out: dict[int, int] = {}
    for entry in q.entries:
        for owner, _ in entry.context:
            out.setdefault(id(owner), entry.index)
    return out


def _reader_word(entry: Entry) -> str:
    if entry.kind in ("item", "let"):
        return f"`{entry.name}`"
    return f"`{entry.kind} {entry.name}`"


@register(
    "forward-reference",
    severity="error",
    stage="spec",
    summary="A condition, pipe or derived value reads an item that comes later, or itself.",
    what="A `when` condition, a piped `{name}` in a text, a `let`, or a section or grid "
    "condition that reads an item, row or derived value defined further down the "
    "questionnaire (or the statement itself). A section or grid condition is reported "
    "once, at the condition. Sample variables are known from the start and may be read "
    "anywhere. A `check` rule is judged where it stands (DEVELOPERS.md, semantics), so "
    "it too must come after the items it reads.",
    why="When the condition is evaluated the respondent has not answered that item yet, "
    "so it has no value: the follow-up is never shown, or a piped text is empty.",
    bad='detail: text "Tell us more" when satisfied = no\nsatisfied: single yesno "Satisfied?"',
    good='satisfied: single yesno "Satisfied?"\ndetail: text "Tell us more" when satisfied = no',
)
def forward_reference(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    starts = block_starts(q)
    done_blocks: set[tuple[int, object]] = set()
    for entry in q.entries:
        for read in reads_of(q, entry):
            target = q.symbols[read.name]
            if target.kind == "sample":
                continue
            where = f"line {target.span.line}"
            if read.via == "context":
                owner = read.owner
                assert owner is not None  # a "context" read always names its section or grid
                start = starts.get(id(owner), entry.index)
                if target.index < start or (id(owner), read.span) in done_blocks:
                    continue
                done_blocks.add((id(owner), read.span))
                inside = target.index < start + _block_size(q, owner)
                how = "is asked inside it" if inside else f"comes later ({where})"
                yield ctx.diag(
                    "forward-reference",
                    read.span,
                    f"the condition of {_block_word(owner)} reads `{read.name}`, which {how}; "
                    f"it has no value yet when the condition is decided",
                    item=owner.name,
                    related=[(target.span, f"`{read.name}` is defined here")],
                )
                continue
            if target.index < entry.index:
                continue
            if target.index == entry.index:
                message = f"{_reader_word(entry)} reads itself"
                if read.via == "pipe":
                    message = f"{_reader_word(entry)} pipes its own answer into its text"
                yield ctx.diag("forward-reference", read.span, message, item=entry.name or None)
                continue
            if read.via == "pipe":
                message = (
                    f"{_reader_word(entry)} pipes `{{{read.name}}}` into its text, but `{read.name}` comes "
                    f"later ({where}): it has no value yet"
                )
            elif read.via == "let":
                message = (
                    f"derived value `{entry.name}` reads `{read.name}`, which comes later ({where}); "
                    f"a derived value is computed where it stands"
                )
            else:
                message = (
                    f"the condition of {_reader_word(entry)} reads `{read.name}`, which comes later "
                    f"({where}): it has no value yet when {_reader_word(entry)} is reached"
                )
            yield ctx.diag(
                "forward-reference",
                read.span,
                message,
                item=entry.name or None,
                related=[(target.span, f"`{read.name}` is defined here")],
            )


def _block_size(q: Questionnaire, owner: Any) -> int:
    return sum(1 for e in q.entries if any(o is owner for o, _ in e.context))


@register(
    "backward-skip",
    severity="error",
    stage="spec",
    summary="A `skip to` names a target that comes before it.",
    what="A `skip to NAME` whose target item or section is earlier in the questionnaire "
    "than the skip itself, or is the section the skip stands in.",
    why="A skip only ever jumps forward: a backward target would re-ask items already "
    "answered (or loop), and fielding tools treat it in different ways or reject it.",
    bad='intro: single yesno "Start?"\nskip to intro when intro = no',
    good='intro: single yesno "Start?"\nskip to outro when intro = no\nmiddle: text "..."\noutro: note "Thanks"',
)
def backward_skip(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    for entry in q.entries:
        if entry.kind != "skip" or entry.skip_target is None:
            continue
        target = entry.stmt.target
        enclosing = [o for o, _ in entry.context if isinstance(o, n.Section) and o.name == target]
        if target in q.symbols:
            target_span = q.symbols[target].span
        else:
            section = q.sections.get(target)
            target_span = section.name_span if section is not None else entry.stmt.target_span
        if enclosing:
            message = (
                f"`skip to {target}` names the section it stands in; a skip jumps forward to a "
                f"later item or section"
            )
        elif entry.skip_target <= entry.index:
            message = (
                f"`skip to {target}` jumps back: `{target}` is on line {target_span.line}, before this skip; "
                f"a skip can only jump forward"
            )
        else:
            continue
        yield ctx.diag(
            "backward-skip",
            entry.stmt.target_span,
            message,
            item=target,
            related=[(target_span, f"`{target}` is defined here")],
        )


@register(
    "shuffled-dependency",
    severity="warning",
    stage="spec",
    summary="A condition or pipe reads a sibling in a shuffled section or grid.",
    what="An item, row, nested section or stop inside a `shuffled` section or grid whose "
    "condition or piped text reads another item of the same shuffled block.",
    why="The block is presented in random order, so for some respondents the item read "
    "has not been asked yet: the follow-up is skipped or the pipe is empty for them only.",
    bad='grid taste single agree5 "Agree?" shuffled\n  sweet "Too sweet"\n  salty "Too salty" when sweet = sa',
    good='grid taste single agree5 "Agree?" shuffled\n  sweet "Too sweet"\n  salty "Too salty"\n'
    'why_sweet: text "Why?" when sweet = sa',
)
def shuffled_dependency(ctx: LintContext) -> Iterable[Diagnostic]:
    q = ctx.q
    seen: set[tuple[int, int, str]] = set()
    for entry in q.entries:
        if entry.kind in ("let", "check"):
            continue
        owners = [o for o, _ in entry.context]
        for read in reads_of(q, entry):
            if read.via == "context":
                # Read by a nested block's condition: only blocks enclosing that block count.
                position = next((k for k, o in enumerate(owners) if o is read.owner), 0)
                ancestors = owners[:position]
            else:
                ancestors = owners
            target = q.symbols[read.name]
            target_owners = {id(o) for o, _ in target.context}
            for block in ancestors:
                if not getattr(block, "shuffled", False) or id(block) not in target_owners:
                    continue
                key = (read.span.line, read.span.column, read.name)
                if key in seen:
                    continue
                seen.add(key)
                reader = (
                    f"the condition of {_block_word(read.owner)}" if read.via == "context"
                    else f"{_reader_word(entry)}"
                )
                verb = "pipes" if read.via == "pipe" else "reads"
                yield ctx.diag(
                    "shuffled-dependency",
                    read.span,
                    f"{reader} {verb} `{read.name}`, but both are in shuffled {_block_word(block)}: "
                    f"in random order `{read.name}` may not be asked yet; move the dependent item out "
                    f"of the block or drop `shuffled`",
                    item=entry.name or None,
                    related=[(target.span, f"`{read.name}` is defined here"), (block.name_span, "shuffled here")],
                )
