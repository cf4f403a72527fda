"""Exact copies and near-copies of answer vectors without comparing every pair.

Answers are a respondents × items matrix of small integer codes (0 = blank; non-response
codes are answers like any other). Two respondents are compared on the items BOTH
answered: `compared` of them, `matched` with the same code. Their percent match is
matched / compared (Kuriakose & Robbins 2016 compare respondents this way, over every
item; here blanks never match). A respondent's maximum percent match is the largest
over all others.

`near_pairs` finds every pair with compared >= `min_items` and matched / compared >
`threshold`, exactly, by a pigeonhole argument in the manner of multi-index hashing
(Norouzi, Punjani & Fleet, "Fast exact search in Hamming space with multi-index
hashing", 2014), adapted to blanks:

* Split the items into blocks of at most s = floor(2 / (1 - threshold)) items (13 at
  85 %). For a pair, let C_j and M_j be the compared and matching items in block j.
  If M > t·C then sum_j (M_j - t·C_j) > 0, so some block has M_j > t·C_j, hence
  M_j >= 1; and since C_j <= s <= 2 / (1 - t), two mismatches would give
  M_j <= C_j - 2 <= t·C_j. So some block has a matching item and at most one
  mismatch among the items both answered.
* In that block the two answered patterns P and Q may differ. Each respondent gets one
  key per position of the block: its codes (blank as a code of its own) with that
  position left out. Pairs with P = Q and at most one mismatch, or with patterns
  differing at one position and no mismatch, share a key. Every other pair of patterns
  P != Q is joined the same way on the items of P ∩ Q. Either way the pair meets as a
  candidate.
* Candidates are then compared exactly (compared, matched), so hash collisions only
  cost time, never a wrong answer.

Work grows with the candidates, not with the square of the respondents: on answers
with some spread (five-point items) twelve codes of a block are shared by chance
rarely. Blocks are formed from items the routing asks of the same respondents, so
patterns inside a block are mostly all-or-nothing. Many scattered blanks make many
patterns (many joins), and answers with little spread (yes/no items) make many chance
candidates; a `Coverage` budget bounds that work: parts beyond it are skipped and
recorded, and every pair returned is still exact.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterator
from dataclasses import dataclass, field

import numpy as np

_MIX = np.uint64(0x9E3779B97F4A7C15)
_MUL = np.uint64(0xBF58476D1CE4E5B9)
# Pairs generated per batch before they are checked: bounds memory (two int64 per pair
# plus two rows of codes per pair while checking).
PAIR_BATCH = 1 << 20


@dataclass
class Pairs:
    """Pairs of rows (a < b) with their compared and matching item counts."""

    a: np.ndarray
    b: np.ndarray
    compared: np.ndarray
    matched: np.ndarray

    @property
    def score(self) -> np.ndarray:
        return self.matched / np.maximum(self.compared, 1)


def block_size(threshold: float) -> int:
    """The largest block size for which the pigeonhole argument holds with at most one
    mismatch in the witness block (s·(1 - t) <= 2); a hair under the exact bound, so
    rounding can only make blocks smaller. 0: nothing can be above the threshold."""
    if threshold >= 1:
        return 0
    return max(1, math.floor(2 / (1 - threshold) - 1e-9))


def hash_rows(codes: np.ndarray) -> np.ndarray:
    """One 64-bit hash per row of a small-integer matrix (equal rows, equal hashes)."""
    h = np.full(codes.shape[0], 0x84222325, dtype=np.uint64)
    with np.errstate(over="ignore"):
        for j in range(codes.shape[1]):
            h ^= codes[:, j].astype(np.uint64) + _MIX + (h << np.uint64(6)) + (h >> np.uint64(2))
            h *= _MUL
    return h


def runs(sorted_keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Start and length of every run of equal values in a sorted array."""
    if sorted_keys.size == 0:
        return np.zeros(0, np.int64), np.zeros(0, np.int64)
    edge = np.flatnonzero(sorted_keys[1:] != sorted_keys[:-1]) + 1
    starts = np.concatenate([[0], edge])
    return starts, np.diff(np.concatenate([starts, [sorted_keys.size]]))


