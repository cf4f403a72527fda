"""Compare two versions of a spec: items, answer lists, wording, and who is asked."""

from __future__ import annotations

from typing import Any

from logiccheck.diff.model import KINDS, Change, SpecDiff
from logiccheck.diff.routing import CrossVersion
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

POSITION_KEYS = frozenset({"span", "name_span", "text_span", "codes_span", "target_span"})


def _strip(value: Any) -> Any:
    """A node as plain data without positions, for structural equality."""
    if isinstance(value, n.BaseModel):
        return _strip(value.model_dump())
    if isinstance(value, dict):
        return {k: _strip(v) for k, v in value.items() if k not in POSITION_KEYS}
    if isinstance(value, list):
        return [_strip(v) for v in value]
    return value


def _change(kind: str, item: str | None, message: str, **kw: Any) -> Change:
    return Change(kind=kind, impact=KINDS[kind][0], item=item, message=message, **kw)


def _options(q: Questionnaire, stmt: Any) -> list[n.CodeOption]:
    codes = q.item_codes(stmt)
    return list(codes.options) if codes else []


def _signature(q: Questionnaire, e: Entry) -> tuple[Any, ...]:
    """What identifies an item apart from its name: type, answers and text."""
    t = e.stmt.type
    opts = tuple((o.label, o.value, o.text) for o in _options(q, e.stmt))
    return (t.kind, t.lo, t.hi, opts, e.stmt.text, e.stmt.grid is not None)


def _items(q: Questionnaire) -> dict[str, Entry]:
    return {e.name: e for e in q.entries if e.is_item}


def _renames(old: Questionnaire, new: Questionnaire) -> dict[str, str]:
    """new name -> old name, for items with the same text and answers under a new name."""
    old_items, new_items = _items(old), _items(new)
    gone = [k for k in old_items if k not in new_items]
    added = [k for k in new_items if k not in old_items]
    out: dict[str, str] = {}
    taken: set[str] = set()
    for name in added:
        sig = _signature(new, new_items[name])
        match = [g for g in gone if g not in taken and _signature(old, old_items[g]) == sig]
        if len(match) == 1:  # an ambiguous match is reported as remove + add
            out[name] = match[0]
            taken.add(match[0])
    return out


def _answer_changes(old: Questionnaire, new: Questionnaire, oe: Entry, ne: Entry, name: str) -> list[Change]:
    ot, nt = oe.stmt.type, ne.stmt.type
    where = {"old": oe.span, "new": ne.span}
    if ot.kind != nt.kind:
        return [_change("type-changed", name, f"`{name}` was {ot.kind}, is now {nt.kind}", **where)]
    out: list[Change] = []
    if (ot.lo, ot.hi) != (nt.lo, nt.hi):
        out.append(
            _change("type-changed", name, f"`{name}` range {_range(ot)} is now {_range(nt)}", **where,
                    details={"old_range": [ot.lo, ot.hi], "new_range": [nt.lo, nt.hi]})
        )
    if old.allows_nonresponse(oe.stmt) != new.allows_nonresponse(ne.stmt):
        now = "accepts" if new.allows_nonresponse(ne.stmt) else "no longer accepts"
        out.append(_change("type-changed", name, f"`{name}` {now} non-response codes (`strict` changed)", **where))
    if not ot.coded:
        return out
    listed = ot.codes_name if ot.codes_name == nt.codes_name else None
    out.extend(_option_changes(_options(old, oe.stmt), _options(new, ne.stmt), name, f"`{name}`", where, listed))
    return out


