"""`routing-mismatch`: an item whose answers follow another condition far better than the
spec's own, which says the spec is wrong rather than thousands of respondents."""

from __future__ import annotations

from collections.abc import Callable, Iterator

import numpy as np

from logiccheck.checks.data_context import DataContext
from logiccheck.checks.registry import data_check
from logiccheck.data import causes
from logiccheck.data.findings import Hits
from logiccheck.draft import screen
from logiccheck.draft.mine import Mined, Var, explained, sample_rows, search

# "Far better": the mined condition must explain at least this share of respondents more
# than the spec's own and leave at most half of its errors. Common practice, no source.
MISMATCH_GAIN = 0.02
MISMATCH_ROWS = 10
MISMATCH_ERRORS = 0.5


def item_var(ctx: DataContext, j: int, rows: np.ndarray | None = None,
             value_of: Callable[[str], np.ndarray] | None = None) -> Var:
    """Item `j` as the miner sees it, cut to `rows` where given (`value_of`: the values
    of those rows only, typed for them alone). A value counts only where it was due and
    valid, as the routing reads it (an answer off the route opens nothing later)."""
    q = ctx.q
    name = ctx.items[j]
    stmt = q.symbols[name].stmt
    at = slice(None) if rows is None else rows
    usable = ctx.due[at, j] & ctx.valid[at, j]
    nonresponse = ctx.nonresponse[at, j] & usable
    values = value_of or (ctx.value_of if rows is None else ctx.value_of_rows(rows))
    kind = stmt.type.kind
    codes = q.item_codes(stmt)
    if kind == "single" and codes is not None:
        value = np.where(usable, values(name), np.nan)
        opts = sorted(o.value for o in codes.options)
        nr = [o for o in q.nonresponse] if q.allows_nonresponse(stmt) else []
        labels = {o.value: o.label for o in [*codes.options, *nr]}
        return Var(name, "coded", usable, value, nonresponse, options=opts,
                   nr_codes=[o.value for o in nr], labels=labels, position=j)
    if kind in ("number", "decimal"):
        value = np.where(usable, values(name), np.nan)
        return Var(name, "number", usable, value, nonresponse, integer=kind == "number", position=j)
    if kind == "multi" and codes is not None:
        opts = sorted(o.value for o in codes.options)
        chosen = np.column_stack([usable & (values(f"{name}_{v}") == 1) for v in opts]) if opts else None
        return Var(name, "multi", usable, chosen=chosen, options=opts,
                   labels={o.value: o.label for o in codes.options}, position=j)
    return Var(name, "text", usable, position=j)


class Columns:
    """The context's items as the miner's columns, built when first asked: cut to a
    sample for the searches, whole only for the columns a found condition reads (whole
    float columns of every item would take 2.4 GB at 1,000,000 × 300)."""

    def __init__(self, ctx: DataContext) -> None:
        self.ctx = ctx
        self.index = {name: j for j, name in enumerate(ctx.items)}
        self._whole: dict[str, Var] = {}

    def cut(self, rows: np.ndarray | None, upto: int) -> list[Var]:
        """Items 0..upto-1, cut to `rows` (None: whole, and kept)."""
        if rows is None:
            return [self.whole(self.ctx.items[j]) for j in range(upto)]
        values = self.ctx.value_of_rows(rows)  # the sample's cells alone are typed
        return [item_var(self.ctx, j, rows, values) for j in range(upto)]

    def whole(self, name: str) -> Var:
        if name not in self._whole:
            self._whole[name] = item_var(self.ctx, self.index[name])
        return self._whole[name]


def own_condition(ctx: DataContext, name: str) -> str:
    entry = ctx.q.symbols[name]
    parts = [causes.source_of(ctx.q, expr) for _, expr in entry.context if expr is not None]
    if entry.own is not None:
        parts.append(causes.source_of(ctx.q, entry.own))
    parts = [p for p in parts if p]
    return " and ".join(f"({p})" if " or " in p and len(parts) > 1 else p for p in parts)


def stop_positions(ctx: DataContext) -> np.ndarray:
    """Where each respondent's stop sits in the questionnaire (past the end: none), once
    per run (one lookup per distinct stop)."""
    stop_at = ctx.memo.get("draft.stop_at")
    if stop_at is None:
        index = {e.name: e.index for e in ctx.q.entries if e.kind == "stop"}
        names, inverse = np.unique(ctx.stop.astype(str), return_inverse=True)
        at_name = np.array([index.get(s, 1 << 30) if s else 1 << 30 for s in names.tolist()], dtype=np.int64)
        stop_at = at_name[inverse.reshape(-1)]
        ctx.memo["draft.stop_at"] = stop_at
    return np.asarray(stop_at)


def alive_before(ctx: DataContext, name: str) -> np.ndarray:
    """Respondents no stop ended before the item."""
    return stop_positions(ctx) > ctx.q.symbols[name].index


