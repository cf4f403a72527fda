"""What the draft infers from cells: types, answer lists, non-response codes, names; and
the command line around it."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.csv

from logiccheck.draft import draft_table
from logiccheck.draft.infer import infer, spec_name
from tests.cli_run import run_cli

ROOT = Path(__file__).resolve().parents[2]


def _table(cols: dict[str, list]) -> pa.Table:
    return pa.table({k: pa.array([None if v is None else str(v) for v in vals], pa.string()) for k, vals in cols.items()})


def test_types_lists_and_nonresponse() -> None:
    rng = np.random.default_rng(3)
    n = 200
    yes = rng.choice([1, 2, 98, 99], size=n, p=[0.5, 0.4, 0.05, 0.05]).tolist()
    like = rng.choice([1, 2, 3, 4, 5, 99], size=n).tolist()
    trips = rng.integers(1, 2000, size=n).tolist()
    trips[0] = 98  # an ordinary count that happens to equal a non-response code
    age = rng.integers(16, 90, size=n).tolist()
    age[1] = 99
    table = _table({
        "id": list(range(n)),
        "owns": yes,
        "likes": like,
        "trips": trips,
        "age": age,
        "old": rng.integers(16, 96, size=n).tolist(),
        "pets_1": rng.integers(0, 2, size=n).tolist(),
        "pets_2": rng.integers(0, 2, size=n).tolist(),
        "score_1": rng.integers(1, 6, size=n).tolist(),
        "hours": [f"{x:.1f}" for x in rng.uniform(0.5, 7.5, size=n)],
        "mood": rng.choice(["Happy", " happy ", "Sad", "Calm"], size=n).tolist(),
        "langs": rng.choice(["French; German", "german", "Italian;French", None], size=n).tolist(),
        "remark": [f"free text {i}" for i in range(n)],
        "duration": list(range(n)),
    })
    got = infer(table)
    by = {c.var.name: c for c in got.columns}
    assert got.nonresponse == [98, 99]
    assert got.id_column == "id" and "duration" in got.skipped
    assert by["owns"].kind == "single" and by["owns"].var.options == [1, 2] and bool(by["owns"].var.nr[yes.index(98)])
    assert by["likes"].var.options == [1, 2, 3, 4, 5]
    assert by["trips"].kind == "number" and by["trips"].strict and (by["trips"].lo, by["trips"].hi) == (0, 2000)
    assert by["age"].kind == "number" and not by["age"].strict and bool(by["age"].var.nr[1])
    assert (by["age"].lo, by["age"].hi) == (10, 90)
    assert (by["old"].lo, by["old"].hi) == (10, 97) and not by["old"].strict  # 100 would swallow 98 and 99
    assert by["pets"].kind == "multi" and by["pets"].columns == ["pets_1", "pets_2"]
    assert by["score_1"].kind == "single"  # one NAME_N column alone is no group
    assert by["hours"].kind == "decimal" and (by["hours"].lo, by["hours"].hi) == (0, 8)
    assert by["mood"].kind == "single" and sorted(by["mood"].texts.values()) == ["Calm", "Happy", "Sad"]
    assert by["langs"].kind == "multi" and by["langs"].delimited
    assert sorted(t.casefold() for t in by["langs"].texts.values()) == ["french", "german", "italian"]
    assert by["remark"].kind == "text"


def test_a_scale_reaching_the_nonresponse_codes_is_strict_and_lints_clean() -> None:
    from logiccheck.checks.runner import run_checks
    from logiccheck.loader import load_text

    rng = np.random.default_rng(1)
    n = 300
    table = _table({
        "a": rng.choice([1, 2, 8, 9], size=n).tolist(),
        "b": rng.choice([1, 2, 3, 8, 9], size=n).tolist(),
        "scale": rng.integers(0, 11, size=n).tolist(),
    })
    d = draft_table(table, "s.csv")
    assert d.inferred.nonresponse == [8, 9]
    # `scale` starts a statement, so the column's item is named `scale_`.
    assert "scale_: single" in d.text and d.text.split("scale_: single", 1)[1].splitlines()[0].endswith("strict")
    assert [x.check for x in run_checks(load_text(d.text, "s.qlc")) if x.severity.value == "error"] == []


def test_names_are_made_valid_and_unique() -> None:
    taken: set[str] = set()
    assert [spec_name(c, taken) for c in ["Q 1", "2nd", "when", "q_1"]] == ["q_1", "q_2nd", "when_", "q_1_2"]


def test_decimal_commas() -> None:
    table = _table({"id": [1, 2, 3], "w": ["2,5", "10", "0,75"]})
    col = infer(table, decimal=",").columns[0]
    assert col.kind == "decimal" and col.var.value.tolist() == [2.5, 10.0, 0.75]


def test_an_export_without_routing_drafts_every_item_as_always_asked() -> None:
    rng = np.random.default_rng(0)
    table = _table({"a": rng.integers(1, 4, size=300).tolist(), "b": rng.integers(1, 4, size=300).tolist()})
    d = draft_table(table, "x.csv")
    assert [r.condition.literals for r in d.routed] == [(), ()]
    assert "asked of everyone" in d.text


def test_cli_writes_the_draft_and_never_the_export(tmp_path: Path) -> None:
    export = tmp_path / "e.csv"
    export.write_bytes((ROOT / "specs" / "bikeshare_export.csv").read_bytes())
    before = export.read_bytes()
    out = tmp_path / "draft.qlc"
    ran = run_cli("draft", "--data", str(export), "--out", str(out))
    assert ran.returncode == 0, ran.stderr
    assert out.read_text().startswith("# DRAFT") and "review it" in ran.stderr
    assert run_cli("lint", str(out)).returncode == 0
    refused = run_cli("draft", "--data", str(export), "--out", str(export))
    assert refused.returncode == 2 and "would replace the export" in refused.stderr
    assert export.read_bytes() == before
    to_stdout = run_cli("draft", "--data", str(export))
    assert to_stdout.returncode == 0 and to_stdout.stdout == out.read_text()


def test_cli_unreadable_export_is_one_line_and_exit_2(tmp_path: Path) -> None:
    ran = run_cli("draft", "--data", str(tmp_path / "missing.csv"))
    assert ran.returncode == 2 and ran.stderr.count("\n") == 1 and "no such file" in ran.stderr
    bad = tmp_path / "latin.csv"
    bad.write_bytes("id,town\n1,Malm\xf6\n".encode("latin-1"))
    ran = run_cli("draft", "--data", str(bad))
    assert ran.returncode == 2 and "--encoding" in ran.stderr
    assert run_cli("draft", "--data", str(bad), "--encoding", "latin-1").returncode == 0


def test_a_condition_true_for_nonresponse_codes_is_drafted_with_them(tmp_path: Path) -> None:
    from logiccheck.data import DataMapping, validate
    from logiccheck.data.simulate import simulate, write_csv
    from logiccheck.loader import load_text

    spec = (
        'survey s "S"\ncodes yn\n  yes = 1 "Yes"\n  no = 2 "No"\nnonresponse\n  dk = 98 "DK"\n  refused = 99 "Refused"\n'
        'used: single yn "Used?" gate\nlike: single yn "Liked?" gate\nmore: single yn "More?" when used != no\n'
    )
    q = load_text(spec, "s.qlc").questionnaire
    path = tmp_path / "e.csv"
    write_csv(simulate(q, 3000, seed=4).table, path)
    d = draft_table(pa.csv.read_csv(path), "e.csv")
    assert "more: single" in d.text and "when used in (c1, nr98, nr99)" in d.text
    real = validate(q, path, DataMapping()).table.set_index("item")["expected"]
    ours = validate(load_text(d.text, "d.qlc").questionnaire, path, DataMapping()).table.set_index("item")["expected"]
    assert abs(int(real["more"]) - int(ours["more"])) <= 30