def _option_changes(
    before: list[n.CodeOption],
    after: list[n.CodeOption],
    item: str | None,
    what: str,
    where: dict[str, Any],
    listed: str | None = None,
) -> list[Change]:
    """Recodes, new, lost and reworded options between two versions of an answer list
    (an item's, a sample variable's, a named list nothing uses, or the non-response
    codes). `listed` names the list in the change's details."""
    extra = {"list": listed} if listed else {}
    by_label_old = {o.label: o for o in before}
    by_label_new = {o.label: o for o in after}
    by_value_old = {o.value: o for o in before}
    by_value_new = {o.value: o for o in after}
    out: list[Change] = []
    moved = []
    for label, o in by_label_old.items():
        m = by_label_new.get(label)
        if m is not None and m.value != o.value:
            moved.append(f"`{label}` {o.value} → {m.value}")
    if moved:
        first = next(m for lb, m in by_label_new.items() if lb in by_label_old and by_label_old[lb].value != m.value)
        out.append(
            _change("recode", item, f"{what}: answers stored under other values: " + ", ".join(moved),
                    old=where.get("old"), new=first.span, details={"moved": moved, **extra})
        )
    for label, o in by_label_old.items():
        m = by_label_new.get(label)
        if m is not None and m.value == o.value and m.text != o.text:
            out.append(
                _change("option-reworded", item, f"{what} option `{label}`: \"{o.text}\" is now \"{m.text}\"",
                        **where, details=dict(extra))
            )
    # An option counts as added or removed when neither its label nor its value survives.
    for o in after:
        if o.label not in by_label_old and o.value not in by_value_old:
            out.append(_change("option-added", item, f"{what} gains option `{o.label}` = {o.value} \"{o.text}\"",
                               **where, details=dict(extra)))
    for o in before:
        if o.label not in by_label_new and o.value not in by_value_new:
            out.append(_change("option-removed", item, f"{what} loses option `{o.label}` = {o.value} \"{o.text}\"",
                               **where, details=dict(extra)))
    relabelled = [
        f"{o.value}: `{o.label}` → `{by_value_new[o.value].label}`"
        for o in before
        if o.label not in by_label_new and o.value in by_value_new and by_value_new[o.value].label not in by_label_old
    ]
    if relabelled:
        out.append(
            _change("option-reworded", item, f"{what} labels renamed: " + ", ".join(relabelled), **where,
                    details=dict(extra))
        )
    return out


def _range(t: n.TypeSpec) -> str:
    def num(x: float | None) -> str:
        return "?" if x is None else (str(int(x)) if float(x).is_integer() else str(x))

    return f"{num(t.lo)}..{num(t.hi)}"


def _route_text(q: Questionnaire, e: Entry, rename: dict[str, str]) -> Any:
    """The statement's conditions and guards as plain data, names mapped to old ones."""
    stops, skips = q.guards(e)
    data = {
        "conds": [_strip(c) for c in e.conditions()],
        "stops": [[_strip(c) for c in s.conditions()] for s in stops],
        "skips": [[_strip(c) for c in s.conditions()] for s in skips],
        "require": _strip(e.require),
    }

    def rename_refs(value: Any) -> Any:
        if isinstance(value, dict):
            out = {k: rename_refs(v) for k, v in value.items()}
            if out.get("kind") in ("ref", "func") and out.get("name") in rename:
                out["name"] = rename[out["name"]]
            if out.get("kind") == "code":
                out.pop("value", None)  # codes are compared by label: a recode is reported apart
            return out
        if isinstance(value, list):
            return [rename_refs(v) for v in value]
        return value

    return rename_refs(data)


