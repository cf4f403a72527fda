"""Bad input stops with one line and exit 2 (never a traceback), and no input changes."""

from __future__ import annotations

import errno
import os
import threading
from pathlib import Path

import pytest

from tests.robustness.common import cli, cli_process, fingerprint, one_line_error, project


# ------------------------------------------------------------ outputs never replace inputs
@pytest.mark.parametrize(
    "args",
    [
        ["graph", "{spec}", "--out", "{spec}"],
        ["graph", "{spec}", "--out", "{tmp}/sub/../ferry.qlc"],
        ["simulate", "{spec}", "-n", "3", "--out", "{spec}"],
        ["simulate", "{spec}", "-n", "3", "--out", "{tmp}/s.csv", "--seed", "1"],  # faults file beside it: see below
        ["validate", "{spec}", "--data", "{data}", "--format", "html", "--out", "{data}"],
        ["report", "{spec}", "--data", "{data}", "--out", "{data}"],
        ["draft", "--data", "{data}", "--out", "{data}"],
        ["clean", "{spec}", "--data", "{data}", "--out", "{tmp}/o", "--sample", "{tmp}/o/audit.csv"],
        ["clean", "{spec}", "--data", "{data}", "--out", "{tmp}/o", "--policy", "{tmp}/o/summary.json"],
        ["clean", "{spec}", "--data", "{data}", "--out", "{tmp}", "--frame", "{tmp}/findings.csv"],
        ["clean", "{spec}", "--data", "{data}", "--out", "{tmp}/link"],
    ],
)
def test_no_output_replaces_an_input(tmp_path: Path, args: list[str]) -> None:
    spec, data = project(tmp_path)
    (tmp_path / "o").mkdir()
    for name in ("audit.csv", "summary.json"):
        (tmp_path / "o" / name).write_text("id,outcome\n1,complete\n")
    (tmp_path / "findings.csv").write_text("id\n1\n")
    (tmp_path / "link").mkdir()
    os.symlink(data, tmp_path / "link" / "ferry.cleaned.csv")  # a link to the export where an output would go
    (tmp_path / "s.faults.csv").unlink(missing_ok=True)
    if "{tmp}/s.csv" in args:
        os.symlink(spec, tmp_path / "s.faults.csv")  # the faults file beside --out is the spec
    before = fingerprint(spec, data, *(tmp_path / "o").iterdir(), tmp_path / "findings.csv")
    filled = [a.format(spec=spec, data=data, tmp=tmp_path) for a in args]
    line = one_line_error(cli(*filled))
    assert "would replace" in line
    assert fingerprint(spec, data, *(tmp_path / "o").iterdir(), tmp_path / "findings.csv") == before


def test_hard_links_count_as_the_same_file(tmp_path: Path) -> None:
    spec, _ = project(tmp_path)
    os.link(spec, tmp_path / "hard.qlc")
    line = one_line_error(cli("graph", str(spec), "--out", str(tmp_path / "hard.qlc")))
    assert "would replace the spec" in line


@pytest.mark.parametrize("command", [["clean", "{spec}", "--data", "{data}", "--out"], ["graph", "{spec}", "--out"]])
def test_out_under_a_file(tmp_path: Path, command: list[str]) -> None:
    spec, data = project(tmp_path)
    args = [*(a.format(spec=spec, data=data) for a in command), str(data / "sub")]
    one_line_error(cli(*args))


# ------------------------------------------------------------ the output folder fails
@pytest.mark.parametrize("code", [errno.ENOSPC, errno.EROFS, errno.EACCES])
def test_full_or_read_only_output_folder(tmp_path: Path, monkeypatch: pytest.MonkeyPatch, code: int) -> None:
    spec, data = project(tmp_path)
    before = fingerprint(spec, data)
    import logiccheck.clean.io as io_module

    def refuse(*_: object, **__: object) -> None:
        raise OSError(code, os.strerror(code), str(tmp_path / "o" / "audit.csv"))

    monkeypatch.setattr(io_module, "write_csv_table", refuse)
    line = one_line_error(cli("clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o")))
    assert "audit.csv" in line
    assert not (tmp_path / "o").exists() and not list(tmp_path.glob(".o.*"))  # nothing half-written
    assert fingerprint(spec, data) == before


