"""The one post-collection pipeline: every command and the notebook API read, route and
judge an export the same way, with the configuration found once."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pandas as pd
import pytest

import logiccheck
from logiccheck.data.mapping import DataMapping, MappingError
from logiccheck.loader import load_file
from logiccheck.pipeline import RunOptions, run_pipeline
from tests.cli_run import run_cli
from tests.conftest import SPECS

# A completeness rule stricter than the default shares, so the configured rule visibly
# changes the dispositions (the test fails if any path falls back to the defaults).
RULE_TOML = """
[quality.completeness]
complete_rule = "answered_share > 0.95 and reached(overall)"
partial_rule = "answered_share >= 0.6"
"""


@pytest.fixture
def project(tmp_path: Path) -> Path:
    shutil.copy(SPECS / "bikeshare.qlc", tmp_path / "bikeshare.qlc")
    shutil.copy(SPECS / "bikeshare_export.csv", tmp_path / "export.csv")
    (tmp_path / "logiccheck.toml").write_text(RULE_TOML, encoding="utf-8")
    return tmp_path


def _from_report(project: Path, monkeypatch: pytest.MonkeyPatch) -> dict[str, int]:
    from logiccheck.report import html

    seen: dict[str, int] = {}
    real = html.render_html

    def spy(data):  # type: ignore[no-untyped-def]
        seen.update(data.dispositions)
        return real(data)

    monkeypatch.setattr(html, "render_html", spy)
    ran = run_cli("report", str(project / "bikeshare.qlc"), "--data", str(project / "export.csv"),
                  "--out", str(project / "report.html"), "--no-solver")
    assert ran.returncode == 0, ran.stderr
    return seen


def test_validate_clean_report_and_api_agree(project: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    spec, export = str(project / "bikeshare.qlc"), str(project / "export.csv")
    ran = run_cli("validate", spec, "--data", export, "--format", "json")
    validated = json.loads(ran.stdout)
    ran = run_cli("clean", spec, "--data", export, "--out", str(project / "out"))
    assert ran.returncode == 0, ran.stderr
    summary = json.loads((project / "out" / "summary.json").read_text(encoding="utf-8"))
    reported = _from_report(project, monkeypatch)
    survey = logiccheck.load(spec)
    from_api = survey.validate(export).dispositions
    cleaned_api = survey.clean(export).summary["dispositions"]
    assert validated["dispositions"] == summary["dispositions"] == reported == from_api == cleaned_api
    # The configured rule is the one used: the defaults give other counts.
    default = run_pipeline(load_file(SPECS / "bikeshare.qlc"), SPECS / "bikeshare_export.csv").dispositions
    assert validated["dispositions"] != default
    assert sum(validated["dispositions"].values()) == validated["respondents"] == 300
    # Finding counts agree too: clean's summary counts what validate lists.
    by_check: dict[str, int] = {}
    for f in validated["findings"]:
        by_check[f["check"]] = by_check.get(f["check"], 0) + 1
    assert summary["findings"] == by_check


def test_clean_audit_names_the_data_stage_checks(project: Path) -> None:
    spec, export = str(project / "bikeshare.qlc"), str(project / "export.csv")
    validated = json.loads(run_cli("validate", spec, "--data", export, "--format", "json").stdout)
    run_cli("clean", spec, "--data", export, "--out", str(project / "out"))
    audit = pd.read_csv(project / "out" / "audit.csv", dtype=str, keep_default_na=False)
    off = {(int(f["row"]), f["item"]): (f["check"], f["message"]) for f in validated["findings"]
           if f["check"] in ("out-of-path", "after-stop")}
    blanked = {(int(r.row), r.item): (r.check, r.reason) for r in audit.itertuples() if r.column}
    assert {k: v for k, v in blanked.items() if v[0] in ("out-of-path", "after-stop")} == off
    assert "after-stop" in {c for c, _ in off.values()}  # the demo has answers after a stop
    # findings.csv has validate --format csv's columns, in its order.
    findings = pd.read_csv(project / "out" / "findings.csv", dtype=str, keep_default_na=False)
    ran = run_cli("validate", spec, "--data", export, "--format", "csv", "--out", str(project / "csv"))
    theirs = pd.read_csv(project / "csv" / "findings.csv", dtype=str, keep_default_na=False)
    assert list(findings.columns) == list(theirs.columns)
    assert sorted(map(tuple, findings.to_numpy().tolist())) == sorted(map(tuple, theirs.to_numpy().tolist()))
    assert ran.returncode == 1


def test_semicolon_copy_gives_the_same_results(tmp_path: Path) -> None:
    data = pd.read_csv(SPECS / "bikeshare_export.csv", dtype=str, keep_default_na=False)
    semi = tmp_path / "export.csv"
    data.to_csv(semi, index=False, sep=";")
    loaded = load_file(SPECS / "bikeshare.qlc")
    comma = run_pipeline(loaded, SPECS / "bikeshare_export.csv")
    other = run_pipeline(loaded, semi)
    assert other.to_json() == comma.to_json()
    assert any("semicolon-delimited" in note for note in other.notes)
    assert not any("delimited" in note for note in comma.notes)
    # Forcing the wrong delimiter reads one column: every item is missing.
    forced = run_pipeline(loaded, semi, RunOptions(delimiter=","))
    assert {f.check for f in forced.findings if f.row is None} >= {"missing-column"}
    ran = run_cli("validate", str(SPECS / "bikeshare.qlc"), "--data", str(semi), "--delimiter", "#")
    assert ran.returncode == 2 and ran.stderr.count("\n") == 1 and "delimiter" in ran.stderr


def test_clean_reads_through_the_one_reader(tmp_path: Path) -> None:
    data = pd.read_csv(SPECS / "bikeshare_export.csv", dtype=str, keep_default_na=False)
    tsv = tmp_path / "export.tsv"
    data.to_csv(tsv, index=False, sep="\t", encoding="cp1252")
    ran = run_cli("clean", str(SPECS / "bikeshare.qlc"), "--data", str(tsv), "--encoding", "cp1252",
                  "--out", str(tmp_path / "out"))
    assert ran.returncode == 0, ran.stderr
    summary = json.loads((tmp_path / "out" / "summary.json").read_text(encoding="utf-8"))
    plain = run_pipeline(load_file(SPECS / "bikeshare.qlc"), SPECS / "bikeshare_export.csv")
    assert summary["dispositions"] == plain.dispositions and summary["input"]["format"] == "tsv"
    assert (tmp_path / "out" / "export.cleaned.tsv").is_file()


def test_missing_option_column_is_reported_once(tmp_path: Path) -> None:
    data = pd.read_csv(SPECS / "bikeshare_export.csv", dtype=str, keep_default_na=False)
    path = tmp_path / "export.csv"
    data.drop(columns=["purpose_4"]).to_csv(path, index=False)
    loaded = load_file(SPECS / "bikeshare.qlc")
    full = run_pipeline(loaded, SPECS / "bikeshare_export.csv")
    cut = run_pipeline(loaded, path)
    missing = [f for f in cut.findings if f.check == "missing-column"]
    assert len(missing) == 1 and "`purpose_other`" in missing[0].message
    # `purpose_other` reads the missing option: nothing about it is judged off-route.
    assert not [f for f in cut.findings if f.item == "purpose_other" and f.check in ("out-of-path", "missing-on-path")]
    assert "purpose_other" in cut.unjudged
    # Everything else is judged exactly as with the full export.
    def others(r):  # type: ignore[no-untyped-def]
        return sorted((f.check, f.row, f.item) for f in r.findings
                      if f.item not in ("purpose", "purpose_other") and f.check != "missing-column")
    assert others(cut) == others(full)


def test_a_mapping_for_one_option_column(tmp_path: Path) -> None:
    data = pd.read_csv(SPECS / "bikeshare_export.csv", dtype=str, keep_default_na=False)
    path = tmp_path / "export.csv"
    data.rename(columns={"purpose_4": "purp_other"}).to_csv(path, index=False)
    loaded = load_file(SPECS / "bikeshare.qlc")
    hint = run_pipeline(loaded, path)
    message = next(f.message for f in hint.findings if f.check == "missing-column")
    assert 'purpose_4 = "purp_other"' in message
    mapped = run_pipeline(loaded, path, RunOptions(mapping=DataMapping(columns={"purpose_4": "purp_other"})))
    full = run_pipeline(loaded, SPECS / "bikeshare_export.csv")
    assert mapped.to_json() == full.to_json()


@pytest.mark.parametrize(
    ("columns", "words"),
    [
        ({"purpouse": "p"}, "names no item"),
        ({"age": "x", "trips": "x"}, "both mapped to column `x`"),
        ({"age": "id"}, "respondent id column"),
    ],
)
def test_mapping_mistakes_stop_the_run(tmp_path: Path, columns: dict[str, str], words: str) -> None:
    with pytest.raises(MappingError, match=words):
        run_pipeline(load_file(SPECS / "bikeshare.qlc"), SPECS / "bikeshare_export.csv",
                     RunOptions(mapping=DataMapping(columns=columns)))
    toml = tmp_path / "map.toml"
    toml.write_text("[data.columns]\n" + "".join(f'{k} = "{v}"\n' for k, v in columns.items()), encoding="utf-8")
    ran = run_cli("validate", str(SPECS / "bikeshare.qlc"), "--data", str(SPECS / "bikeshare_export.csv"), "--map", str(toml))
    assert ran.returncode == 2 and ran.stderr.count("\n") == 1 and words.split("`")[0] in ran.stderr


def test_stdin_export_reads_like_a_file(monkeypatch: pytest.MonkeyPatch) -> None:
    import io
    import sys

    raw = (SPECS / "bikeshare_export.csv").read_bytes()
    monkeypatch.setattr(sys, "stdin", io.TextIOWrapper(io.BytesIO(raw)))
    loaded = load_file(SPECS / "bikeshare.qlc")
    piped = run_pipeline(loaded, "-")
    assert piped.to_json() == run_pipeline(loaded, SPECS / "bikeshare_export.csv").to_json()


def test_analyses_reach_validate_json_and_the_cleaned_export(tmp_path: Path) -> None:
    import numpy as np

    from logiccheck.checks import analyses
    from logiccheck.clean.run import clean_export

    analyses.all_analyses()  # load the registered ones first, so the probe is removed cleanly

    @analyses.analysis("probe")
    def probe(ctx):  # type: ignore[no-untyped-def]
        # Reads the context the checks read: the dispositions are already there.
        complete = ctx.disposition == "complete"
        return analyses.Analysis(sections={"probe": {"complete": int(complete.sum())}},
                                 columns={"probe_flag": np.where(complete, 1.0, np.nan)},
                                 summary={"probe": "ran"})

    try:
        loaded = load_file(SPECS / "bikeshare.qlc")
        result = run_pipeline(loaded, SPECS / "bikeshare_export.csv")
        assert result.to_json()["probe"] == {"complete": result.dispositions["complete"]}
        run = clean_export(loaded, SPECS / "bikeshare_export.csv", tmp_path / "out")
        assert run.summary["probe"] == "ran"
        cleaned = pd.read_csv(tmp_path / "out" / "bikeshare_export.cleaned.csv", dtype=str, keep_default_na=False)
        assert (cleaned["probe_flag"] == "1.0").sum() == result.dispositions["complete"]
    finally:
        analyses._ANALYSES.pop("probe", None)


def test_values_typed_for_a_sample_equal_the_whole_columns_cut() -> None:
    # Searches on a sample type only the sample's cells; they must read the same values.
    import numpy as np

    result = run_pipeline(load_file(SPECS / "bikeshare.qlc"), SPECS / "bikeshare_export.csv")
    ctx = result.context
    rows = np.sort(np.random.default_rng(2).choice(ctx.n, size=ctx.n // 3, replace=False))
    sampled = ctx.value_of_rows(rows)
    names = [*ctx.items, *[f"{e.name}_{o.value}" for e in ctx.q.entries if e.is_item and e.stmt.type.kind == "multi"
                           for o in (ctx.q.item_codes(e.stmt).options if ctx.q.item_codes(e.stmt) else [])]]
    for name in names:
        np.testing.assert_array_equal(sampled(name), np.asarray(ctx.value_of(name))[rows], err_msg=name)


def test_values_for_a_sample_read_chunks_with_dictionaries_of_their_own(tmp_path: Path) -> None:
    # Chunks of 100 rows keep their own narrow dictionaries; 500 distinct numbers in all
    # cannot share one: the sample must be taken chunk by chunk.
    import numpy as np

    spec = tmp_path / "s.qlc"
    spec.write_text('survey s "S"\nq1: number 0..500 "How many?"\nq2: number 0..500 "And now?"\n')
    rng = np.random.default_rng(4)
    export = pd.DataFrame({"id": [f"r{i}" for i in range(3000)], "q1": rng.integers(0, 501, 3000).astype(str),
                           "q2": rng.integers(0, 501, 3000).astype(str)})
    export.loc[5, "q1"] = "7a"  # a stray text: the column is kept as text (dictionary-encoded)
    export.loc[2900, "q2"] = "n/a"
    path = tmp_path / "e.csv"
    export.to_csv(path, index=False)
    ctx = run_pipeline(load_file(spec), path, RunOptions(chunk_rows=100)).context
    rows = np.sort(rng.choice(3000, size=700, replace=False))
    want = export[["q1", "q2"]].apply(pd.to_numeric, errors="coerce")
    for name in ("q1", "q2"):
        np.testing.assert_array_equal(ctx.value_of_rows(rows)(name), want[name].to_numpy(dtype=float)[rows])


def test_rows_are_taken_from_chunks_whose_dictionaries_cannot_be_unified() -> None:
    # Two chunks of one text column, each with its own int8-indexed dictionary of 100
    # texts: one `take` over both must unify 200 texts into an int8 index and fails.
    import numpy as np
    import pyarrow as pa

    from logiccheck.pipeline.run import take_rows

    kind = pa.dictionary(pa.int8(), pa.string())
    chunks = [pa.array([str(v) for v in range(k, k + 100)]).dictionary_encode().cast(kind) for k in (0, 100)]
    table = pa.Table.from_batches([pa.record_batch([c], names=["q"]) for c in chunks])
    rows = np.array([3, 99, 100, 150, 199])
    with pytest.raises(pa.ArrowInvalid):
        table.take(pa.array(rows))
    assert take_rows(table, rows).column("q").to_pylist() == ["3", "99", "100", "150", "199"]