def diff_questionnaires(old: Questionnaire, new: Questionnaire, *, routing: bool = True) -> SpecDiff:
    """Every change between two resolved versions, in the new version's order."""
    result = SpecDiff(old_file=old.file, new_file=new.file)
    old_items, new_items = _items(old), _items(new)
    rename = _renames(old, new)
    renamed_old = set(rename.values())
    changes: list[Change] = []

    changes.extend(_list_changes(old, new))
    pairs: list[tuple[str, str]] = []  # (old name, new name) of items in both
    for name, ne in new_items.items():
        if name in old_items:
            pairs.append((name, name))
        elif name in rename:
            was = rename[name]
            pairs.append((was, name))
            changes.append(
                _change("item-renamed", name, f"`{was}` is now called `{name}`", old_name=was,
                        old=old_items[was].span, new=ne.span)
            )
        else:
            changes.append(_change("item-added", name, f"`{name}` is new", new=ne.span))
    for name, oe in old_items.items():
        if name not in new_items and name not in renamed_old:
            changes.append(_change("item-removed", name, f"`{name}` was removed", old=oe.span))

    cross = CrossVersion(old, new, rename) if routing else None
    for was, name in pairs:
        oe, ne = old_items[was], new_items[name]
        changes.extend(_answer_changes(old, new, oe, ne, name))
        if oe.stmt.text != ne.stmt.text:
            changes.append(
                _change("wording-changed", name, f"`{name}` text was \"{oe.stmt.text}\", is now \"{ne.stmt.text}\"",
                        old=oe.stmt.text_span, new=ne.stmt.text_span)
            )
        flags = _flag_changes(oe, ne)
        if flags:
            changes.append(_change("flags-changed", name, f"`{name}`: " + ", ".join(flags), **{"old": oe.span, "new": ne.span}))
        if cross is None:
            continue
        result.compared += 1
        verdict = cross.compare(was, name)
        where = {"old": oe.span, "new": ne.span}
        if verdict.error is not None:
            changes.append(_change("routing-not-compared", name, f"`{name}`: {verdict.error}", **where))
        elif verdict.same:
            result.routing_same += 1
            if _route_text(old, oe, {}) != _route_text(new, ne, rename):
                changes.append(
                    _change("routing-equivalent", name, f"`{name}`: the conditions were rewritten; "
                            "the solver proves the same respondents are asked", **where)
                )
        else:
            side, other = ("old", "new") if verdict.asked_old else ("new", "old")
            changes.append(
                _change("routing-changed", name,
                        f"`{name}`: a respondent is asked it in the {side} version and not in the {other}",
                        witness=verdict.witness, asked_in=side, **where)
            )
    changes.extend(_grid_changes(old, new))
    changes.extend(_sample_changes(old, new))
    changes.extend(_statement_changes(old, new, cross, rename))
    order = {name: i for i, name in enumerate(list(new_items) + [k for k in old_items if k not in new_items])}
    # Screen-outs first (they explain the routing changes after them), edit rules last.
    grid_first = {g: min((i for i, e in enumerate(new_items.values()) if e.grid is not None and e.grid.name == g), default=-1)
                  for g in new.grids}

    def rank(c: Change) -> float:
        if c.item in grid_first and c.item not in order:
            return grid_first[c.item] - 0.5
        if c.kind.startswith("stop-") or (c.kind == "routing-not-compared" and c.item in stops):
            return -0.5
        if c.kind.startswith("check-") or (c.kind == "routing-not-compared" and c.item in checks):
            return len(order)
        return order.get(c.item or "", -1)

    stops = {e.name for q in (old, new) for e in q.entries if e.kind == "stop"}
    checks = {e.name for q in (old, new) for e in q.entries if e.kind == "check"}
    changes.sort(key=rank)
    result.changes = changes
    return result


def _samples(q: Questionnaire) -> dict[str, Entry]:
    return {e.name: e for e in q.entries if e.kind == "sample"}


def _sample_changes(old: Questionnaire, new: Questionnaire) -> list[Change]:
    """Sample variables are compared as items are: the sample file must follow them."""
    out: list[Change] = []
    before, after = _samples(old), _samples(new)
    for name, e in after.items():
        if name not in before:
            out.append(_change("sample-added", name, f"sample variable `{name}` is new", new=e.span))
    for name, e in before.items():
        if name not in after:
            out.append(_change("sample-removed", name, f"sample variable `{name}` was removed", old=e.span))
    for name, e in after.items():
        if name in before:
            out.extend(
                c.model_copy(update={"message": "sample variable " + c.message})
                for c in _answer_changes(old, new, before[name], e, name)
            )
    return out


def _used_lists(q: Questionnaire) -> set[str]:
    return {e.stmt.type.codes_name for e in q.entries if e.kind in ("item", "sample") and e.stmt.type.codes_name}


