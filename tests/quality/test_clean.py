"""`clean`: the policy, the audit trail and its guarantees."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest
from click.testing import CliRunner

from logiccheck.clean.apply import reverse_audit
from logiccheck.clean.io import file_hash, read_sheet_csv
from logiccheck.clean.policy import CleanPolicy, PolicyError, load_policy
from logiccheck.clean.run import clean_export
from logiccheck.clean.sheet import escape, unescape
from logiccheck.cli.main import cli
from logiccheck.data.readers import read_cells as read_export
from logiccheck.loader import load_text
from tests.quality.planted import COLUMNS, SPEC, build, card_row


def setup(tmp: Path) -> tuple[Path, Path, Path]:
    export, frame, _ = build()
    extra = [
        # Out of path: a non-member who also answered the members' visits question.
        {**dict.fromkeys(COLUMNS, ""), "id": "x-oop", "email": "x-oop@example.org", "age": "50", "member": "2",
         "why_no": "1", "visits": "5", "overall": "6", "duration": "590"},
        # Cascade: a non-member whose export also holds the borrowing gate and its follow-up.
        {**dict.fromkeys(COLUMNS, ""), "id": "x-cascade", "email": "x-cascade@example.org", "age": "44", "member": "2",
         "why_no": "2", "borrow": "1", "items_n": "3", "overall": "8", "duration": "600"},
        # An invalid code in the grid, a formula-like comment, and a failed edit rule.
        card_row("x-bad", [2, 3, 7, 1, 4, 5, 2, 3], items_n=0, comments="=HYPERLINK(\"http://x\",\"y\")"),
        card_row("x-neg", [1, 2, 3, 4, 5, 1, 2, 4], comments="-not a number, but starts like one"),
    ]
    export = pd.concat([export, pd.DataFrame(extra, columns=COLUMNS).astype(str)], ignore_index=True)
    frame = pd.concat([frame, pd.DataFrame({"id": ["x-oop", "x-cascade", "x-bad", "x-neg"], "email": [""] * 4})])
    spec, data, fr = tmp / "lib.qlc", tmp / "export.csv", tmp / "frame.csv"
    spec.write_text(SPEC)
    export.to_csv(data, index=False)
    frame.to_csv(fr, index=False)
    return spec, data, fr


def test_defaults_blank_cells_and_only_flag(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    before = (file_hash(data), data.stat().st_mtime_ns)
    q = load_text(SPEC, str(spec)).questionnaire
    run = clean_export(q, data, tmp_path / "out", sample_frame=fr)
    assert (file_hash(data), data.stat().st_mtime_ns) == before  # the input is never modified
    audit = run.outcome.audit
    changes = {(r.respondent, r.column, r.check) for r in audit.itertuples()}
    assert changes == {
        ("x-oop", "visits", "out-of-path"),
        ("x-cascade", "borrow", "out-of-path"),
        ("x-cascade", "items_n", "out-of-path"),  # borrow = yes was not allowed, so it opens nothing
        ("x-bad", "s_hours", "invalid-value"),
        # Formula-like text is escaped in the spreadsheet outputs, and the audit says so.
        ("x-bad", "comments", "sheet-escape"),
        ("x-neg", "comments", "sheet-escape"),
    }
    assert len(run.outcome.cleaned) == len(read_export(data))  # flag only: nobody removed
    s = run.summary
    assert s["input"]["sha256"] == before[0] and s["version"]
    assert s["findings"]["speeder"] == 1 and s["dispositions"]["break-off"] == 1 and s["dispositions"]["minor"] == 0
    assert s["thresholds"]["duplicates"]["near_threshold"] == 0.85
    assert s["threshold_sources"]["speed.fraction_of_median"] == "common practice, no source"
    assert s["policy"]["respondents"] == {}
    assert any("bias" in n for n in s["notes"])
    # The failed edit rule gets a repair hint: the number of items, and the invalid grid
    # code (saying nothing was borrowed would also put items_n out of path).
    hint = next(h for h in s["repair_hints"] if h["respondent"] == "x-bad")
    assert hint["change"] == ["items_n", "s_hours"] and hint["alternatives"] == []
    assert hint["example_values"]["items_n"] >= 1
    # Clean respondents are untouched, cell for cell.
    original = read_export(data)
    cleaned = read_sheet_csv(tmp_path / "out" / "export.cleaned.csv")
    untouched = ~original["id"].isin(["x-oop", "x-cascade", "x-bad"])
    pd.testing.assert_frame_equal(cleaned[untouched].reset_index(drop=True), original[untouched].reset_index(drop=True))


def test_reverse_audit_reproduces_the_original(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    q = load_text(SPEC, str(spec)).questionnaire
    policy = CleanPolicy(
        respondents={"speeder": "drop", "duplicate-id": "drop", "near-duplicate": "drop", "check-failed": "drop"},
        keep_dispositions=["complete", "partial"],
    )
    run = clean_export(q, data, tmp_path / "out", policy=policy, sample_frame=fr)
    assert run.outcome.removed == {"speeder": 1, "duplicate-id": 1, "near-duplicate": 1, "check-failed": 1, "disposition": 1}
    cleaned = read_sheet_csv(tmp_path / "out" / "export.cleaned.csv")
    audit = read_sheet_csv(tmp_path / "out" / "audit.csv")
    assert len(cleaned) == len(read_export(data)) - 5
    restored = reverse_audit(cleaned, audit)
    pd.testing.assert_frame_equal(restored, read_export(data))
    # The first of each duplicate pair stays.
    assert (cleaned["id"] == "p-dupid").sum() == 1 and "p-near1" in set(cleaned["id"])


def test_formula_cells_are_neutralised(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    q = load_text(SPEC, str(spec)).questionnaire
    clean_export(q, data, tmp_path / "out", sample_frame=fr)
    raw = (tmp_path / "out" / "export.cleaned.csv").read_text()
    assert "'=HYPERLINK" in raw and ",=HYPERLINK" not in raw and '"=HYPERLINK' not in raw
    assert "'-not a number" in raw
    # Negative numbers are data, not formulas.
    assert escape("-5") == "-5" and escape("-2.5e3") == "-2.5e3"
    for cell in ["=1+1", "+x", "@sum", "'=x", "''=x", "'plain", "plain", "", "-", "\tx"]:
        assert unescape(escape(cell)) == cell
        assert not escape(cell).startswith(("=", "+", "@", "\t")) or cell == ""


def test_outputs_are_written_atomically(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    spec, data, fr = setup(tmp_path)
    q = load_text(SPEC, str(spec)).questionnaire
    out = tmp_path / "out"
    clean_export(q, data, out, sample_frame=fr)
    old = (out / "summary.json").read_bytes()

    def broken(obj: object, path: Path) -> None:
        path.write_text('{"half": ')
        raise KeyboardInterrupt

    monkeypatch.setattr("logiccheck.clean.run.write_json_to", broken)
    with pytest.raises(KeyboardInterrupt):
        clean_export(q, data, out, sample_frame=fr)
    assert (out / "summary.json").read_bytes() == old  # the previous file, whole
    assert not list(tmp_path.glob(".*.part"))  # no half-written set left behind


def test_parquet_in_parquet_and_csv_out(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    pq = tmp_path / "export.parquet"
    pd.read_csv(data, dtype=str, keep_default_na=False).to_parquet(pq, index=False)
    q = load_text(SPEC, str(spec)).questionnaire
    run = clean_export(q, pq, tmp_path / "out", sample_frame=fr)
    assert (tmp_path / "out" / "export.cleaned.parquet").is_file()
    assert (tmp_path / "out" / "export.cleaned.csv").is_file()
    assert run.summary["input"]["format"] == "parquet"


def test_command_line(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    policy = tmp_path / "policy.toml"
    policy.write_text('[clean]\nrespondents = { speeder = "drop" }\n\n[quality.speed]\nfraction_of_median = 0.3\n')
    runner = CliRunner()
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o"),
                              "--policy", str(policy), "--frame", str(fr), "--color", "never"])
    assert res.exit_code == 0, res.output
    assert "removed  speeder" in res.output and "bias" in res.output
    summary = json.loads((tmp_path / "o" / "summary.json").read_text())
    assert summary["thresholds"]["speed"]["fraction_of_median"] == 0.3 and summary["removed"] == {"speeder": 1}
    # Input errors: one line, exit 2.
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(tmp_path / "nope.csv"), "--out", str(tmp_path / "o")])
    assert res.exit_code == 2 and "no such file" in res.output
    policy.write_text('[clean]\nrespondents = { speedy = "drop" }\n')
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o"), "--policy", str(policy)])
    assert res.exit_code == 2 and "unknown check 'speedy'" in res.output and "Traceback" not in res.output
    policy.write_text('[clean]\nkeep_dispositions = ["completed"]\n')
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o"), "--policy", str(policy)])
    assert res.exit_code == 2 and "no disposition is called 'completed'" in res.output
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path)])
    assert res.exit_code == 0  # writing beside the input is fine: file names never collide
    assert file_hash(data) == summary["input"]["sha256"]


def test_policy_file_errors(tmp_path: Path) -> None:
    p = tmp_path / "p.toml"
    p.write_text("[clean]\nblank_invalid = 3\n")
    with pytest.raises(PolicyError, match=r"\[blank_invalid\]"):
        load_policy(p)
    p.write_text("[cleaning]\n")
    with pytest.raises(PolicyError, match="unknown table"):
        load_policy(p)
    p.write_text("[tool.logiccheck.quality.duplicates]\nnear_threshold = 0.9\n")
    assert load_policy(p)[1].duplicates.near_threshold == 0.9


def test_xlsx_output_holds_no_formula(tmp_path: Path) -> None:
    import openpyxl

    spec, data, fr = setup(tmp_path)
    xlsx = tmp_path / "export.xlsx"
    book = openpyxl.Workbook()
    ws = book.active
    original = read_export(data)
    ws.append(list(original.columns))
    for row in original.itertuples(index=False):
        ws.append(list(row))
    for row in ws.iter_rows():
        for cell in row:
            cell.data_type = "s"  # the input holds the text, not a formula
    book.save(xlsx)
    assert read_export(xlsx).equals(original)
    q = load_text(SPEC, str(spec)).questionnaire
    clean_export(q, xlsx, tmp_path / "out", sample_frame=fr)
    sheet = openpyxl.load_workbook(tmp_path / "out" / "export.cleaned.xlsx").active
    cells = [c.value for row in sheet.iter_rows() for c in row if isinstance(c.value, str)]
    assert "'=HYPERLINK(\"http://x\",\"y\")" in cells
    assert not any(c.data_type == "f" for row in sheet.iter_rows() for c in row)


def test_escape_is_reversible_for_any_text() -> None:
    from hypothesis import given, settings
    from hypothesis import strategies as st

    @settings(max_examples=300, deadline=None)
    @given(st.text(alphabet=st.sampled_from(list("=+-@'\t\r 1.e5ab")), max_size=8))
    def roundtrip(cell: str) -> None:
        assert unescape(escape(cell)) == cell
        if escape(cell) != cell:
            assert escape(cell).startswith("'")

    roundtrip()


def test_mapped_layout_renamed_columns_and_markers(tmp_path: Path) -> None:
    from logiccheck.data.mapping import DataMapping

    spec, data, fr = setup(tmp_path)
    original = read_export(data)
    mapped = original.rename(columns={"id": "case", "visits": "q_visits", "duration": "secs"})
    # The fielding tool wrote "-77" for items it did not show.
    mapped.loc[mapped["member"] == "2", "q_visits"] = mapped.loc[mapped["member"] == "2", "q_visits"].replace("", "-77")
    mapped.loc[mapped["case"] == "x-oop", "q_visits"] = "5"
    path = tmp_path / "mapped.csv"
    mapped.to_csv(path, index=False)
    mapping = DataMapping(id="case", duration="secs", columns={"visits": "q_visits"}, not_shown=["-77"])
    q = load_text(SPEC, str(spec)).questionnaire
    # the sample frame keys on `id`
    run = clean_export(q, path, tmp_path / "out", sample_frame=fr, mapping=mapping)
    changes = {(r.respondent, r.column, r.check) for r in run.outcome.audit.itertuples()}
    assert changes == {
        ("x-oop", "q_visits", "out-of-path"),
        ("x-cascade", "borrow", "out-of-path"),
        ("x-cascade", "items_n", "out-of-path"),
        ("x-bad", "s_hours", "invalid-value"),
        ("x-bad", "comments", "sheet-escape"),
        ("x-neg", "comments", "sheet-escape"),
    }
    assert run.summary["findings"]["speeder"] == 1
    restored = reverse_audit(read_sheet_csv(tmp_path / "out" / "mapped.cleaned.csv"), read_sheet_csv(tmp_path / "out" / "audit.csv"))
    pd.testing.assert_frame_equal(restored, read_export(path))


def test_configuration_file_above_the_spec(tmp_path: Path) -> None:
    spec, data, fr = setup(tmp_path)
    (tmp_path / "logiccheck.toml").write_text(
        '[clean]\nrespondents = { speeder = "drop" }\n[quality.duplicates]\nnear_threshold = 0.99\n'
    )
    runner = CliRunner()
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o"), "--frame", str(fr)])
    assert res.exit_code == 0, res.output
    summary = json.loads((tmp_path / "o" / "summary.json").read_text())
    assert summary["removed"] == {"speeder": 1} and "near-duplicate" not in summary["findings"]
    res = runner.invoke(cli, ["validate", str(spec), "--data", str(data), "--format", "json"])
    checks = {f["check"] for f in json.loads(res.stdout)["findings"]}
    assert "speeder" in checks and "near-duplicate" not in checks  # the threshold from the file
    (tmp_path / "logiccheck.toml").write_text("[quality.duplicates]\nnear_treshold = 0.9\n")
    res = runner.invoke(cli, ["clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o")])
    assert res.exit_code == 2 and "near_treshold" in res.output
