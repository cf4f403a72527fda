"""Mine display conditions: which simple condition over earlier columns explains who
answered a column.

A condition is a conjunction of at most two literals; a literal is `x in (codes)` on a
coded column, a threshold `x >= c` / `x < c` on a number, `x has option` on a multi, or
`answered(x)`. Every literal is a boolean array that is true only where the spec
language would call it true (a blank or a non-response code makes a comparison
unknown, and unknown does not ask), so a mined condition routes exactly as written.

For one column the best set of codes and the best threshold are found in one pass each
(counts per code or per distinct value, then a cumulative sum), so a search costs a few
numpy reductions per earlier column; a second literal is searched only inside the rows a
promising first literal keeps.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np

# A condition must explain this many more respondents than the next simpler one (and
# remove this share of its errors) to be worth writing: item non-response and a few
# answers off the route never justify a condition of their own. Common practice, no source.
MIN_GAIN_SHARE = 0.005
MIN_GAIN_ROWS = 10
MIN_GAIN_RELATIVE = 0.10
# Literals within this many errors of the best are ties, settled by simplicity and order.
TIE_SHARE = 0.001
# A second literal is searched inside the rows of at most this many first literals.
ANCHORS = 24
# The search runs on a random sample of at most this many rows; the chosen condition is
# then scored on every row.
SEARCH_ROWS = 20_000


@dataclass
class Var:
    """One earlier column as the miner sees it."""

    name: str
    kind: str  # coded | number | multi | text
    present: np.ndarray  # bool: a value (answered)
    value: np.ndarray | None = None  # float64, NaN where none (coded, number)
    nr: np.ndarray | None = None  # bool: the value is a non-response code
    chosen: np.ndarray | None = None  # n × options, for multi
    options: list[int] = field(default_factory=list)  # codes (coded) or option values (multi)
    # Non-response codes valid here (coded): a set may name them (`x in (yes, dk)`), a
    # threshold never does (an ordering comparison on them is unknown).
    nr_codes: list[int] = field(default_factory=list)
    labels: dict[int, str] = field(default_factory=dict)  # code or option -> label name
    integer: bool = True
    position: int = 0  # order in the questionnaire (earlier = smaller)
    _index: np.ndarray | None = None  # per row: code position (codes, then non-response codes); none last
    _uniq: tuple[np.ndarray, np.ndarray] | None = None  # distinct substantive numbers, per-row index

    @property
    def all_codes(self) -> list[int]:
        return [*self.options, *self.nr_codes]

    def code_index(self) -> np.ndarray:
        if self._index is None:
            codes = self.all_codes
            k = len(codes)
            idx = np.full(len(self.present), k, dtype=np.intp)
            if self.value is not None and k:
                ok = self.present & ~np.isnan(self.value)
                where = {float(c): i for i, c in enumerate(codes)}
                uniq, inv = np.unique(self.value[ok], return_inverse=True)
                slot = np.array([where.get(float(u), k) for u in uniq.tolist()], dtype=np.intp)
                idx[ok] = slot[inv.reshape(-1)] if len(uniq) else k
            self._index = idx
        return self._index

    def numbers(self) -> tuple[np.ndarray, np.ndarray]:
        """Distinct substantive numbers and, per row, their index (len(uniq) for none)."""
        if self._uniq is None:
            assert self.value is not None
            ok = self.present & ~self._nr() & ~np.isnan(self.value)
            uniq, inv = np.unique(self.value[ok], return_inverse=True)
            idx = np.full(len(self.present), len(uniq), dtype=np.intp)
            idx[ok] = inv.reshape(-1)
            self._uniq = (uniq, idx)
        return self._uniq

    def _nr(self) -> np.ndarray:
        return self.nr if self.nr is not None else np.zeros(len(self.present), dtype=bool)

    def subset(self, rows: np.ndarray) -> Var:
        """The same column for some rows only (for the search sample)."""
        return Var(
            self.name, self.kind, self.present[rows],
            None if self.value is None else self.value[rows],
            None if self.nr is None else self.nr[rows],
            None if self.chosen is None else self.chosen[rows],
            self.options, self.nr_codes, self.labels, self.integer, self.position,
        )


@dataclass(frozen=True)
class Literal:
    """One comparison: `op` is in | ge | lt | has | answered."""

    var: str
    op: str
    codes: tuple[float, ...] = ()  # in: the codes; has: the option; ge/lt: the threshold

    def mask(self, v: Var) -> np.ndarray:
        if self.op == "answered":
            return v.present.copy()
        if self.op == "has":
            assert v.chosen is not None
            return v.chosen[:, v.options.index(int(self.codes[0]))].copy()
        assert v.value is not None
        if self.op == "in":
            return v.present & np.isin(v.value, np.asarray(self.codes))
        nr = v.nr if v.nr is not None else np.zeros(len(v.present), dtype=bool)
        ok = v.present & ~nr & ~np.isnan(v.value)
        with np.errstate(invalid="ignore"):
            if self.op == "ge":
                return ok & (v.value >= self.codes[0])
            return ok & (v.value < self.codes[0])

    def text(self, v: Var) -> str:
        if self.op == "answered":
            return f"answered({self.var})"
        if self.op == "has":
            return f"{self.var} has {v.labels.get(int(self.codes[0]), int(self.codes[0]))}"
        if self.op in ("ge", "lt"):
            c = self.codes[0]
            num = f"{int(c)}" if float(c).is_integer() else f"{c:g}"
            return f"{self.var} {'>=' if self.op == 'ge' else '<'} {num}"
        names = [str(v.labels.get(int(c), int(c))) for c in self.codes]
        if len(names) == 1:
            return f"{self.var} = {names[0]}"
        return f"{self.var} in ({', '.join(names)})"

    @property
    def rank(self) -> int:
        """Simplicity, for ties: an equality before a threshold before a set before `has`
        before `answered`."""
        if self.op == "in":
            return 0 if len(self.codes) == 1 else 2
        return {"ge": 1, "lt": 1, "has": 1, "answered": 3}[self.op]


@dataclass(frozen=True)
class Condition:
    """A conjunction of literals; no literals means always asked."""

    literals: tuple[Literal, ...] = ()

    def mask(self, vars_: dict[str, Var], n: int) -> np.ndarray:
        out = np.ones(n, dtype=bool)
        for lit in self.literals:
            out &= lit.mask(vars_[lit.var])
        return out

    def text(self, vars_: dict[str, Var]) -> str:
        return " and ".join(lit.text(vars_[lit.var]) for lit in self.literals)

    def reads(self) -> list[str]:
        return [lit.var for lit in self.literals]


@dataclass
class Mined:
    """A mined condition and how many respondents it explains (of `total`)."""

    condition: Condition
    explained: int
    total: int

    @property
    def share(self) -> float:
        return self.explained / self.total if self.total else 1.0


# ------------------------------------------------------------------ one literal per column
def _best_literal(v: Var, w: np.ndarray, a: np.ndarray) -> tuple[int, Literal] | None:
    """The literal on `v` with fewest errors inside rows `w` (predicting `a`), and those
    errors. None when `v` offers no literal."""
    wa, wn = w & a, w & ~a
    best: tuple[int, Literal] | None = None

    def consider(err: int, lit: Literal) -> None:
        nonlocal best
        if best is None or err < best[0] or (err == best[0] and lit.rank < best[1].rank):
            best = (err, lit)

    if v.kind == "coded" and v.options:
        codes = v.all_codes
        k, m = len(v.options), len(codes)
        pos, neg = _per_value(v.code_index(), m, wa, wn)
        take = pos[:m] > neg[:m]
        if take[:k].any():
            err = int(neg[:m][take].sum() + pos[:m][~take].sum() + pos[m])
            consider(err, Literal(v.name, "in", tuple(float(c) for c, t in zip(codes, take.tolist(), strict=True) if t)))
        if k >= 3:
            # Codes are ordered: a threshold reads better than a long set where it fits as well.
            for err, op, code in _thresholds(pos[:k], neg[:k], int(pos[k:].sum()), np.asarray(v.options, dtype=np.float64)):
                consider(int(err), Literal(v.name, op, (code,)))
    elif v.kind == "number" and v.value is not None:
        uniq, idx = v.numbers()
        m = len(uniq)
        if m >= 2:
            pos, neg = _per_value(idx, m, wa, wn)
            for err, op, cut in _thresholds(pos[:m], neg[:m], int(pos[m]), uniq):
                consider(int(err), Literal(v.name, op, (cut,)))
    elif v.kind == "multi" and v.chosen is not None and v.options:
        tp = (v.chosen & wa[:, None]).sum(axis=0)
        fp = (v.chosen & wn[:, None]).sum(axis=0)
        total_pos = int(wa.sum())
        err = (total_pos - tp) + fp
        j = int(np.argmin(err))
        consider(int(err[j]), Literal(v.name, "has", (float(v.options[j]),)))
    if v.kind in ("text", "multi", "number", "coded"):
        err = int((wa & ~v.present).sum() + (wn & v.present).sum())
        consider(err, Literal(v.name, "answered"))
    return best


def _per_value(idx: np.ndarray, k: int, wa: np.ndarray, wn: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Answered and blank rows per value index (slot k: no usable value)."""
    return np.bincount(idx[wa], minlength=k + 1), np.bincount(idx[wn], minlength=k + 1)