def _list_changes(old: Questionnaire, new: Questionnaire) -> list[Change]:
    """The non-response codes, and named answer lists: a list some item or sample
    variable uses is reported with each of them; one nothing uses, under its own name."""
    span = {"old": old.nonresponse[0].span if old.nonresponse else None,
            "new": new.nonresponse[0].span if new.nonresponse else None}
    out = _option_changes(old.nonresponse, new.nonresponse, None, "the non-response list", span, "nonresponse")
    used = _used_lists(old) | _used_lists(new)
    for name, codes in new.codes.items():
        if name not in old.codes:
            out.append(_change("codes-added", name, f"answer list `{name}` is new", new=codes.span))
        elif name not in used:
            where = {"old": old.codes[name].span, "new": codes.span}
            out.extend(_option_changes(old.codes[name].options, codes.options, name, f"answer list `{name}`", where, name))
    for name, codes in old.codes.items():
        if name not in new.codes:
            out.append(_change("codes-removed", name, f"answer list `{name}` was removed", old=codes.span))
    return out


def _statement_changes(
    old: Questionnaire, new: Questionnaire, cross: CrossVersion | None, rename: dict[str, str]
) -> list[Change]:
    """Stops (screen-outs) and checks (edit rules), matched by name."""
    out: list[Change] = []
    for kind, word in (("stop", "stop"), ("check", "check")):
        before = {e.name: e for e in old.entries if e.kind == kind}
        after = {e.name: e for e in new.entries if e.kind == kind}
        for name, e in after.items():
            if name not in before:
                out.append(_change(f"{kind}-added", name, f"{word} `{name}` is new", new=e.span))
        for name, e in before.items():
            if name not in after:
                out.append(_change(f"{kind}-removed", name, f"{word} `{name}` was removed", old=e.span))
        for name, e_new in after.items():
            e_old = before.get(name)
            if e_old is None or cross is None:
                continue
            verdict = cross.compare_statement(e_old, e_new)
            where = {"old": e_old.span, "new": e_new.span}
            acts = "fires" if kind == "stop" else "fails"
            if verdict.error is not None:
                out.append(_change("routing-not-compared", name, f"{word} `{name}`: {verdict.error}", **where))
            elif not verdict.same:
                side, other = ("old", "new") if verdict.asked_old else ("new", "old")
                out.append(
                    _change(f"{kind}-changed", name,
                            f"{word} `{name}` {acts} for a respondent in the {side} version and not in the {other}",
                            witness=verdict.witness, asked_in=side, **where)
                )
            elif kind == "check" and _route_text(old, e_old, {}) != _route_text(new, e_new, rename):
                out.append(
                    _change("check-equivalent", name, f"check `{name}` was rewritten; the solver proves it fails "
                            "for the same respondents", **where)
                )
    return out


FLAG_NAMES = ("required", "strict", "gate", "key")


def _flag_changes(oe: Entry, ne: Entry) -> list[str]:
    out = []
    for flag in FLAG_NAMES:
        before, after = getattr(oe.stmt.flags, flag), getattr(ne.stmt.flags, flag)
        if before != after:
            out.append(f"now `{flag}`" if after else f"no longer `{flag}`")
    return out


def _grid_changes(old: Questionnaire, new: Questionnaire) -> list[Change]:
    """A grid's stem is part of every row's wording; `shuffled` changes the order effects."""
    out = []
    for name, g in new.grids.items():
        was = old.grids.get(name)
        if was is None:
            continue
        if was.text != g.text:
            out.append(_change("wording-changed", name, f"grid `{name}` stem was \"{was.text}\", is now \"{g.text}\"",
                               old=was.text_span, new=g.text_span))
        if was.shuffled != g.shuffled:
            now = "now `shuffled`" if g.shuffled else "no longer `shuffled`"
            out.append(_change("flags-changed", name, f"grid `{name}`: {now}", old=was.name_span, new=g.name_span))
    return out