def compare(ctx: DataContext, columns: Columns, j: int, need: float, sample: np.ndarray | None,
            small: list[Var]) -> tuple[Mined, int] | None:
    """The best mined condition for item `j` (searched on `small`, the earlier columns cut
    to `sample`, or whole without a sample; scored on every row) and how many respondents
    its own routing explains; None when nobody answered it, or when its own routing leaves
    fewer than `need` respondents unexplained (no condition can then gain `need`)."""
    answered = ctx.has_value[:, j]
    if not answered.any():
        return None
    own = int((ctx.due[:, j] == answered).sum())
    if ctx.n - own < need:
        return None
    alive = alive_before(ctx, ctx.items[j])
    if sample is None:
        cond = search(small[:j], answered, alive)
    else:
        cond = search(small[:j], answered[sample], alive[sample])
    used = {name: columns.whole(name) for name in cond.reads()}
    return Mined(cond, explained(cond, used, answered, alive), ctx.n), own


# Rows of the quick screen: an item whose best simple condition gains less than half the
# needed share there is not searched in full (at 2,000 rows a 2 % gain is about six
# standard deviations above 1 %).
SCREEN_ROWS = 2_000


class Screen:
    """The vectorised screen (`draft/screen.py`) on a small random sample: rules out the
    items no simple condition helps before the full search."""

    def __init__(self, ctx: DataContext, searched: list[Var], sample: np.ndarray | None, need: float) -> None:
        """`searched`: every item's column cut to `sample` (None: whole); the screen takes
        SCREEN_ROWS of those rows, so no column is typed again for it."""
        self.keep: np.ndarray | None = None
        if ctx.n <= 2 * SCREEN_ROWS or not ctx.items:
            return
        size = ctx.n if sample is None else sample.size
        rng = np.random.default_rng(1)
        at = np.sort(rng.choice(size, size=min(SCREEN_ROWS, size), replace=False))
        rows = at if sample is None else sample[at]
        stop_at = stop_positions(ctx)[rows]
        index = np.array([ctx.q.symbols[name].index for name in ctx.items], dtype=np.int64)
        alive = stop_at[:, None] > index[None, :]
        self.keep = screen.promising([v.subset(at) for v in searched], ctx.has_value[rows], alive,
                                     ctx.due[rows], need * rows.size / ctx.n / 2)

    def promising(self, j: int) -> bool:
        """Whether item `j` is worth the full search (always, without a screen sample)."""
        return True if self.keep is None else bool(self.keep[j])


@data_check(
    "routing-mismatch",
    severity="warning",
    stage="data",
    summary="An item's answers follow another condition far better than the spec's own",
    what=(
        "An item whose answered-or-blank pattern is explained by a simple condition over earlier items (an "
        "equality or set of codes, a threshold, `has` on an option, or two of these) far better than by the "
        "routing the spec gives it. The finding names that condition as a suggestion, with the share of "
        "respondents each explains."
    ),
    why=(
        "When thousands of respondents break one rule in the same way, the spec is more likely wrong than the "
        "data: a condition pointing at the wrong gate, or routing changed during fieldwork. Fix the spec, and "
        "the off-path and missing findings it caused disappear."
    ),
    bad=(
        "# The fielded survey asked `which` of those who said yes to `rides`,\n"
        "# but the spec points at `drives`:\n"
        "which: multi modes \"Which did you use?\" when drives = yes"
    ),
    good="which: multi modes \"Which did you use?\" when rides = yes",
)
def routing_mismatch(ctx: DataContext) -> Iterator[Hits]:
    n = ctx.n
    if n == 0:
        return
    need = max(MISMATCH_ROWS, MISMATCH_GAIN * n)
    # Typing every item for the miner costs a pass over the export: skip it when every
    # item's own routing explains all but fewer than `need` respondents.
    if all(n - int((ctx.due[:, j] == ctx.has_value[:, j]).sum()) < need for j in range(len(ctx.items))):
        return
    columns = Columns(ctx)
    sample = sample_rows(n)
    small = columns.cut(sample, len(ctx.items))
    quick = Screen(ctx, small, sample, need)
    kept = [j for j in range(len(ctx.items)) if quick.promising(j)]
    none = np.array([], dtype=np.int64)
    for j in kept:
        name = ctx.items[j]
        got = compare(ctx, columns, j, need, sample, small)
        if got is None:
            continue
        mined, own = got
        if not mined.condition.literals:
            continue
        gain = mined.explained - own
        if gain < need or (n - mined.explained) > MISMATCH_ERRORS * (n - own):
            continue
        spec = own_condition(ctx, name)
        said = f"its condition `{spec}`" if spec else "the spec, which asks it of everyone,"
        found = mined.condition.text({v: columns.whole(v) for v in mined.condition.reads()})  # cached columns
        yield Hits(
            rows=none,
            message=(
                f"`{name}` is answered as if asked `when {found}` "
                f"({100 * mined.explained / n:.1f} % of respondents fit that), far better than {said} "
                f"({100 * own / n:.1f} %); check the spec's routing before the data"
            ),
            item=name,
        )