def _thresholds(pos: np.ndarray, neg: np.ndarray, none_pos: int, values: np.ndarray) -> list[tuple[int, str, float]]:
    """The best `>=` and `<` cuts over ordered values, given answered (`pos`) and blank
    (`neg`) counts per value; `none_pos` answered rows have no usable value."""
    if len(values) < 2:
        return []
    # Cut before value j (1..m-1): "ge" takes values j.., "lt" takes ..j-1.
    cpos, cneg = np.cumsum(pos), np.cumsum(neg)
    below_pos, below_neg = cpos[:-1], cneg[:-1]
    err_ge = below_pos + (cneg[-1] - below_neg) + none_pos
    err_lt = (cpos[-1] - below_pos) + below_neg + none_pos
    j, i = int(np.argmin(err_ge)), int(np.argmin(err_lt))
    return [(err_ge[j], "ge", float(values[j + 1])), (err_lt[i], "lt", float(values[i + 1]))]


def _anchors(v: Var, w: np.ndarray, a: np.ndarray) -> list[Literal]:
    """Literals on `v` that could be one half of a conjunction: they keep most answered
    rows while dropping more than their share of blank ones (codes and options answered
    more often than average, and the threshold with the least balanced error)."""
    wa, wn = w & a, w & ~a
    n_pos, n_neg = max(int(wa.sum()), 1), max(int(wn.sum()), 1)
    base = n_pos / (n_pos + n_neg)
    out: list[Literal] = []
    if v.kind == "coded" and v.options:
        codes = v.all_codes
        m = len(codes)
        pos, neg = (x[:m] for x in _per_value(v.code_index(), m, wa, wn))
        rate = pos / np.maximum(pos + neg, 1)
        lift = rate > base
        if lift[: len(v.options)].any():
            out.append(Literal(v.name, "in", tuple(float(c) for c, t in zip(codes, lift.tolist(), strict=True) if t)))
            out += [Literal(v.name, "in", (float(c),)) for c, t in zip(v.options, lift.tolist(), strict=False) if t]
    elif v.kind == "number" and v.value is not None:
        uniq, idx = v.numbers()
        m = len(uniq)
        if m >= 2:
            pos, neg = _per_value(idx, m, wa, wn)
            for _err, op, cut in _thresholds(pos[:m] / n_pos, neg[:m] / n_neg, pos[m] / n_pos, uniq):
                out.append(Literal(v.name, op, (cut,)))
    elif v.kind == "multi" and v.chosen is not None and v.options:
        tp = (v.chosen & wa[:, None]).sum(axis=0)
        fp = (v.chosen & wn[:, None]).sum(axis=0)
        rate = tp / np.maximum(tp + fp, 1)
        out += [Literal(v.name, "has", (float(o),)) for o, r in zip(v.options, rate.tolist(), strict=True) if r > base]
    out.append(Literal(v.name, "answered"))
    return out


