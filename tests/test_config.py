"""Configuration files: discovery, validation errors, and their effect on `lint`."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from logiccheck.config import Config, ConfigError, config_for, find_config, load_config, parse_config
from tests.cli_run import Ran, run_cli
from tests.conftest import CHECK_FIXTURES, ROOT

BAD_NAME = (CHECK_FIXTURES / "unknown-name" / "bad.qlc").read_text()


def _lint(*args: str, cwd: Path | None = None) -> Ran:
    del cwd  # configuration is found from each spec's folder, not the working folder
    return run_cli("lint", *args)


def test_found_by_walking_up(tmp_path: Path) -> None:
    (tmp_path / "logiccheck.toml").write_text('fail-on = "warning"\n[checks]\n"unknown-name" = "warning"\n')
    deep = tmp_path / "specs" / "wave2"
    deep.mkdir(parents=True)
    spec = deep / "a.qlc"
    spec.write_text(BAD_NAME)
    assert find_config(spec) == tmp_path / "logiccheck.toml"
    config = config_for(spec)
    assert config.fail_on == "warning" and config.severity["unknown-name"].value == "warning"


def test_pyproject_table_and_precedence(tmp_path: Path) -> None:
    (tmp_path / "pyproject.toml").write_text('[project]\nname = "x"\n[tool.logiccheck]\nformat = "sarif"\n')
    sub = tmp_path / "sub"
    sub.mkdir()
    (sub / "pyproject.toml").write_text('[project]\nname = "no table here"\n')
    assert find_config(sub / "s.qlc") == tmp_path / "pyproject.toml"  # a pyproject without the table is passed over
    assert config_for(sub / "s.qlc").format == "sarif"
    (tmp_path / "logiccheck.toml").write_text('format = "json"\n')
    assert config_for(sub / "s.qlc").format == "json"


def test_defaults_when_none_is_found(tmp_path: Path) -> None:
    assert find_config(tmp_path / "x.qlc") is None
    config = config_for(tmp_path / "x.qlc")
    assert config.source is None and config.checks == {} and config.fail_on is None


@pytest.mark.parametrize(
    ("table", "says"),
    [
        ({"fail_on": "error"}, "unknown key `fail_on`; did you mean `fail-on`?"),
        ({"checks": {"unknown-nmae": "off"}}, "key `checks.unknown-nmae`: no check is called `unknown-nmae`; did you mean `unknown-name`?"),
        ({"checks": {"unknown-name": "loud"}}, "key `checks.unknown-name`: 'loud' is not allowed; use one of error, warning, info, off"),
        ({"fail-on": "never"}, "key `fail-on`: 'never' is not allowed; use one of"),
        ({"format": "sarf"}, "key `format`: 'sarf' is not a format; did you mean `sarif`?"),
        ({"checks": "all"}, "`checks` must be a table"),
    ],
)
def test_errors_name_the_file_the_key_and_what_is_allowed(table: dict, says: str) -> None:
    with pytest.raises(ConfigError) as err:
        parse_config(table, "proj/logiccheck.toml")
    assert str(err.value).startswith("proj/logiccheck.toml: ")
    assert says in str(err.value)
    assert "\n" not in str(err.value)


def test_broken_toml_is_one_line(tmp_path: Path) -> None:
    path = tmp_path / "logiccheck.toml"
    path.write_text("fail-on = \n")
    with pytest.raises(ConfigError, match="not valid TOML"):
        load_config(path)


def test_pass_through_tables_are_kept() -> None:
    config = parse_config({"data": {"id": "resp_id"}, "quality": {"speed": {"fraction_of_median": 0.3}}, "clean": {}}, "x.toml")
    assert config.data == {"id": "resp_id"} and config.quality == {"speed": {"fraction_of_median": 0.3}}


def test_off_and_override(tmp_path: Path) -> None:
    config = Config.model_validate({"checks": {"unknown-name": "off", "unknown-code": "info"}})
    assert config.disabled == {"unknown-name"} and config.severity["unknown-code"].value == "info"


def test_lint_uses_the_configuration(tmp_path: Path) -> None:
    spec = tmp_path / "a.qlc"
    spec.write_text(BAD_NAME)
    assert _lint(str(spec), cwd=tmp_path).returncode == 1
    (tmp_path / "logiccheck.toml").write_text('[checks]\n"unknown-name" = "warning"\n')
    assert _lint(str(spec), cwd=tmp_path).returncode == 0  # now a warning, below the default fail-on
    (tmp_path / "logiccheck.toml").write_text('fail-on = "warning"\nformat = "github"\n[checks]\n"unknown-name" = "warning"\n')
    proc = _lint(str(spec), cwd=tmp_path)
    assert proc.returncode == 1
    assert [ln.split("::")[1].split(" ")[0] for ln in proc.stdout.splitlines() if "title=unknown-name" in ln] == ["warning"]
    (tmp_path / "logiccheck.toml").write_text('[checks]\n"unknown-name" = "off"\n')
    proc = _lint(str(spec), "--format", "json", cwd=tmp_path)
    assert proc.returncode == 0
    assert [d["check"] for d in json.loads(proc.stdout)["diagnostics"] if d["severity"] != "info"] == []


def test_lint_bad_configuration_exits_2(tmp_path: Path) -> None:
    spec = tmp_path / "a.qlc"
    spec.write_text(BAD_NAME)
    other = tmp_path / "other.toml"
    other.write_text('[checks]\n"unknown-nam" = "off"\n')
    proc = _lint(str(spec), "--config", str(other), cwd=tmp_path)
    assert proc.returncode == 2
    assert proc.stderr.strip().count("\n") == 0
    assert str(other) in proc.stderr and "did you mean `unknown-name`" in proc.stderr
    proc = _lint(str(spec), "--config", str(tmp_path / "missing.toml"), cwd=tmp_path)
    assert proc.returncode == 2 and "no such configuration file" in proc.stderr


def test_data_table_is_validated_with_the_mapping_model() -> None:
    # The [data] table goes through the data mapping's own pydantic model.
    with pytest.raises(ConfigError) as err:
        parse_config({"data": {"idd": "resp"}}, "proj/logiccheck.toml")
    assert "proj/logiccheck.toml" in str(err.value) and "`data.idd`" in str(err.value)
    config = parse_config({"data": {"id": "resp"}}, "proj/logiccheck.toml")
    assert config.models["data"].id == "resp"


def test_validate_reads_the_data_table(tmp_path: Path) -> None:
    spec = tmp_path / "bikeshare.qlc"
    spec.write_text((ROOT / "specs" / "bikeshare.qlc").read_text())
    rows = (ROOT / "specs" / "bikeshare_export.csv").read_text().split("\n")
    header = rows[0].split(",")
    assert header[0] == "id"
    (tmp_path / "export.csv").write_text("\n".join([",".join(["resp_no", *header[1:]]), *rows[1:]]))

    def validate() -> Ran:
        return run_cli("validate", str(spec), "--data", str(tmp_path / "export.csv"), "--format", "json")

    without = validate()
    (tmp_path / "logiccheck.toml").write_text('[data]\nid = "resp_no"\n')
    with_config = validate()
    reference = run_cli("validate", str(ROOT / "specs" / "bikeshare.qlc"), "--data", str(ROOT / "specs" / "bikeshare_export.csv"), "--format", "json")
    assert without.stdout != reference.stdout or without.returncode == 2
    got, want = json.loads(with_config.stdout), json.loads(reference.stdout)
    assert got["respondents"] == want["respondents"]
    assert [f["check"] for f in got["findings"]] == [f["check"] for f in want["findings"]]