def groups_of(keys: np.ndarray, rows: np.ndarray) -> Iterator[np.ndarray]:
    """Rows sharing a key, groups of two or more, in order of their first row (`rows`
    ascending)."""
    order = np.argsort(keys, kind="stable")  # rows ascend, so they stay ascending inside a run
    starts, lengths = runs(keys[order])
    big = lengths > 1
    for s, g in sorted(zip(starts[big].tolist(), lengths[big].tolist(), strict=True), key=lambda t: rows[order[t[0]]]):
        yield rows[order[s : s + g]]


def _pairs_within(members: np.ndarray, starts: np.ndarray, lengths: np.ndarray) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Every pair inside each run (members already in run order), in bounded batches,
    all runs of a batch at once."""
    keep = lengths > 1
    starts, lengths = starts[keep], lengths[keep]
    per_run = lengths * (lengths - 1) // 2
    huge = per_run > PAIR_BATCH
    for s, g in zip(starts[huge].tolist(), lengths[huge].tolist(), strict=True):
        yield from _big_run(members[s : s + g])
    starts, lengths, per_run = starts[~huge], lengths[~huge], per_run[~huge]
    total = np.cumsum(per_run)
    i = 0
    while i < starts.size:
        j = max(i + 1, int(np.searchsorted(total, (total[i - 1] if i else 0) + PAIR_BATCH, side="right")))
        g = lengths[i:j]
        # One entry per run member that has partners after it: its position and how many.
        pos = np.repeat(starts[i:j], g) + _ramp(g)
        after = np.repeat(g, g) - 1 - _ramp(g)
        has = after > 0
        pos, after = pos[has], after[has]
        left = np.repeat(pos, after)
        right = left + 1 + _ramp(after)
        yield members[left], members[right]
        i = j


def _ramp(counts: np.ndarray) -> np.ndarray:
    """0..c-1 for each count c, concatenated."""
    total = int(counts.sum())
    return np.arange(total) - np.repeat(np.cumsum(counts) - counts, counts)


def _big_run(members: np.ndarray) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Pairs of one very large run, a slice of first members at a time."""
    g = members.size
    step = max(1, PAIR_BATCH // g)
    for r0 in range(0, g - 1, step):
        first = np.arange(r0, min(r0 + step, g - 1))
        after = g - 1 - first  # partners of each first member
        left = np.repeat(first, after)
        yield members[left], members[left + 1 + _ramp(after)]


def _pairs_across(
    keys_p: np.ndarray, rows_p: np.ndarray, keys_q: np.ndarray, rows_q: np.ndarray,
    cov: Coverage | None = None, cols: np.ndarray | None = None,
) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Every (p, q) with equal keys, p from one set and q from the other, in batches of
    whole keys (all keys of a batch at once); nothing if their number exceeds what is
    left of the budget (recorded as skipped)."""
    op, oq = np.argsort(keys_p), np.argsort(keys_q)
    kp, kq = keys_p[op], keys_q[oq]
    at = np.minimum(np.searchsorted(kp, kq), kp.size - 1)
    common = kq[kp[at] == kq]
    if common.size == 0:
        return
    common = common[np.concatenate([[True], common[1:] != common[:-1]])]
    lo_p, cp = np.searchsorted(kp, common, "left"), np.searchsorted(kp, common, "right")
    lo_q, cq = np.searchsorted(kq, common, "left"), np.searchsorted(kq, common, "right")
    cp, cq = cp - lo_p, cq - lo_q
    total = np.cumsum(cp * cq)
    if cov is not None and not cov.allows(int(total[-1])):
        if cols is not None:
            cov.skip(cols)
        return
    i = 0
    while i < common.size:
        j = max(i + 1, int(np.searchsorted(total, (total[i - 1] if i else 0) + PAIR_BATCH, side="right")))
        np_, nq = cp[i:j], cq[i:j]
        left_at = np.repeat(lo_p[i:j], np_) + _ramp(np_)  # every p member of these keys
        partners = np.repeat(nq, np_)  # how many q members each of them meets
        left = np.repeat(left_at, partners)
        right = np.repeat(np.repeat(lo_q[i:j], np_), partners) + _ramp(partners)
        yield rows_p[op[left]], rows_q[oq[right]]
        i = j


def blocks_for(codes: np.ndarray, size: int, groups: np.ndarray | None = None) -> list[np.ndarray]:
    """Column blocks of at most `size` (any partition keeps the search exact; it only
    sets the speed). Columns with the same group label (e.g. items the routing asks of
    the same respondents; without labels, columns answered by exactly the same
    respondents) go together, so answered patterns inside a block are mostly
    all-or-nothing; a group is cut into blocks of nearly equal length. Columns of small
    groups are pooled into full blocks instead: a block of one or two items lets almost
    every pair collide (one mismatch is allowed per block), which made the search
    quadratic on exports with many small routing groups."""
    m = codes.shape[1]
    if m == 0 or size <= 0:
        return []
    if groups is None:
        groups = column_labels(codes != 0)
    order = np.lexsort((np.arange(m), np.asarray(groups)))
    out: list[np.ndarray] = []
    pooled: list[np.ndarray] = []
    starts, lengths = runs(np.asarray(groups)[order])
    for s, g in zip(starts.tolist(), lengths.tolist(), strict=True):
        cols = order[s : s + g]
        if g < max(2, size // 2):
            pooled.append(cols)
            continue
        parts = -(-g // size)
        out.extend(np.array_split(cols, parts))
    if pooled:
        # Nearly equal blocks: a short last block would let almost every pair collide.
        rest = np.concatenate(pooled)
        out.extend(np.array_split(rest, -(-rest.size // size)))
    return out


def column_labels(mask: np.ndarray) -> np.ndarray:
    """One label per column of a Boolean matrix; equal columns get equal labels."""
    packed = np.packbits(mask, axis=0)
    _, labels = np.unique(np.array([packed[:, j].tobytes() for j in range(mask.shape[1])], dtype=object),
                          return_inverse=True)
    return labels.ravel()


@functools.lru_cache(maxsize=64)
def _weights(width: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """Random odd multipliers per position, and a random tag per wildcard position
    (fixed per width, so every run hashes alike)."""
    rng = np.random.default_rng(seed)
    mult = rng.integers(0, 2**63, size=width, dtype=np.uint64) * np.uint64(2) + np.uint64(1)
    tag = rng.integers(0, 2**63, size=width, dtype=np.uint64)
    return mult, tag


def wildcard_keys(sub: np.ndarray) -> np.ndarray:
    """rows × positions: the row's codes with one position left out (its tag instead),
    as a linear 64-bit hash. Two rows that agree on every position but w share key w;
    unequal rows share a key only by a hash collision (checked away later)."""
    mult, tag = _weights(sub.shape[1], 20140101 + sub.shape[1])
    with np.errstate(over="ignore"):
        terms = sub.astype(np.uint64) * mult[None, :]
        total = terms.sum(axis=1, dtype=np.uint64)
        return total[:, None] - terms + tag[None, :]


def _collide(keys: np.ndarray, members: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, int]:
    """Members sharing a key (rows × keys per member), as runs of one sorted array:
    (members in run order, run starts, run lengths, pairs inside the runs).

    The upper 32 bits of a key and the member's row are packed into one word and sorted
    (a plain sort is about twice as fast as an argsort); rows sharing only the upper
    bits of unequal keys become extra candidates, checked away later."""
    width = keys.shape[1]
    packed = (keys.ravel() >> np.uint64(32)) << np.uint64(32)
    packed |= np.repeat(members.astype(np.uint64), width)
    packed.sort()
    starts, lengths = runs(packed >> np.uint64(32))
    keep = lengths > 1
    starts, lengths = starts[keep], lengths[keep]
    count = int((lengths * (lengths - 1) // 2).sum())
    return (packed & np.uint64(0xFFFFFFFF)).astype(np.int64), starts, lengths, count


@dataclass
class Coverage:
    """How much of the exact search ran. `budget`: candidate pairs allowed (None: no
    limit); `candidates`: candidate pairs generated; `skipped`: the columns of each part
    of a block left out because its candidates would have exceeded the budget (a pair
    whose only witness block is there may be missed)."""

    budget: int | None = None
    candidates: int = 0
    skipped: list[np.ndarray] = field(default_factory=list)
    skipped_pairs: int = 0  # candidate pairs the skipped parts would have made (a lower bound)
    _recorded: set[bytes] = field(default_factory=set, repr=False)

    @property
    def complete(self) -> bool:
        return not self.skipped

    def allows(self, count: int) -> bool:
        """Spend `count` candidates if the budget still has them."""
        if self.budget is not None and self.candidates + count > self.budget:
            self.skipped_pairs += count
            return False
        self.candidates += count
        return True

    def skip(self, cols: np.ndarray) -> None:
        """Record a block (once, however many of its parts are skipped)."""
        key = cols.tobytes()
        if key not in self._recorded:
            self._recorded.add(key)
            self.skipped.append(cols)


# Costs in candidate pairs (comparing one pair on 300 items: about 0.7 µs). A join of
# two answered patterns costs a few numpy calls whatever it finds (about 0.15 ms), and
# each key it builds and sorts about a tenth of a pair (measured with py-spy on the
# benchmarks).
JOIN_COST = 200
KEYS_PER_PAIR = 10


def _pattern_pairs(present: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Index pairs (i < j) of the patterns that share an answered position, one pattern
    at a time (no k × k arrays, whatever the number of patterns)."""
    left: list[np.ndarray] = [np.zeros(0, np.int64)]
    right: list[np.ndarray] = [np.zeros(0, np.int64)]
    for i in range(present.size - 1):
        j = i + 1 + np.flatnonzero((present[i + 1 :] & present[i]) != 0)
        left.append(np.full(j.size, i, np.int64))
        right.append(j)
    return np.concatenate(left), np.concatenate(right)


def candidate_pairs(
    codes: np.ndarray, rows: np.ndarray, size: int, groups: np.ndarray | None = None,
    coverage: Coverage | None = None,
) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Batches of candidate pairs (rows of `codes`): a superset of every pair that, in
    some block, has an item both answered and at most one mismatch on the items both
    answered (see the module docs). Pairs may repeat.

    With a `coverage` budget the cheap parts go first, so the budget buys the most
    search: every block's same-pattern keys, then the joins of different patterns,
    cheapest first. A part whose cost would exceed what is left is skipped and
    recorded."""
    cov = coverage if coverage is not None else Coverage()
    # Without group labels, columns are labelled by who answered them (among `rows`); with
    # them, no copy of the rows is made.
    blocks = blocks_for(codes if groups is not None else codes[rows], size, groups)
    for cols in blocks:
        sub = codes[np.ix_(rows, cols)]
        live = (sub != 0).any(axis=1)
        if _hopeless(sub[live], cov):
            cov.skip(cols)
            continue
        # Same codes, blanks included, except at most one position: same pattern with at
        # most one mismatch, or patterns differing at one position with no mismatch.
        members, starts, lengths, count = _collide(wildcard_keys(sub[live]), rows[live])
        if cov.allows(count):
            yield from _pairs_within(members, starts, lengths)
        else:
            cov.skip(cols)
    for cols in blocks:
        yield from _joins(codes, rows, cols, cov)


# Above this many rows a block's candidate count is first estimated on a sample of them:
# a block far beyond the budget is skipped without sorting all its keys.
ESTIMATE_ROWS = 10_000


def _hopeless(sub: np.ndarray, cov: Coverage) -> bool:
    """Whether a block's same-pattern candidates, estimated on ESTIMATE_ROWS random rows
    (pairs grow with the square of the rows), exceed four times what is left of the
    budget; the estimate is then recorded as skipped."""
    if cov.budget is None or sub.shape[0] <= 2 * ESTIMATE_ROWS:
        return False
    rng = np.random.default_rng(sub.shape[0])
    part = sub[rng.choice(sub.shape[0], size=ESTIMATE_ROWS, replace=False)]
    count = _collide(wildcard_keys(part), np.arange(ESTIMATE_ROWS))[3]
    estimate = count * (sub.shape[0] / ESTIMATE_ROWS) ** 2
    if estimate > 4 * (cov.budget - cov.candidates):
        cov.skipped_pairs += int(estimate)
        return True
    return False


def _joins(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, cov: Coverage) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Pairs of different answered patterns in one block, joined on the items both
    answered with one mismatch allowed; cheapest joins first while the budget lasts."""
    sub = codes[np.ix_(rows, cols)]
    pattern = ((sub != 0).astype(np.int64) << np.arange(len(cols), dtype=np.int64)).sum(axis=1)
    live = np.flatnonzero(pattern != 0)
    if live.size == 0 or pattern[live].min() == pattern[live].max():
        return  # one answered pattern: nothing to join
    if cov.budget is not None and cov.budget - cov.candidates < JOIN_COST:
        cov.skipped_pairs += JOIN_COST  # not even one join fits
        cov.skip(cols)
        return
    order = live[np.argsort(pattern[live], kind="stable")]
    present, first, sizes = _pattern_runs(pattern[order])
    k = present.size
    most = JOIN_COST * (k * (k - 1) // 2)
    if cov.budget is not None and most > cov.budget - cov.candidates:
        # Listing the pattern pairs alone is quadratic, and at JOIN_COST each they would
        # not fit in what is left (most pattern pairs share an answered item).
        cov.skipped_pairs += most
        cov.skip(cols)
        return
    pi, pj = _pattern_pairs(present)
    if pi.size == 0:
        return
    width = np.bitwise_count(present[pi] & present[pj]).astype(np.int64)
    cost = JOIN_COST + (sizes[pi] + sizes[pj]) * width // KEYS_PER_PAIR
    rank = np.argsort(cost, kind="stable")
    spent = 0
    for a, b, c in zip(pi[rank].tolist(), pj[rank].tolist(), cost[rank].tolist(), strict=True):
        if not cov.allows(c):
            # Joins come cheapest first, so none of the rest fits either.
            cov.skip(cols)
            cov.skipped_pairs += int(cost.sum()) - c - spent
            return
        spent += c
        common = int(present[a]) & int(present[b])
        shared = np.array([j for j in range(len(cols)) if common >> j & 1], np.int64)
        in_p = order[first[a] : first[a] + sizes[a]]
        in_q = order[first[b] : first[b] + sizes[b]]
        kp = wildcard_keys(sub[np.ix_(in_p, shared)])
        kq = wildcard_keys(sub[np.ix_(in_q, shared)])
        yield from _pairs_across(kp.ravel(), np.repeat(rows[in_p], shared.size),
                                 kq.ravel(), np.repeat(rows[in_q], shared.size), cov, cols)


def _pattern_runs(sorted_patterns: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The distinct patterns of a sorted array, where each starts and how many."""
    starts, lengths = runs(sorted_patterns)
    return sorted_patterns[starts] if starts.size else sorted_patterns[:0], starts, lengths


def compare_pairs(codes: np.ndarray, a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Compared and matching item counts of each pair, exactly."""
    compared = np.empty(a.size, np.int64)
    matched = np.empty(a.size, np.int64)
    step = max(1, (1 << 24) // max(1, codes.shape[1]))
    for s in range(0, a.size, step):
        x, y = codes[a[s : s + step]], codes[b[s : s + step]]
        both = (x != 0) & (y != 0)
        compared[s : s + step] = both.sum(axis=1)
        matched[s : s + step] = (both & (x == y)).sum(axis=1)
    return compared, matched


def _batched(parts: Iterator[tuple[np.ndarray, np.ndarray]]) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Small batches joined into batches of about `PAIR_BATCH` pairs (fewer numpy calls)."""
    held: list[tuple[np.ndarray, np.ndarray]] = []
    count = 0
    for a, b in parts:
        held.append((a, b))
        count += a.size
        if count >= PAIR_BATCH:
            yield np.concatenate([x for x, _ in held]), np.concatenate([y for _, y in held])
            held, count = [], 0
    if held:
        yield np.concatenate([x for x, _ in held]), np.concatenate([y for _, y in held])


def near_pairs(codes: np.ndarray, threshold: float, min_items: int, groups: np.ndarray | None = None,
               coverage: Coverage | None = None) -> Pairs:
    """Every pair of rows compared on at least `min_items` items with a percent match
    above `threshold`, exactly (see the module docs). `groups`: a label per column;
    columns with one label are blocked together (speed only, never the result).
    `coverage`: a budget of candidate pairs; parts of the search beyond it are skipped
    and recorded there (every pair returned is still exact, but some may be missing)."""
    size = block_size(threshold)
    rows = np.flatnonzero((codes != 0).sum(axis=1) >= max(1, min_items))
    found: list[tuple[np.ndarray, ...]] = []
    if size and rows.size > 1:
        seen = np.zeros(0, np.int64)
        n = np.int64(codes.shape[0])
        for a, b in _batched(candidate_pairs(codes, rows, size, groups, coverage)):
            lo, hi = np.minimum(a, b), np.maximum(a, b)
            key = np.unique(lo.astype(np.int64) * n + hi)
            key = key[(key // n) != (key % n)]  # a row never pairs with itself
            key = key[~np.isin(key, seen, assume_unique=True)] if seen.size else key
            if key.size == 0:
                continue
            lo, hi = key // n, key % n
            compared, matched = compare_pairs(codes, lo, hi)
            keep = (compared >= min_items) & (matched / np.maximum(compared, 1) > threshold)
            if keep.any():
                found.append((lo[keep], hi[keep], compared[keep], matched[keep]))
                seen = np.union1d(seen, key[keep])
    if not found:
        empty = np.zeros(0, np.int64)
        return Pairs(empty, empty, empty, empty)
    a, b, c, m = (np.concatenate(parts) for parts in zip(*found, strict=True))
    order = np.lexsort((b, a))
    return Pairs(a[order], b[order], c[order], m[order])


@dataclass
class Best:
    """Per respondent: the best partner among the pairs found (-1: none), its score and
    the number of items compared."""

    partner: np.ndarray
    score: np.ndarray
    compared: np.ndarray


def best_partners(pairs: Pairs, n: int) -> Best:
    """Each respondent's highest-scoring pair; ties go to the partner on the earliest row."""
    partner = np.full(n, -1, np.int64)
    score = np.full(n, np.nan)
    compared = np.zeros(n, np.int64)
    if pairs.a.size:
        me = np.concatenate([pairs.a, pairs.b])
        other = np.concatenate([pairs.b, pairs.a])
        s = np.concatenate([pairs.score, pairs.score])
        c = np.concatenate([pairs.compared, pairs.compared])
        order = np.lexsort((other, -s, me))
        first = np.concatenate([[True], me[order][1:] != me[order][:-1]])
        pick = order[first]
        partner[me[pick]] = other[pick]
        score[me[pick]] = s[pick]
        compared[me[pick]] = c[pick]
    return Best(partner, score, compared)


def against_all(codes: np.ndarray, r: int, step: int = 65_536) -> tuple[np.ndarray, np.ndarray]:
    """Compared and matching item counts of row `r` against every row (itself included),
    on the items `r` answered only (the others cannot be compared), in slices of rows so
    the temporaries stay small."""
    row = codes[r]
    cols = np.flatnonzero(row != 0)
    mine = row[cols]
    compared = np.empty(codes.shape[0], np.int64)
    matched = np.empty(codes.shape[0], np.int64)
    for s in range(0, codes.shape[0], step):
        part = codes[s : s + step][:, cols]
        compared[s : s + step] = np.count_nonzero(part, axis=1)
        matched[s : s + step] = np.count_nonzero(part == mine, axis=1)  # mine has no blanks
    return compared, matched


def max_match_of(codes: np.ndarray, rows: np.ndarray, min_items: int) -> np.ndarray:
    """The maximum percent match of the given rows against every other row, by direct
    comparison (cost: len(rows) × respondents × items): the distribution of the
    statistic estimated on a sample. NaN where no pair reaches `min_items`."""
    out = np.full(rows.size, np.nan)
    for i, r in enumerate(rows.tolist()):
        compared, matched = against_all(codes, r)
        compared[r] = 0
        ok = compared >= min_items
        if ok.any():
            out[i] = float((matched[ok] / compared[ok]).max())
    return out


def exact_groups(codes: np.ndarray, min_answered: int) -> list[np.ndarray]:
    """Groups (two or more rows, ascending) with identical answer vectors, the blanks in
    the same places, among rows with at least `min_answered` answers: one hash per row,
    then an exact check inside each group."""
    rows = np.flatnonzero((codes != 0).sum(axis=1) >= max(1, min_answered))
    out: list[np.ndarray] = []
    for group in groups_of(hash_rows(codes)[rows], rows):  # no copy of the rows
        same = (codes[group] == codes[group[0]]).all(axis=1)
        if same.all():
            out.append(group)
            continue
        # A hash collision (practically never): split the group exactly.
        _, inverse = np.unique(codes[group], axis=0, return_inverse=True)
        for k in np.unique(inverse.ravel()):
            part = group[inverse.ravel() == k]
            if part.size > 1:
                out.append(part)
    out.sort(key=lambda g: int(g[0]))
    return out