def _pick(cands: list[tuple[int, Literal, Var]], tie: int) -> tuple[int, Literal, Var] | None:
    """The best candidate; near ties go to the simplest literal, then the earliest column."""
    if not cands:
        return None
    least = min(c[0] for c in cands)
    close = [c for c in cands if c[0] <= least + tie]
    return min(close, key=lambda c: (c[1].rank, c[2].position, c[0]))


def _worth(before: int, after: int, n: int) -> bool:
    gain = before - after
    return gain >= max(MIN_GAIN_ROWS, MIN_GAIN_SHARE * n) and gain >= MIN_GAIN_RELATIVE * before


def search(earlier: Sequence[Var], answered: np.ndarray, alive: np.ndarray) -> Condition:
    """The simplest condition over `earlier` columns that explains `answered` among the
    `alive` rows (respondents no stop has ended before this column)."""
    n = len(answered)
    tie = max(2, int(TIE_SHARE * n))
    a = answered & alive
    base = int((alive & ~answered).sum())  # errors of "always asked"
    singles: list[tuple[int, Literal, Var]] = []
    for v in earlier:
        got = _best_literal(v, alive, a)
        if got is not None:
            singles.append((got[0], got[1], v))
    first = _pick(singles, tie)
    if first is None or not _worth(base, first[0], n):
        return Condition()
    best_err, best = first[0], Condition((first[1],))
    # A second literal: inside the rows each promising first literal keeps. Every literal
    # needs a value, so a pair misses at least the answered rows outside either column's
    # values: halves that miss more than a worthwhile pair may err are not tried.
    limit = best_err - max(MIN_GAIN_ROWS, MIN_GAIN_SHARE * n, MIN_GAIN_RELATIVE * best_err) + tie
    pairs: list[tuple[int, Literal, Var, Literal, Var]] = []
    n_pos, n_neg = max(int(a.sum()), 1), max(int((alive & ~a).sum()), 1)
    scored = []
    for v in earlier:
        if int((a & ~v.present).sum()) > limit:
            continue
        for lit in {*_anchors(v, alive, a), *(s[1] for s in singles if s[2] is v)}:
            keep = lit.mask(v) & alive
            missed = int((a & ~keep).sum())  # answered, but the first literal says not asked
            if missed > limit:
                continue
            balanced = missed / n_pos + int((keep & ~a).sum()) / n_neg
            scored.append((balanced, lit.rank, v.position, lit, v, keep, missed))
    scored.sort(key=lambda t: (*t[:3], t[3].op, t[3].codes))  # a total order: runs repeat exactly
    absent = ~np.column_stack([v.present for v in earlier])
    for _b, _r, _p, lit1, v1, keep, missed in scored[:ANCHORS]:
        floor = missed + np.count_nonzero(absent & (a & keep)[:, None], axis=0)
        for j, v2 in enumerate(earlier):
            if v2 is v1 or floor[j] > limit:
                continue
            got = _best_literal(v2, keep, a)
            if got is not None:
                pairs.append((missed + got[0], lit1, v1, got[1], v2))
    if pairs:
        least = min(p[0] for p in pairs)
        close = [p for p in pairs if p[0] <= least + tie]
        err2, l1, v1, l2, v2 = min(close, key=lambda p: (p[1].rank + p[3].rank, min(p[2].position, p[4].position), p[0]))
        if _worth(best_err, err2, n):
            ordered = sorted([(v1.position, l1), (v2.position, l2)], key=lambda t: t[0])
            return Condition(tuple(lit for _, lit in ordered))
    return best


