"""Per-respondent completeness measures and dispositions.

Measures count *applicable* items only: an item the routing did not ask never counts
against anyone. A completeness rule is written in the condition language over the
measures and parsed with the project's grammar.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.data.evaluate import evaluate_columns
from logiccheck.model import nodes as n
from logiccheck.model.build import build_spec
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.config import CompletenessConfig
from logiccheck.quality.route import RouteState
from logiccheck.suggest import did_you_mean
from logiccheck.syntax import parse_text

MEASURES = ("answered_share", "answered_count", "due_count", "weighted_share", "gates_answered", "gates_due")
DISPOSITIONS = ("complete", "partial", "break-off")
_REACHED = re.compile(r"\breached\s*\(\s*([a-z_][a-z0-9_]*)\s*\)")
_PREFIX = "let _rule = "


class RuleError(ValueError):
    """A completeness rule that does not parse or names something unknown."""


def _substantive(q: Questionnaire, state: RouteState) -> np.ndarray:
    """Columns that can be answered (notes cannot)."""
    kinds = [q.symbols[name].stmt.type.kind for name in state.items]
    return np.array([k != "note" for k in kinds], dtype=bool)


def answered_matrix(state: RouteState, config: CompletenessConfig) -> np.ndarray:
    answered = state.due & state.valid
    if not config.nonresponse_counts_as_answered:
        answered &= ~state.nonresponse
    return answered


# Respondents per block when counting: bounds the temporaries to a block's worth of cells.
BLOCK_ROWS = 16_384


def measures(q: Questionnaire, state: RouteState, config: CompletenessConfig) -> pd.DataFrame:
    keep = np.flatnonzero(_substantive(q, state))
    names = [state.items[j] for j in keep]
    unknown = sorted(set(config.weights) - set(names))
    if unknown:
        raise RuleError(f"[quality.completeness.weights]: no item is called {unknown[0]!r}")
    w = np.array([config.weights.get(name, 1.0) for name in names], dtype=float)
    gates = np.array([q.symbols[name].stmt.flags.gate for name in names], dtype=bool)
    n = len(state.ids)
    due_count = np.zeros(n, np.int64)
    answered_count = np.zeros(n, np.int64)
    gates_due = np.zeros(n, np.int64)
    gates_answered = np.zeros(n, np.int64)
    wdue = np.zeros(n, np.float64)
    wanswered = np.zeros(n, np.float64)
    # Row blocks of the route matrices, so no respondents × items copy of the whole export
    # is made (a million × 300 float matrix alone is 2.4 GB).
    for start in range(0, n, BLOCK_ROWS):
        rows = slice(start, start + BLOCK_ROWS)
        due = state.due[rows][:, keep]
        answered = due & state.valid[rows][:, keep]
        if not config.nonresponse_counts_as_answered:
            answered &= ~state.nonresponse[rows][:, keep]
        due_count[rows] = due.sum(axis=1)
        answered_count[rows] = answered.sum(axis=1)
        gates_due[rows] = due[:, gates].sum(axis=1)
        gates_answered[rows] = answered[:, gates].sum(axis=1)
        wdue[rows] = due @ w
        wanswered[rows] = answered @ w
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.where(due_count > 0, answered_count / np.maximum(due_count, 1), 1.0)
        wshare = np.where(wdue > 0, wanswered / np.where(wdue > 0, wdue, 1), 1.0)
    return pd.DataFrame(
        {
            "answered_share": share,
            "answered_count": answered_count,
            "due_count": due_count,
            "weighted_share": wshare,
            "gates_answered": gates_answered,
            "gates_due": gates_due,
        }
    )


@dataclass
class Rule:
    text: str
    expr: Any
    reached: list[str]


def parse_rule(text: str, q: Questionnaire, where: str = "completeness rule") -> Rule:
    """Parse a rule such as `answered_share > 0.8 and reached(overall)`."""
    if "\n" in text.strip():
        raise RuleError(f"{where}: write the rule on one line")
    reached = _REACHED.findall(text)
    rewritten = _REACHED.sub(lambda m: f"reached__{m.group(1)}", text.strip())
    parsed = parse_text(_PREFIX + rewritten + "\n", where)
    if parsed.diagnostics:
        d = parsed.diagnostics[0]
        col = max(1, d.column - len(_PREFIX))
        raise RuleError(f"{where}, column {col}: {d.message} (in `{text.strip()}`)")
    spec, problems = build_spec(parsed.tree, where)
    if problems or len(spec.body) != 1 or not isinstance(spec.body[0], n.Let):
        raise RuleError(f"{where}: `{text.strip()}` is not one condition")
    expr = spec.body[0].expr
    known = set(MEASURES) | {f"reached__{r}" for r in reached}
    for node in n.walk(expr):
        if isinstance(node, n.Ref) and node.name not in known:
            extra = did_you_mean(node.name, [*MEASURES, *q.symbols])
            raise RuleError(f"{where}: unknown measure `{node.name}` in `{text.strip()}`{extra}")
        if isinstance(node, n.Func) and node.name not in q.symbols:
            raise RuleError(f"{where}: `{node.func}({node.name})` names no item")
    for r in reached:
        if r not in q.symbols:
            raise RuleError(f"{where}: `reached({r})` names no item")
    return Rule(text.strip(), expr, reached)


def reached_mask(state: RouteState, item: str) -> np.ndarray:
    """Got at least as far as `item`: a value recorded on it or on any later item."""
    j = state.col(item)
    return np.asarray(state.has_value[:, j:].any(axis=1), dtype=bool)


def eval_rule(rule: Rule, q: Questionnaire, state: RouteState, table: pd.DataFrame, config: CompletenessConfig) -> np.ndarray:
    """True where the rule holds (unknown counts as not holding), by the data stage's
    condition compiler over the measures."""
    answered = answered_matrix(state, config)
    holds = evaluate_columns(
        q,
        rule.expr,
        len(state.ids),
        numbers={name: table[name].to_numpy(dtype=float) for name in MEASURES},
        flags={f"reached__{r}": reached_mask(state, r) for r in rule.reached},
        answered={name: answered[:, j] for j, name in enumerate(state.items)},
        asked={name: state.due[:, j] for j, name in enumerate(state.items)},
    )
    return holds.t


def dispositions(q: Questionnaire, state: RouteState, config: CompletenessConfig) -> pd.Series:
    """One disposition per respondent: the stop that fired (first in order), else
    complete / partial / break-off by the rules or the default thresholds."""
    table = measures(q, state, config)
    share = table["answered_share"].to_numpy()
    if config.complete_rule:
        complete = eval_rule(parse_rule(config.complete_rule, q, "[quality.completeness] complete_rule"), q, state, table, config)
    else:
        complete = share > config.complete_above  # AAPOR Standard Definitions example (from memory)
    if config.partial_rule:
        partial = eval_rule(parse_rule(config.partial_rule, q, "[quality.completeness] partial_rule"), q, state, table, config)
    else:
        partial = share >= config.partial_from  # AAPOR Standard Definitions example (from memory)
    out = np.where(complete, "complete", np.where(partial, "partial", "break-off")).astype(object)
    done = np.zeros(len(out), bool)
    for name, fired in state.stops.items():
        out[fired & ~done] = name
        done |= fired
    return pd.Series(out, index=state.ids, name="disposition")
