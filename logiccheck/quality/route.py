"""Route state per respondent × item, three-valued, for the quality and cleaning stages.

Reads an export in the default layout (DESIGN §6) and applies the semantics of DESIGN §3
and the contributor guide with numpy masks: an item is due when its whole condition is
true, no earlier stop fired and no skip spanning it fired; an answer the routing did not
allow, or an invalid value, opens nothing later (cascade). The data stage's evaluator
computes the same states; this module keeps quality and cleaning testable on their own.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.data.evaluate import close  # decimals compare as the solver reads them
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


class RouteError(ValueError):
    """An export the route state cannot be computed for (e.g. no id column)."""


@dataclass
class Tri:
    """A three-valued condition: `t` true, `f` false, neither = unknown."""

    t: np.ndarray
    f: np.ndarray


@dataclass
class Num:
    v: np.ndarray  # float, NaN = no value
    nr: np.ndarray  # a non-response code (comparable by =, !=; not ordered, no arithmetic)


@dataclass
class SetVal:
    chosen: dict[int, np.ndarray]
    has: np.ndarray


@dataclass
class TextVal:
    has: np.ndarray


@dataclass
class RouteState:
    ids: list[str]
    items: list[str]  # items and grid rows in questionnaire order (notes included)
    due: np.ndarray  # respondents × items
    has_value: np.ndarray
    valid: np.ndarray  # has a value and the value is valid
    nonresponse: np.ndarray  # the value is a non-response code
    stops: dict[str, np.ndarray] = field(default_factory=dict)
    checks_failed: dict[str, np.ndarray] = field(default_factory=dict)
    columns: dict[str, list[str]] = field(default_factory=dict)  # item -> its export columns

    def col(self, item: str) -> int:
        return self.items.index(item)


def _nr_values(q: Questionnaire) -> set[int]:
    return {o.value for o in q.nonresponse}


def item_columns(q: Questionnaire, entry: Entry) -> list[str]:
    stmt = entry.stmt
    if stmt.type.kind == "multi":
        codes = q.item_codes(stmt)
        return [f"{stmt.name}_{o.value}" for o in (codes.options if codes else [])]
    if stmt.type.kind == "note":
        return []
    return [stmt.name]


def _blank(series: pd.Series) -> np.ndarray:
    s = series
    if pd.api.types.is_numeric_dtype(s) or pd.api.types.is_bool_dtype(s):
        return s.isna().to_numpy()
    return s.isna().to_numpy() | s.astype(object).map(lambda v: str(v).strip() == "").to_numpy(dtype=bool)


class _Evaluator:
    def __init__(self, q: Questionnaire, frame: pd.DataFrame) -> None:
        self.q = q
        self.frame = frame
        self.n = len(frame)
        self.nr = _nr_values(q)
        self.values: dict[str, Any] = {}  # name -> Num | SetVal | TextVal | Tri (effective, after cascade)
        self.due: dict[str, np.ndarray] = {}

    # ------------------------------------------------------------ raw values
    def raw(self, entry: Entry) -> tuple[Any, np.ndarray, np.ndarray, np.ndarray]:
        """(value, has_value, valid, nonresponse) of an item or sample, as recorded."""
        stmt, n_ = entry.stmt, self.n
        kind = stmt.type.kind
        zeros = np.zeros(n_, dtype=bool)
        if kind == "note":
            return TextVal(zeros), zeros, zeros, zeros
        if kind == "multi":
            codes = self.q.item_codes(stmt)
            chosen: dict[int, np.ndarray] = {}
            has = zeros.copy()
            bad = zeros.copy()
            for o in codes.options if codes else []:
                name = f"{stmt.name}_{o.value}"
                if name not in self.frame.columns:
                    chosen[o.value] = zeros.copy()
                    continue
                s = pd.to_numeric(self.frame[name], errors="coerce").to_numpy(dtype=float)
                blank = _blank(self.frame[name])
                chosen[o.value] = s == 1
                has |= s == 1
                bad |= ~blank & ~np.isin(s, (0, 1))
            any_recorded = has | bad
            return SetVal(chosen, has), any_recorded, any_recorded & ~bad, zeros
        if stmt.name not in self.frame.columns:
            return (TextVal(zeros) if kind == "text" else Num(np.full(n_, np.nan), zeros)), zeros, zeros, zeros
        col = self.frame[stmt.name]
        blank = _blank(col)
        if kind == "text":
            return TextVal(~blank), ~blank, ~blank, zeros
        v = pd.to_numeric(col, errors="coerce").to_numpy(dtype=float)
        has = ~blank
        allow_nr = self.q.allows_nonresponse(stmt)
        nr = has & np.isin(v, list(self.nr)) if allow_nr else zeros.copy()
        if kind == "single":
            codes = self.q.item_codes(stmt)
            ok = np.isin(v, [o.value for o in (codes.options if codes else [])])
        else:
            lo = -np.inf if stmt.type.lo is None else stmt.type.lo
            hi = np.inf if stmt.type.hi is None else stmt.type.hi
            ok = (v >= lo) & (v <= hi)
            if kind == "number":
                ok &= np.floor(v) == v
        valid = has & (ok | nr)
        return Num(v, nr), has, valid, nr

    # ------------------------------------------------------------ expressions
    def value(self, expr: Any) -> Any:
        if isinstance(expr, n.Num):
            return Num(np.full(self.n, float(expr.value)), np.zeros(self.n, bool))
        if isinstance(expr, n.Code):
            return Num(np.full(self.n, float(expr.value)), np.full(self.n, expr.value in self.nr))
        if isinstance(expr, n.Ref):
            if expr.name in self.values:
                return self.values[expr.name]
            return Num(np.full(self.n, np.nan), np.zeros(self.n, bool))
        if isinstance(expr, n.Neg):
            x = self.value(expr.operand)
            return Num(np.where(x.nr, np.nan, -x.v), np.zeros(self.n, bool))
        if isinstance(expr, n.Arith):
            a, b = self.value(expr.left), self.value(expr.right)
            av, bv = np.where(a.nr, np.nan, a.v), np.where(b.nr, np.nan, b.v)
            with np.errstate(all="ignore"):
                out = {"+": av + bv, "-": av - bv, "*": av * bv, "/": np.where(bv == 0, np.nan, av / bv)}[expr.op]
            return Num(out, np.zeros(self.n, bool))
        if isinstance(expr, n.Func):
            if expr.func == "count":
                x = self.values.get(expr.name)
                if isinstance(x, SetVal):
                    total = sum(c.astype(float) for c in x.chosen.values())
                    return Num(np.where(x.has, total, np.nan), np.zeros(self.n, bool))
                return Num(np.full(self.n, np.nan), np.zeros(self.n, bool))
            return self.cond(expr)
        return self.cond(expr)

    def cond(self, expr: Any) -> Tri:
        z = np.zeros(self.n, bool)
        if isinstance(expr, n.Not):
            x = self.cond(expr.operand)
            return Tri(x.f, x.t)
        if isinstance(expr, n.And):
            parts = [self.cond(o) for o in expr.operands]
            return Tri(np.logical_and.reduce([p.t for p in parts]), np.logical_or.reduce([p.f for p in parts]))
        if isinstance(expr, n.Or):
            parts = [self.cond(o) for o in expr.operands]
            return Tri(np.logical_or.reduce([p.t for p in parts]), np.logical_and.reduce([p.f for p in parts]))
        if isinstance(expr, n.Func):
            x = self.values.get(expr.name)
            if expr.func == "asked":
                d = self.due.get(expr.name, z)
                return Tri(d, ~d)
            has = _has(x, self.n)
            return Tri(has, ~has)
        if isinstance(expr, n.Compare):
            a, b = self.value(expr.left), self.value(expr.right)
            known = ~np.isnan(a.v) & ~np.isnan(b.v)
            if expr.op in ("=", "!="):
                same = close(a.v, b.v)
                eq = known & same
                ne = known & ~same
                return Tri(eq, ne) if expr.op == "=" else Tri(ne, eq)
            known &= ~a.nr & ~b.nr
            with np.errstate(invalid="ignore"):
                same = close(a.v, b.v)
                res = {"<": (a.v < b.v) & ~same, "<=": (a.v < b.v) | same,
                       ">": (a.v > b.v) & ~same, ">=": (a.v > b.v) | same}[expr.op]
            return Tri(known & res, known & ~res)
        if isinstance(expr, n.InList):
            a = self.value(expr.subject)
            known = ~np.isnan(a.v)
            hit = np.zeros(self.n, bool)
            for v in expr.values:
                hit |= known & close(a.v, self.value(v).v)
            return Tri(hit, known & ~hit)
        if isinstance(expr, n.InRange):
            a = self.value(expr.subject)
            known = ~np.isnan(a.v) & ~a.nr
            with np.errstate(invalid="ignore"):
                res = ((a.v >= expr.lo) | close(a.v, expr.lo)) & ((a.v <= expr.hi) | close(a.v, expr.hi))
            return Tri(known & res, known & ~res)
        if isinstance(expr, n.Has):
            x = self.value(expr.subject)
            if not isinstance(x, SetVal):
                return Tri(z, z)
            hits = [x.chosen.get(int(self.value(v).v[0]) if self.n else 0, z) for v in expr.values]
            if expr.mode == "all":
                res = np.logical_and.reduce(hits)
            else:
                res = np.logical_or.reduce(hits)
            return Tri(x.has & res, x.has & ~res)
        if isinstance(expr, n.Ref):
            x = self.value(expr)
            if isinstance(x, Tri):
                return x
        if isinstance(expr, n.Num):
            return Tri(np.full(self.n, expr.value != 0), np.full(self.n, expr.value == 0))
        return Tri(z, z)


def _has(x: Any, n_: int) -> np.ndarray:
    if isinstance(x, Num):
        return ~np.isnan(x.v)
    if isinstance(x, (SetVal, TextVal)):
        return x.has
    if isinstance(x, Tri):
        return x.t | x.f
    return np.zeros(n_, bool)


def _mask(x: Any, keep: np.ndarray) -> Any:
    if isinstance(x, Num):
        return Num(np.where(keep, x.v, np.nan), x.nr & keep)
    if isinstance(x, SetVal):
        return SetVal({k: v & keep for k, v in x.chosen.items()}, x.has & keep)
    if isinstance(x, TextVal):
        return TextVal(x.has & keep)
    return x


def route_state(q: Questionnaire, frame: pd.DataFrame, id_column: str = "id") -> RouteState:
    """Due, answered, valid and non-response masks for every respondent × item."""
    if id_column not in frame.columns:
        raise RouteError(f"the export has no respondent id column {id_column!r}; add it or map another column")
    ev = _Evaluator(q, frame)
    n_ = len(frame)
    stopped = np.zeros(n_, bool)
    skip_fired: list[tuple[int, np.ndarray]] = []
    items: list[str] = []
    due_cols, has_cols, valid_cols, nr_cols = [], [], [], []
    stops: dict[str, np.ndarray] = {}
    checks: dict[str, np.ndarray] = {}
    columns: dict[str, list[str]] = {}
    for entry in q.entries:
        if entry.index in q.broken:
            continue
        if entry.kind == "sample":
            value, has, valid, _ = ev.raw(entry)
            ev.values[entry.name] = _mask(value, valid)
            continue
        if entry.kind == "let":
            ev.values[entry.name] = ev.value(entry.own) if entry.own is not None else Num(np.full(n_, np.nan), np.zeros(n_, bool))
            continue
        reached = ~stopped
        for target_from, fired in skip_fired:
            if target_from > entry.index:
                reached = reached & ~fired
        for cond in entry.conditions():
            reached = reached & ev.cond(cond).t
        if entry.kind == "item":
            value, has, valid, nr = ev.raw(entry)
            ev.due[entry.name] = reached
            ev.values[entry.name] = _mask(value, reached & valid)
            items.append(entry.name)
            columns[entry.name] = item_columns(q, entry)
            due_cols.append(reached)
            has_cols.append(has)
            valid_cols.append(valid)
            nr_cols.append(nr)
        elif entry.kind == "stop":
            stops[entry.name] = reached.copy()
            stopped = stopped | reached
        elif entry.kind == "skip" and entry.skip_target is not None:
            skip_fired.append((entry.skip_target, reached))
        elif entry.kind == "check" and entry.require is not None:
            checks[entry.name] = reached & ev.cond(entry.require).f

    def stack(cols: list[np.ndarray]) -> np.ndarray:
        return np.stack(cols, axis=1) if cols else np.zeros((n_, 0), bool)

    ids = [str(v) for v in frame[id_column].tolist()]
    return RouteState(ids, items, stack(due_cols), stack(has_cols), stack(valid_cols), stack(nr_cols), stops, checks, columns)