def test_graph_into_a_full_disk(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    spec, _ = project(tmp_path)

    def full(*_: object, **__: object) -> None:
        raise OSError(errno.ENOSPC, "No space left on device", str(tmp_path / "g.dot"))

    monkeypatch.setattr("logiccheck.cli.graph.write_atomic", full)
    assert "no space left" in one_line_error(cli("graph", str(spec), "--out", str(tmp_path / "g.dot"))).lower()


# ------------------------------------------------------------ unreadable inputs
def test_corrupt_parquet(tmp_path: Path) -> None:
    spec, _ = project(tmp_path)
    bad = tmp_path / "x.parquet"
    bad.write_bytes(b"PAR1 not really a parquet file")
    for command in (["validate"], ["clean"]):
        extra = ["--out", str(tmp_path / "o")] if command == ["clean"] else []
        assert "Parquet" in one_line_error(cli(*command, str(spec), "--data", str(bad), *extra))


def test_bad_multi_column_template(tmp_path: Path) -> None:
    spec, data = project(tmp_path)
    (tmp_path / "map.toml").write_text('[data.multi]\ncolumn = "{name}_{value}_{oops}"\n')
    assert "template" in one_line_error(cli("validate", str(spec), "--data", str(data), "--map", str(tmp_path / "map.toml")))


def test_missing_frame_file_named_in_the_mapping(tmp_path: Path) -> None:
    spec, data = project(tmp_path)
    (tmp_path / "map.toml").write_text('frame = "nowhere/frame.csv"\n')
    assert "frame.csv" in one_line_error(cli("validate", str(spec), "--data", str(data), "--map", str(tmp_path / "map.toml")))


def test_ragged_rows_name_their_line(tmp_path: Path) -> None:
    spec, _ = project(tmp_path)
    data = tmp_path / "ragged.csv"
    data.write_text("id,age,regular,trips,comment\nr1,30,1,2,ok\nr2,31,2,,too,many\n")
    assert "line 3" in one_line_error(cli("validate", str(spec), "--data", str(data)))


def test_a_sheet_declaring_a_million_rows_is_read_by_the_rows_present(tmp_path: Path) -> None:
    import openpyxl

    xlsx = tmp_path / "tall.xlsx"
    book = openpyxl.Workbook(write_only=True)
    sheet = book.create_sheet()
    sheet.append(["id", "age", "regular", "trips", "comment"])
    sheet.append(["r1", "30", "2", None, "fine"])
    book.save(xlsx)
    from logiccheck.data.readers import open_export

    # One cell far below the rest (what a stray keystroke at the sheet's last row leaves).
    book = openpyxl.load_workbook(xlsx)
    book.active.cell(1_048_576, 1, "stray")
    book.save(xlsx)
    tables = list(open_export(xlsx).chunks)
    assert sum(t.num_rows for t in tables) == 2  # the stray row is a row; the million blanks are not


# ------------------------------------------------------------ specs
def test_empty_spec_is_an_error(tmp_path: Path) -> None:
    spec = tmp_path / "empty.qlc"
    for text in ("", "\n\n", "# only a comment\n"):
        spec.write_text(text)
        ran = cli("lint", str(spec), "--no-solver")
        assert ran.returncode == 1 and "empty" in ran.stdout


@pytest.mark.parametrize("ending", ["\r", "\r\n", "mixed"])
def test_old_and_mixed_line_endings_parse(tmp_path: Path, ending: str) -> None:
    spec, _ = project(tmp_path)
    text = spec.read_text()
    if ending == "mixed":
        lines = text.split("\n")
        text = "".join(line + ("\r", "\r\n", "\n")[i % 3] for i, line in enumerate(lines))
    else:
        text = text.replace("\n", ending)
    spec.write_bytes(text.encode())
    ran = cli("lint", str(spec), "--no-solver", "--format", "json")
    assert ran.returncode == 0 and '"syntax-error"' not in ran.stdout
    graph = cli("graph", str(spec))
    assert "trips" in graph.stdout


def test_a_tab_indented_line_is_reported_where_it_is(tmp_path: Path) -> None:
    spec = tmp_path / "tab.qlc"
    spec.write_text('survey t "T"\n\tage: number 0..120 "Age?"\n')
    ran = cli("lint", str(spec), "--no-solver", "--format", "json")
    assert '"line": 2' in ran.stdout and '"column": 2' in ran.stdout
    spec.write_text('survey t "T"\nsection s "S"\n\tage: number 0..120 "Age?"\n  x: text "X"\n')
    ran = cli("lint", str(spec), "--no-solver", "--format", "json")
    assert '"line": 4' in ran.stdout and '"column": 3' in ran.stdout


def test_a_thousand_term_condition_and_deep_brackets(tmp_path: Path) -> None:
    terms = " and ".join(f"age > {i % 90}" for i in range(1000))
    nested = "(" * 2000 + "age > 1" + ")" * 2000
    spec = tmp_path / "deep.qlc"
    spec.write_text(f'survey d "D"\nage: number 0..120 "Age?"\nx: text "X" when {terms}\ny: text "Y" when {nested}\n')
    ran = cli("lint", str(spec), "--no-solver", "--format", "json")
    assert ran.returncode == 0, ran.stderr
    assert "Traceback" not in ran.stderr and "RecursionError" not in ran.stderr


# ------------------------------------------------------------ exports from streams, encodings, numbers
def test_standard_input_and_a_named_pipe(tmp_path: Path) -> None:
    spec, data = project(tmp_path)
    whole = cli_process("validate", str(spec), "--data", str(data), "--format", "json")
    piped = cli_process("validate", str(spec), "--data", "-", "--format", "json", stdin=data.read_bytes())
    assert piped.returncode == whole.returncode and piped.stdout == whole.stdout
    fifo = tmp_path / "pipe.csv"
    os.mkfifo(fifo)
    writer = threading.Thread(target=lambda: fifo.write_bytes(data.read_bytes()))
    writer.start()
    ran = cli_process("validate", str(spec), "--data", str(fifo), "--format", "json", timeout=120)
    writer.join(timeout=5)
    assert ran.returncode == whole.returncode and ran.stdout == whole.stdout


def test_clean_reads_standard_input_and_a_named_pipe(tmp_path: Path) -> None:
    import json

    spec, data = project(tmp_path)
    whole = cli_process("clean", str(spec), "--data", str(data), "--out", str(tmp_path / "file"))
    assert whole.returncode == 0, whole.stderr
    piped = cli_process("clean", str(spec), "--data", "-", "--out", str(tmp_path / "stdin"), stdin=data.read_bytes())
    assert piped.returncode == 0, piped.stderr
    out = tmp_path / "stdin"
    # No file name to go by: the cleaned export is named for standard input, in the format read.
    assert sorted(p.name for p in out.iterdir()) == [
        "audit.csv", "findings.csv", "standard-input.cleaned.csv", "summary.json"]
    assert (out / "standard-input.cleaned.csv").read_bytes() == (tmp_path / "file" / "ferry.cleaned.csv").read_bytes()
    for name in ("audit.csv", "findings.csv"):
        assert (out / name).read_bytes() == (tmp_path / "file" / name).read_bytes(), name
    got = json.loads((out / "summary.json").read_text(encoding="utf-8"))["input"]
    was = json.loads((tmp_path / "file" / "summary.json").read_text(encoding="utf-8"))["input"]
    assert got == {**was, "file": "-"}  # the same bytes hashed, the same format
    # Tab-delimited on standard input: written back tab-delimited as .tsv (and the .csv copy).
    tabbed = data.read_text(encoding="utf-8").replace(",", "\t").encode("utf-8")
    tab = cli_process("clean", str(spec), "--data", "-", "--out", str(tmp_path / "tab"), stdin=tabbed)
    assert tab.returncode == 0, tab.stderr
    assert (tmp_path / "tab" / "standard-input.cleaned.tsv").read_bytes() == (out / "standard-input.cleaned.csv").read_bytes().replace(b",", b"\t")
    assert (tmp_path / "tab" / "standard-input.cleaned.csv").is_file()
    # A named pipe can be read once: the run and the input hash share one copy.
    fifo = tmp_path / "pipe.csv"
    os.mkfifo(fifo)
    writer = threading.Thread(target=lambda: fifo.write_bytes(data.read_bytes()))
    writer.start()
    ran = cli_process("clean", str(spec), "--data", str(fifo), "--out", str(tmp_path / "fifo"), timeout=120)
    writer.join(timeout=5)
    assert ran.returncode == 0, ran.stderr
    assert (tmp_path / "fifo" / "pipe.cleaned.csv").read_bytes() == (out / "standard-input.cleaned.csv").read_bytes()


def test_utf16_with_byte_order_mark(tmp_path: Path) -> None:
    spec, data = project(tmp_path)
    wide = tmp_path / "wide.csv"
    wide.write_bytes(data.read_text(encoding="utf-8").encode("utf-16"))  # Python writes the BOM
    a = cli("validate", str(spec), "--data", str(data), "--format", "json")
    b = cli("validate", str(spec), "--data", str(wide), "--format", "json")
    assert a.returncode == b.returncode and a.stdout == b.stdout and "\\u0000" not in b.stdout


@pytest.mark.parametrize("text", ["٥", "１２", "1e-400", "1_0", "0x1f", "nan", "inf", "²"])
def test_numbers_are_ascii_survey_numbers(tmp_path: Path, text: str) -> None:
    import json

    spec, _ = project(tmp_path)
    data = tmp_path / "n.csv"
    data.write_text(f"id,age,regular,trips,comment\nr1,{text},2,,\n", encoding="utf-8")
    ran = cli("validate", str(spec), "--data", str(data), "--format", "json")
    doc = json.loads(ran.stdout)
    assert any(f["check"] == "invalid-value" and f["item"] == "age" for f in doc["findings"]), doc["findings"]


def test_plain_numbers_stay_valid(tmp_path: Path) -> None:
    import json

    spec, _ = project(tmp_path)
    data = tmp_path / "n.csv"
    data.write_text("id,age,regular,trips,comment\nr1, 30 ,2,,\nr2,+41,1,1e1,\nr3,50.0,1,0,\n", encoding="utf-8")
    doc = json.loads(cli("validate", str(spec), "--data", str(data), "--format", "json").stdout)
    assert not [f for f in doc["findings"] if f["check"] == "invalid-value"]


# ------------------------------------------------------------ configuration
@pytest.mark.parametrize(
    ("where", "text", "needle"),
    [
        ("logiccheck.toml", '[clean]\nblank_invalid = "no"\n', "blank_invalid"),
        ("logiccheck.toml", "[clean]\nkeep_dispositions = []\n", "every respondent"),
        ("logiccheck.toml", '[clean]\nkeep_dispositions = "complete"\n', "keep_dispositions"),
        ("logiccheck.toml", '[data]\nblank = "NA"\n', "blank"),
        ("pyproject.toml", "[tool.logiccheck\nfail-on = 1\n", "pyproject.toml"),
        ("pyproject.toml", '[tool.logiccheck.clean]\nsheet_safe = "yes"\n', "sheet_safe"),
    ],
)
def test_configuration_is_strict(tmp_path: Path, where: str, text: str, needle: str) -> None:
    spec, data = project(tmp_path)
    (tmp_path / where).write_text(text)
    line = one_line_error(cli("clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o")))
    assert needle in line
    assert not (tmp_path / "o").exists()


