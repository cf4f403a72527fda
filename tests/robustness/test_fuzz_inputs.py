"""Fuzzing exports and configuration (beside the spec fuzzing in tests/test_robustness.py):
whatever the bytes, a command gives findings (exit 0/1) or one line (exit 2), never a
traceback or an internal error, and never changes its inputs."""

from __future__ import annotations

import json
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.clean.policy import CleanPolicy, PolicyError, load_policy
from tests.robustness.common import cli, fingerprint, project

FUZZ = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])

CELL = st.one_of(
    st.sampled_from(["", "1", "2", "-3", "98", "٥", "１２", "1e-400", "=1+1", "\r", "\x00", '"', "a,b", " 7 "]),
    st.text(max_size=6),
)


def _check(ran_code: int, stderr: str) -> None:
    assert ran_code in (0, 1, 2), stderr
    assert "Traceback" not in stderr and "internal error" not in stderr, stderr
    if ran_code == 2:
        assert len([ln for ln in stderr.splitlines() if ln.startswith("logiccheck: error:")]) == 1, stderr


@FUZZ
@given(st.lists(st.lists(CELL, min_size=3, max_size=7), min_size=0, max_size=6), st.booleans())
def test_csv_exports(tmp_path: Path, rows: list[list[str]], quote_all: bool) -> None:
    spec, _ = project(tmp_path)
    data = tmp_path / "fuzz.csv"
    lines = ["id,age,regular,trips,comment"]
    for row in rows:
        cells = [('"' + c.replace('"', '""') + '"') if quote_all or any(x in c for x in ',"\r\n') else c for c in row]
        lines.append(",".join(cells))
    data.write_bytes(("\n".join(lines) + "\n").encode("utf-8", "surrogatepass"))
    before = fingerprint(spec, data)
    ran = cli("validate", str(spec), "--data", str(data), "--format", "json")
    _check(ran.returncode, ran.stderr)
    if ran.returncode != 2:
        json.loads(ran.stdout)
    assert fingerprint(spec, data) == before


@FUZZ
@given(st.binary(max_size=200))
def test_raw_bytes_as_an_export(tmp_path: Path, raw: bytes) -> None:
    spec, _ = project(tmp_path)
    for suffix in (".csv", ".xlsx", ".parquet", ".jsonl"):
        data = tmp_path / f"raw{suffix}"
        data.write_bytes(raw)
        ran = cli("validate", str(spec), "--data", str(data), "--format", "json")
        _check(ran.returncode, ran.stderr)
        assert data.read_bytes() == raw


TOML_VALUE = st.one_of(
    st.booleans(), st.integers(-3, 3), st.sampled_from(['"no"', '"yes"', '""', "[]", '["complete"]', '["x", 1]', "{}", '"{name}_{value}"', '"{value"']),
)
KEYS = st.sampled_from([
    ("clean", "blank_invalid"), ("clean", "blank_out_of_path"), ("clean", "sheet_safe"), ("clean", "keep_dispositions"),
    ("clean", "respondents"), ("data", "id"), ("data", "blank"), ("data.multi", "column"), ("data.multi", "layout"),
    ("data", "columns"), ("clean", "nonsense"),
])


def _toml(value: object) -> str:
    return ("true" if value else "false") if isinstance(value, bool) else str(value)


@FUZZ
@given(st.lists(st.tuples(KEYS, TOML_VALUE), min_size=1, max_size=4, unique_by=lambda kv: kv[0]))
def test_configuration_values(tmp_path: Path, pairs: list[tuple[tuple[str, str], object]]) -> None:
    tables: dict[str, list[str]] = {}
    for (table, key), value in pairs:
        tables.setdefault(table, []).append(f"{key} = {_toml(value)}")
    text = "".join(f"[{t}]\n" + "\n".join(lines) + "\n" for t, lines in tables.items())
    policy = tmp_path / "policy.toml"
    policy.write_text(text)
    try:
        clean, _ = load_policy(policy)
    except PolicyError as err:
        assert "\n" not in str(err)
    else:
        # Strict: what loads holds the declared types, nothing guessed from text.
        assert isinstance(clean, CleanPolicy) and isinstance(clean.blank_invalid, bool)
        assert clean.keep_dispositions is None or (clean.keep_dispositions and all(isinstance(d, str) for d in clean.keep_dispositions))
    spec, data = project(tmp_path)
    ran = cli("validate", str(spec), "--data", str(data), "--map", str(policy), "--format", "json")
    _check(ran.returncode, ran.stderr)
