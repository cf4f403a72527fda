"""Hold the two readings of one spec to each other: the z3 encoding (`lint`) and the
vectorised evaluator (`validate`).

* `respondent_constraints` fixes one export row in the encoding: every item is answered
  exactly when it is asked and the export holds a valid value for it (docs/formats.md: an
  answer the routing did not allow, or an invalid value, opens nothing later), and its
  value (or chosen options) is the recorded one. The routing variables are then
  determined, so z3's `asked` can be compared with the evaluator's `due`.
* `row_from_model` turns a solver model back into an export row in the default layout
  of docs/formats.md, for the other direction.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np
import pyarrow as pa
import z3

from logiccheck.data.result import ValidationResult
from logiccheck.data.simulate import simulate
from logiccheck.logic.encoding import Encoding
from logiccheck.model.questionnaire import Entry, Questionnaire


def own_entries(enc: Encoding, kinds: tuple[str, ...] = ("item", "sample")) -> list[Entry]:
    return [e for e in enc.q.entries if e.kind in kinds and enc.is_own(e)]


def base_solver(enc: Encoding) -> z3.Solver:
    """Every constraint except `required`: an export may hold a blank the form should
    have forced, and the evaluator still routes such a respondent."""
    s = z3.Solver()
    s.add(*[c.formula for c in enc.conjuncts if c.kind != "required"])
    return s


def _number(v: float) -> z3.ArithRef:
    if float(v).is_integer():
        return z3.IntVal(int(v))
    return z3.RealVal(str(Fraction(str(v))))


def respondent_constraints(enc: Encoding, result: ValidationResult, r: int) -> list[z3.BoolRef] | None:
    """The respondent at data row `r` (0-based) as constraints; None when the encoding
    cannot express them (an invalid sample variable: the encoding treats those as always
    known)."""
    q = enc.q
    frame = result.frame
    assert frame is not None and result.valid is not None
    col = {name: j for j, name in enumerate(result.items)}
    out: list[z3.BoolRef] = []
    for e in own_entries(enc):
        kind = e.stmt.type.kind
        name = e.name
        if e.kind == "sample":
            if kind not in ("single", "number", "decimal"):
                continue
            v = frame[name].iloc[r]
            if v is None or (isinstance(v, float) and math.isnan(v)):
                return None
            out.append(enc.value(name) == _number(float(v)))
            continue
        if kind == "note":
            continue
        valid = bool(result.valid[r, col[name]])
        ans, ask = enc.answered(name), enc.asked(name)
        if not valid:
            out.append(z3.Not(ans))
            continue
        out.append(ans == ask)
        if kind == "multi":
            codes = q.item_codes(e.stmt)
            for o in codes.options if codes else []:
                out.append(enc.option(name, o.value) == bool(frame[f"{name}_{o.value}"].iloc[r] == 1))
        elif kind in ("single", "number", "decimal"):
            out.append(enc.value(name) == _number(float(frame[name].iloc[r])))
    return out


def failed_checks(result: ValidationResult) -> dict[str, set[int]]:
    """Check name -> data rows (0-based) where it failed."""
    out: dict[str, set[int]] = {}
    for block in result.blocks:
        if block.check == "check-failed":
            out.setdefault(block.item, set()).update(int(x) for x in block.rows)
    return out


def _model_number(model: z3.ModelRef, var: z3.ArithRef) -> str:
    raw = model.eval(var, model_completion=True)
    if z3.is_int_value(raw):
        return str(raw.as_long())
    frac = raw.as_fraction()
    return str(frac.numerator) if frac.denominator == 1 else repr(float(frac))


def row_from_model(enc: Encoding, model: z3.ModelRef) -> pa.Table:
    """One export row in the default layout (docs/formats.md) holding the model's answers:
    a value wherever the model says asked and answered, blank elsewhere."""
    q = enc.q
    header = simulate(q, 1, seed=0).table.column_names
    cells: dict[str, str | None] = dict.fromkeys(header)
    cells["id"] = "1"

    def true(b: z3.BoolRef) -> bool:
        return z3.is_true(model.eval(b, model_completion=True))

    for e in own_entries(enc):
        kind = e.stmt.type.kind
        name = e.name
        if kind == "note":
            continue
        if e.kind == "item" and not (true(enc.asked(name)) and true(enc.answered(name))):
            continue
        if kind == "multi":
            codes = q.item_codes(e.stmt)
            for o in codes.options if codes else []:
                cells[f"{name}_{o.value}"] = "1" if true(enc.option(name, o.value)) else "0"
        elif kind == "text":
            cells[name] = "some text"
        else:
            cells[name] = _model_number(model, enc.value(name))
    return pa.table({c: pa.array([v], pa.string()) for c, v in cells.items()})


def sample_rows(n: int, k: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    return np.sort(rng.choice(n, size=min(n, k), replace=False))


def stop_entries(q: Questionnaire) -> list[Entry]:
    return [e for e in q.entries if e.kind == "stop"]