def explained(cond: Condition, vars_: dict[str, Var], answered: np.ndarray, alive: np.ndarray) -> int:
    """Respondents whose answered-or-blank the condition gets right (stopped ones: blank)."""
    pred = cond.mask(vars_, len(answered)) & alive
    return int((pred == answered).sum())


def mine(
    earlier: Sequence[Var], answered: np.ndarray, alive: np.ndarray, *, seed: int = 0,
    sample: np.ndarray | None = None, sampled: Sequence[Var] | None = None,
) -> Mined:
    """Search on a sample of rows (all of them when few), score on every row.
    `sampled`: `earlier` already cut to `sample` (callers mining many columns cut each
    column once, so its code index is built once, not once per later column)."""
    n = len(answered)
    if sample is None:
        sample = sample_rows(n, seed)
    if sample is not None:
        small = sampled if sampled is not None else [v.subset(sample) for v in earlier]
        cond = search(small, answered[sample], alive[sample])
    else:
        cond = search(earlier, answered, alive)
    vars_ = {v.name: v for v in earlier}
    return Mined(cond, explained(cond, vars_, answered, alive), n)


def sample_rows(n: int, seed: int = 0) -> np.ndarray | None:
    """Sorted row numbers to search on, or None for every row."""
    if n <= SEARCH_ROWS:
        return None
    rng = np.random.default_rng(seed)
    return np.sort(rng.choice(n, size=SEARCH_ROWS, replace=False))