def test_a_policy_removing_everyone_stops(tmp_path: Path) -> None:
    spec, data = project(tmp_path)
    (tmp_path / "p.toml").write_text('[clean]\nkeep_dispositions = ["break-off"]\n')
    line = one_line_error(cli("clean", str(spec), "--data", str(data), "--out", str(tmp_path / "o"), "--policy", str(tmp_path / "p.toml")))
    assert "every respondent" in line and not (tmp_path / "o").exists()


def test_an_unrelated_broken_pyproject_is_ignored(tmp_path: Path) -> None:
    spec, _ = project(tmp_path)
    (tmp_path / "pyproject.toml").write_text("[project\nname = 'someone-else'\n")
    assert cli("lint", str(spec), "--no-solver").returncode == 0


# ------------------------------------------------------------ what reaches the terminal
def test_escape_sequences_in_cells_and_names_are_shown_not_obeyed(tmp_path: Path) -> None:
    spec, _ = project(tmp_path)
    data = tmp_path / "esc.csv"
    data.write_bytes(b"id,age,regular,trips,comment,\x1b]0;owned\x07col\nr1,\x1b[2J9999,2,3,x,\n")
    ran = cli("validate", str(spec), "--data", str(data), "--color", "never")
    assert "\x1b" not in ran.stdout and "\x07" not in ran.stdout
    assert "\\x1b" in ran.stdout


def test_long_values_are_cut_with_their_length(tmp_path: Path) -> None:
    import json

    spec, _ = project(tmp_path)
    data = tmp_path / "long.csv"
    data.write_text("id,age,regular,trips,comment\nr1," + "9" * 1_048_576 + ",2,,\n")
    doc = json.loads(cli("validate", str(spec), "--data", str(data), "--format", "json").stdout)
    message = next(f["message"] for f in doc["findings"] if f["item"] == "age")
    assert "… (1,048,576 characters)" in message and len(message) < 1000


def test_bidirectional_controls_are_neutralised_in_html() -> None:
    from logiccheck.report.textsafe import BIDI, html_text, terminal_text

    for ch in BIDI:
        assert ch not in html_text(f"a{ch}b") and ch not in terminal_text(f"a{ch}b")
    assert html_text("plain é") == "plain é"
    assert terminal_text("a\tb", keep_tabs=True) == "a\tb" and terminal_text("a\x1bb") == "a\\x1bb"
