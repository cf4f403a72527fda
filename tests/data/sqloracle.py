"""Oracle: a second, independent implementation of validation in SQL, run by DuckDB.

Every condition is translated to SQL, where NULL is unknown: SQL's AND, OR and NOT on
NULL are Kleene's strong three-valued logic (the SQL standard's NULL semantics), which is
what the routing semantics (DEVELOPERS.md) asks for. DuckDB reads the CSV itself (all columns as text), so the
reader, the cell judging, the routing and the counting are all done apart from numpy.
"""

from __future__ import annotations

from typing import Any

import duckdb

from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire


def qi(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


class SqlOracle:
    def __init__(self, q: Questionnaire) -> None:
        self.q = q
        self.nr = [o.value for o in q.nonresponse]
        self.nr_labels = {o.label for o in q.nonresponse}
        self.defined: set[str] = set()  # names whose state columns exist so far

    # ---------------------------------------------------------------- expressions
    def num(self, expr: Any, raw: bool) -> str:
        q = self.q
        if isinstance(expr, n.Num):
            return f"CAST({float(expr.value)!r} AS DOUBLE)"
        if isinstance(expr, n.Code):
            if not raw and expr.label in self.nr_labels:
                return "CAST(NULL AS DOUBLE)"
            return f"CAST({float(expr.value)!r} AS DOUBLE)"
        if isinstance(expr, n.Ref):
            if expr.name not in self.defined or q.value_kind(expr.name) not in ("coded", "number"):
                return "CAST(NULL AS DOUBLE)"
            return qi(expr.name + ("__e" if raw else "__n"))
        if isinstance(expr, n.Neg):
            return f"(-({self.num(expr.operand, False)}))"
        if isinstance(expr, n.Arith):
            a, b = self.num(expr.left, False), self.num(expr.right, False)
            if expr.op == "/":
                return f"(CASE WHEN ({b}) = 0 THEN NULL ELSE ({a}) / ({b}) END)"
            return f"(({a}) {expr.op} ({b}))"
        if isinstance(expr, n.Func) and expr.func == "count":
            if expr.name not in self.defined:
                return "CAST(NULL AS DOUBLE)"
            opts = self.options(expr.name)
            total = " + ".join(f"CAST({qi(f'{expr.name}__c{v}')} AS INTEGER)" for v in opts) or "0"
            return f"(CASE WHEN {qi(expr.name + '__ans')} THEN CAST({total} AS DOUBLE) END)"
        return "CAST(NULL AS DOUBLE)"

    def cond(self, expr: Any) -> str:
        q = self.q
        if isinstance(expr, n.Ref):
            if q.value_kind(expr.name) == "bool" and expr.name in self.defined:
                return qi(expr.name + "__b")
            return "CAST(NULL AS BOOLEAN)"
        if isinstance(expr, n.Compare):
            raw = expr.op in ("=", "!=")
            op = "<>" if expr.op == "!=" else expr.op
            return f"(({self.num(expr.left, raw)}) {op} ({self.num(expr.right, raw)}))"
        if isinstance(expr, n.InList):
            values = ", ".join(repr(float(v.value)) for v in expr.values)
            return f"(({self.num(expr.subject, True)}) IN ({values}))"
        if isinstance(expr, n.InRange):
            return f"(({self.num(expr.subject, False)}) BETWEEN {expr.lo!r} AND {expr.hi!r})"
        if isinstance(expr, n.Has):
            name = expr.subject.name
            if name not in self.defined:
                return "CAST(NULL AS BOOLEAN)"
            opts = self.options(name)
            cols = [qi(f"{name}__c{int(v.value)}") if int(v.value) in opts else "FALSE" for v in expr.values]
            joined = (" AND " if expr.mode == "all" else " OR ").join(cols) or "TRUE"
            return f"(CASE WHEN {qi(name + '__ans')} THEN ({joined}) END)"
        if isinstance(expr, n.Func):
            entry = q.symbols.get(expr.name)
            if expr.func == "asked" and entry is not None and entry.kind == "sample":
                return "TRUE"
            if expr.name not in self.defined:
                return "FALSE"
            return qi(expr.name + ("__ans" if expr.func == "answered" else "__due"))
        if isinstance(expr, n.Not):
            return f"(NOT {self.cond(expr.operand)})"
        if isinstance(expr, (n.And, n.Or)):
            word = " AND " if isinstance(expr, n.And) else " OR "
            return "(" + word.join(self.cond(o) for o in expr.operands) + ")"
        return "CAST(NULL AS BOOLEAN)"

    def options(self, name: str) -> list[int]:
        codes = self.q.item_codes(self.q.symbols[name].stmt)
        return [o.value for o in codes.options] if codes is not None else []

    # ---------------------------------------------------------------- cells
    def cell_columns(self, entry: Any) -> list[tuple[str, str, str]]:
        """(column, type, SQL) for an item's present / valid / value / chosen columns."""
        q, stmt = self.q, entry.stmt
        name, kind = stmt.name, stmt.type.kind
        if kind == "note":
            return [(f"{name}__p", "BOOLEAN", "FALSE"), (f"{name}__ok", "BOOLEAN", "FALSE")]
        if kind == "text":
            p = f"(NULLIF(trim({qi(name)}), '') IS NOT NULL)"
            return [(f"{name}__p", "BOOLEAN", p), (f"{name}__ok", "BOOLEAN", p)]
        if kind == "multi":
            out = []
            bads, chosen = [], []
            for v in self.options(name):
                t = f"NULLIF(trim({qi(f'{name}_{v}')}), '')"
                d = f"TRY_CAST({t} AS DOUBLE)"
                out.append((f"{name}__raw{v}", "BOOLEAN", f"COALESCE({d} = 1, FALSE)"))
                chosen.append(qi(f"{name}__raw{v}"))
                bads.append(f"({t} IS NOT NULL AND NOT COALESCE({d} IN (0, 1), FALSE))")
            bad = " OR ".join(bads) or "FALSE"
            anyc = " OR ".join(chosen) or "FALSE"
            out.append((f"{name}__bad", "BOOLEAN", bad))
            out.append((f"{name}__p", "BOOLEAN", f"({anyc} OR {qi(name + '__bad')})"))
            out.append((f"{name}__ok", "BOOLEAN", f"(({anyc}) AND NOT {qi(name + '__bad')})"))
            return out
        t = f"NULLIF(trim({qi(name)}), '')"
        v = f"TRY_CAST({t} AS DOUBLE)"
        isnum = f"({qi(name + '__v')} IS NOT NULL AND NOT isnan({qi(name + '__v')}) AND NOT isinf({qi(name + '__v')}))"
        nr_ok = q.allows_nonresponse(stmt) and self.nr
        nr_list = ", ".join(repr(float(x)) for x in self.nr)
        x = qi(name + "__v")
        if kind == "single":
            codes = ", ".join(repr(float(c)) for c in self.options(name)) or "NULL"
            ok = f"({x} IN ({codes}))"
        else:
            ok = f"({x} BETWEEN {stmt.type.lo!r} AND {stmt.type.hi!r})"
            if kind == "number":
                ok = f"({ok} AND {x} = floor({x}))"
        if nr_ok:
            ok = f"({ok} OR {x} IN ({nr_list}))"
        return [
            (f"{name}__v", "DOUBLE", v),
            (f"{name}__p", "BOOLEAN", f"({t} IS NOT NULL)"),
            (f"{name}__ok", "BOOLEAN", f"COALESCE({isnum} AND {ok}, FALSE)"),
            (f"{name}__isnr", "BOOLEAN", f"COALESCE({x} IN ({nr_list}), FALSE)" if nr_ok else "FALSE"),
        ]

    # ---------------------------------------------------------------- run
    def run(self, csv_path: str) -> duckdb.DuckDBPyConnection:
        q = self.q
        con = duckdb.connect()
        con.execute(
            f"CREATE TABLE d AS SELECT row_number() OVER () AS _row, * FROM read_csv({csv_path!r}, all_varchar=true, header=true)"
        )
        cols = {r[0] for r in con.execute("DESCRIBE d").fetchall()}
        for e in q.entries:
            if e.kind in ("item", "sample") and e.stmt.type.kind == "multi":
                for v in self.options(e.name):
                    if f"{e.name}_{v}" not in cols:
                        con.execute(f"ALTER TABLE d ADD COLUMN {qi(f'{e.name}_{v}')} VARCHAR")
            elif e.kind in ("item", "sample") and e.name not in cols:
                con.execute(f"ALTER TABLE d ADD COLUMN {qi(e.name)} VARCHAR")
        con.execute("ALTER TABLE d ADD COLUMN _stop VARCHAR DEFAULT ''")
        con.execute("ALTER TABLE d ADD COLUMN _skip INTEGER DEFAULT -1")

        def add(col: str, typ: str, sql: str) -> None:
            con.execute(f"ALTER TABLE d ADD COLUMN {qi(col)} {typ}")
            con.execute(f"UPDATE d SET {qi(col)} = {sql}")

        for e in q.entries:
            name = e.name
            if e.kind == "let":
                if q.value_kind(name) == "bool":
                    add(f"{name}__b", "BOOLEAN", self.cond(e.own))
                else:
                    add(f"{name}__e", "DOUBLE", self.num(e.own, False))
                    add(f"{name}__n", "DOUBLE", qi(name + "__e"))
                self.defined.add(name)
                continue
            if e.kind == "sample":
                for col, typ, sql in self.cell_columns(e):
                    add(col, typ, sql)
                add(f"{name}__due", "BOOLEAN", "TRUE")
                self.finish_item(add, e)
                continue
            parts = ["_stop = ''", f"_skip <= {e.index}"]
            parts += [self.cond(c) for _, c in e.context if c is not None]
            if e.own is not None:
                parts.append(self.cond(e.own))
            due = "COALESCE(" + " AND ".join(parts) + ", FALSE)"
            if e.kind == "stop":
                con.execute(f"UPDATE d SET _stop = {name!r} WHERE {due}")
            elif e.kind == "skip" and e.skip_target is not None:
                con.execute(f"UPDATE d SET _skip = greatest(_skip, {e.skip_target}) WHERE {due}")
            elif e.kind == "check":
                req = self.cond(e.require) if e.require is not None else "TRUE"
                add(f"{name}__fail", "BOOLEAN", f"COALESCE({due} AND NOT {req}, FALSE)")
            elif e.kind == "item":
                for col, typ, sql in self.cell_columns(e):
                    add(col, typ, sql)
                add(f"{name}__due", "BOOLEAN", due)
                self.finish_item(add, e)
        return con

    def finish_item(self, add: Any, e: Any) -> None:
        name = e.name
        use = f"({qi(name + '__due')} AND {qi(name + '__ok')})"
        add(f"{name}__ans", "BOOLEAN", use)
        kind = e.stmt.type.kind
        if kind == "multi":
            for v in self.options(name):
                add(f"{name}__c{v}", "BOOLEAN", f"({use} AND {qi(f'{name}__raw{v}')})")
        elif kind in ("single", "number", "decimal"):
            add(f"{name}__e", "DOUBLE", f"CASE WHEN {use} THEN {qi(name + '__v')} END")
            add(f"{name}__n", "DOUBLE", f"CASE WHEN {use} AND NOT {qi(name + '__isnr')} THEN {qi(name + '__v')} END")
        self.defined.add(name)


def sql_validate(q: Questionnaire, csv_path: str) -> tuple[dict[str, dict[str, int]], set[tuple[int, str]], dict[str, str]]:
    """Per-item table, the out-of-path (row, item) set, and the stop per row, by DuckDB."""
    oracle = SqlOracle(q)
    con = oracle.run(csv_path)
    table: dict[str, dict[str, int]] = {}
    off: set[tuple[int, str]] = set()
    for e in q.items():
        if e.stmt.type.kind == "note":
            continue
        name = e.name
        due, p, ok = qi(name + "__due"), qi(name + "__p"), qi(name + "__ok")
        got = con.execute(
            f"SELECT sum(CAST({due} AS INT)), sum(CAST({p} AS INT)), sum(CAST({p} AND NOT {due} AS INT)),"
            f" sum(CAST({due} AND NOT {p} AS INT)), sum(CAST({p} AND NOT {ok} AS INT)) FROM d"
        ).fetchone()
        table[name] = dict(
            zip(["expected", "answered", "out_of_path", "missing_on_path", "invalid"], [int(x or 0) for x in got], strict=True)
        )
        for (row,) in con.execute(f"SELECT _row FROM d WHERE {p} AND NOT {due}").fetchall():
            off.add((int(row), name))
    stops = {str(r): s for r, s in con.execute("SELECT _row, _stop FROM d").fetchall()}
    return table, off, stops