# ------------------------------------------------------------------ stops
# A stop is drafted where at least this share of the respondents with a value have
# nothing after it (a few answers after a screen-out are off-route data, not routing).
STOP_PURITY = 0.98
STOP_MIN_ROWS = 10
STOP_MIN_SHARE = 0.002


def _slack(count: np.ndarray) -> np.ndarray:
    """Answers after a screen-out tolerated among `count` respondents: one, or the
    share STOP_PURITY leaves, whichever is more."""
    return np.maximum(1, np.floor((1 - STOP_PURITY) * count))


def stop_literal(v: Var, dead: np.ndarray, alive: np.ndarray) -> Literal | None:
    """A literal on `v` whose respondents (almost) all have nothing after `v`, while most
    others go on: the screen-out `stop ... when LITERAL`."""
    n = len(dead)
    w = alive & v.present
    support = max(STOP_MIN_ROWS, int(STOP_MIN_SHARE * n))
    if not w.any():
        return None
    rest_goes_on: Callable[[np.ndarray], bool] = lambda lit: int((w & ~lit & ~dead).sum()) >= 0.5 * int((w & ~lit).sum()) and (w & ~lit).any()  # noqa: E731
    if v.kind == "coded" and v.options:
        k, m = len(v.options), len(v.all_codes)
        idx = v.code_index()
        cnt = np.bincount(idx[w], minlength=m + 1)[:k]
        dd = np.bincount(idx[w & dead], minlength=m + 1)[:k]
        take = (cnt >= min(support, STOP_MIN_ROWS)) & (cnt - dd <= _slack(cnt))
        if take.any() and cnt[take].sum() >= support:
            lit = Literal(v.name, "in", tuple(float(c) for c, t in zip(v.options, take.tolist(), strict=True) if t))
            if rest_goes_on(lit.mask(v)):
                return lit
        return None
    if v.kind == "number" and v.value is not None:
        uniq, idx = v.numbers()
        m = len(uniq)
        if m < 2:
            return None
        cnt = np.bincount(idx[w], minlength=m + 1)[:m]
        live = cnt - np.bincount(idx[w & dead], minlength=m + 1)[:m]
        best: Literal | None = None
        best_rows = 0
        for op, order in (("lt", slice(None)), ("ge", slice(None, None, -1))):
            c, lv = np.cumsum(cnt[order]), np.cumsum(live[order])
            ok = (lv <= _slack(c)) & (c >= support) & (c < c[-1])
            if ok.any():
                j = int(np.flatnonzero(ok)[-1])  # the largest pure prefix
                if op == "lt":
                    lit = Literal(v.name, "lt", (float(uniq[j + 1]),))
                else:
                    lit = Literal(v.name, "ge", (float(uniq[m - 1 - j]),))
                if int(c[j]) > best_rows and rest_goes_on(lit.mask(v)):
                    best, best_rows = lit, int(c[j])
        return best
    return None
