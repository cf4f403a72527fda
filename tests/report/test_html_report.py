"""The HTML report: every part present, in order, self-contained, respondent text escaped."""

from __future__ import annotations

from html.parser import HTMLParser

import pytest
from click.testing import CliRunner

pytest.importorskip("jinja2")
pytest.importorskip("matplotlib")

from logiccheck.checks.runner import run_checks
from logiccheck.cli.main import cli
from logiccheck.loader import load_file, load_text
from logiccheck.report.html import render_fragment, render_html
from logiccheck.report.report_data import ReportData, from_validation
from tests.report.fakes import NASTY, fake_result


class Page(HTMLParser):
    """Collects tags, attributes, ids and text with the standard library's HTML parser."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []
        self.ids: set[str] = set()

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        self.tags.append((tag, attrs))
        if attrs.get("id"):
            self.ids.add(attrs["id"])

    def handle_data(self, data):
        self.text.append(data)


def parse(html: str) -> Page:
    page = Page()
    page.feed(html)
    page.close()
    return page


@pytest.fixture(scope="module")
def bikeshare():
    loaded = load_file("specs/bikeshare.qlc")
    return loaded.questionnaire, run_checks(loaded)


@pytest.fixture(scope="module")
def report_html(bikeshare):
    q, diags = bikeshare
    data = from_validation(q, fake_result(q), diags, settings={"mapping": {"id": "id"}}, export="demo.csv")
    return data, render_html(data)


def test_every_part_is_present(report_html) -> None:
    _, html = report_html
    page = parse(html)
    for part in ("summary", "summary-cards", "dispositions", "finding-summary", "chart", "item-chart", "items",
                 "item-table", "findings", "lint", "settings", "settings-table", "routing"):
        assert part in page.ids, part
    assert html.count("<svg") == 2  # chart and routing picture, inline


def test_self_contained_no_scripts_no_network(report_html) -> None:
    _, html = report_html
    page = parse(html)
    tags = {tag for tag, _ in page.tags}
    assert "script" not in tags and "link" not in tags and "iframe" not in tags and "img" not in tags
    for tag, attrs in page.tags:
        for key in ("src", "href", "xlink:href", "action"):
            value = attrs.get(key)
            assert value is None or value.startswith("#"), (tag, key, value)
    assert "url(http" not in html and "@import" not in html


def test_respondent_text_is_escaped_everywhere(report_html) -> None:
    _, html = report_html
    assert "<script" not in html.lower()
    assert "<b>bold</b>" not in html
    assert "&lt;script&gt;" in html
    text = "".join(parse(html).text)
    for value in NASTY:  # shown literally, as text
        assert value in text, value


def test_items_in_questionnaire_order_grouped_by_section(report_html, bikeshare) -> None:
    data, _ = report_html
    q, _ = bikeshare
    table = data.ordered_items()
    assert list(table["item"]) == [e.name for e in q.items()]
    assert list(dict.fromkeys(table["section"])) == ["screening", "riding", "lapsed", "overall"]


def test_summary_counts_agree_with_sql(report_html) -> None:
    # DuckDB as an independent oracle for the per-check/severity counts.
    duckdb = pytest.importorskip("duckdb")
    data, html = report_html
    findings = data.findings  # noqa: F841 - read by the SQL below
    expected = duckdb.sql(
        "select \"check\", severity, count(*) as n, count(distinct respondent) as r from findings group by all"
    ).fetchall()
    got = {(r["check"], r["severity"]): (r["findings"], r["respondents"]) for r in data.findings_summary().to_dict("records")}
    assert got == {(c, s): (n, r) for c, s, n, r in expected}
    total = sum(data.dispositions.values())
    assert total == data.respondents == 200
    assert f"<td class=\"num\">{data.dispositions['complete']}</td>" in html


def test_findings_grouped_by_check_with_respondent_ids(report_html) -> None:
    data, html = report_html
    page = parse(html)
    assert {"check-out-of-path-error", "check-missing-on-path-warning", "check-straightline-info"} <= page.ids
    some_id = data.findings.loc[data.findings["check"] == "out-of-path", "respondent"].iloc[0]
    assert some_id in "".join(page.text)


def test_lint_diagnostics_show_their_source_lines() -> None:
    text = 'survey t "T"\n\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n\nq1: single yesno "A?"\nq2: text "B?" when q_one = yes\n'
    loaded = load_text(text, "typo.qlc")
    diags = run_checks(loaded)
    assert any(d.check == "unknown-name" for d in diags)
    html = render_html(ReportData(loaded.questionnaire, diags))
    assert "unknown-name" in html
    assert "q2: text &#34;B?&#34; when q_one = yes" in html  # the source line, escaped
    assert "typo.qlc:8:" in html


def test_thresholds_and_policy_are_listed(report_html) -> None:
    _, html = report_html
    text = "".join(parse(html).text)
    assert "thresholds.speeder.min_seconds_per_item" in text and "mapping.id" in text


def test_notebook_fragment_has_summary_and_chart(report_html) -> None:
    data, _ = report_html
    fragment = render_fragment(data)
    assert 'id="summary-cards"' in fragment and 'id="item-chart"' in fragment and "<svg" in fragment
    assert "<html" not in fragment and "<script" not in fragment.lower()
    # its styles stay inside its own box, so the notebook page keeps its look
    import re

    css = fragment[fragment.index("<style>") + 7 : fragment.index("</style>")]
    css = re.sub(r"/\*.*?\*/", "", css, flags=re.S)
    selectors = [s.strip() for block in re.findall(r"([^{}]+)\{", css) for s in block.split(",")]
    assert selectors and all(s.startswith(".logiccheck-result") for s in selectors), selectors


def test_report_command_spec_only(tmp_path) -> None:
    out = tmp_path / "spec.html"
    result = CliRunner().invoke(cli, ["report", "specs/bikeshare.qlc", "--out", str(out)])
    assert result.exit_code == 0, result.output
    page = parse(out.read_text(encoding="utf-8"))
    assert "routing" in page.ids and "lint" in page.ids and "item-table" not in page.ids
    result = CliRunner().invoke(cli, ["report", "specs/bikeshare.qlc", "--out", str(tmp_path / "no" / "x.html")])
    assert result.exit_code == 2 and "cannot write" in result.output


def test_templates_ship_inside_the_package() -> None:
    from importlib.resources import files

    folder = files("logiccheck.report") / "templates"
    for name in ("report.html.j2", "fragment.html.j2", "_summary.html.j2", "_chart.html.j2", "_styles.css",
                 "_fragment.css"):
        assert (folder / name).is_file(), name


@pytest.mark.slow
def test_templates_are_in_the_wheel(tmp_path) -> None:
    import importlib.util
    import subprocess
    import sys
    import zipfile
    from pathlib import Path

    if importlib.util.find_spec("hatchling") is None or importlib.util.find_spec("build") is None:
        pytest.skip("building the wheel offline needs hatchling and build installed")
    root = Path(__file__).resolve().parents[2]
    done = subprocess.run([sys.executable, "-m", "build", "--wheel", "--no-isolation", "--outdir", str(tmp_path),
                           str(root)], capture_output=True, text=True, check=False)
    assert done.returncode == 0, done.stderr[-800:]
    wheel = next(tmp_path.glob("*.whl"))
    names = set(zipfile.ZipFile(wheel).namelist())
    for name in ("report.html.j2", "fragment.html.j2", "_summary.html.j2", "_chart.html.j2", "_styles.css",
                 "_fragment.css"):
        assert f"logiccheck/report/templates/{name}" in names


def test_any_free_text_round_trips_as_text(bikeshare) -> None:
    # Property: whatever a respondent typed, the page shows exactly that text and no
    # markup of it (checked with the standard library's HTML parser).
    import pandas as pd
    from hypothesis import given, settings
    from hypothesis import strategies as st

    from logiccheck.report.html import _environment, report_context

    q, _ = bikeshare
    alphabet = st.characters(blacklist_categories=("Cs", "Cc"), blacklist_characters="\x00")
    hostile = st.sampled_from(["<", ">", "&", '"', "'", "</td>", "<img src=x onerror=alert(1)>", "=", "+", "@", "{{", "{%"])
    texts = st.lists(st.one_of(st.text(alphabet, max_size=12), hostile), min_size=1, max_size=6).map("".join)

    @settings(max_examples=30, deadline=None)
    @given(value=texts)
    def check(value: str) -> None:
        findings = pd.DataFrame([{"check": "out-of-path", "severity": "error", "respondent": "r1", "row": 2,
                                  "item": "praise", "value": value, "message": "m"}])
        data = ReportData(q, [], respondents=1, items=pd.DataFrame(columns=["item"]), findings=findings)
        html = _environment().get_template("report.html.j2").render(**report_context(data, pictures=False, chart=False))
        page = parse(html)
        assert value.strip() in "".join(page.text)
        assert not any(tag == "img" for tag, _ in page.tags)

    check()


def test_survey_report_without_data(tmp_path) -> None:
    import logiccheck

    path = logiccheck.load("specs/bikeshare.qlc").report(tmp_path / "spec.html")
    page = parse(path.read_text(encoding="utf-8"))
    assert "routing" in page.ids and "item-table" not in page.ids


def test_report_uses_and_lists_the_spec_configuration(tmp_path) -> None:
    spec = tmp_path / "typo.qlc"
    spec.write_text('survey t "T"\n\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n\n'
                    'q1: single yesno "A?"\nq2: text "B?" when q_one = yes\n', encoding="utf-8")
    (tmp_path / "logiccheck.toml").write_text('[checks]\nunknown-name = "warning"\n', encoding="utf-8")
    out = tmp_path / "r.html"
    result = CliRunner().invoke(cli, ["report", str(spec), "--out", str(out)])
    assert result.exit_code == 0, result.output
    html = out.read_text(encoding="utf-8")
    text = "".join(parse(html).text)
    assert "logiccheck.toml" in text and "checks.unknown-name" in text
    # the same severity `lint` gives with this configuration
    import logiccheck

    diags = logiccheck.load(spec).lint()
    assert [d.severity.value for d in diags if d.check == "unknown-name"] == ["warning"]
    assert 'sev-warning">warning</span> <strong>unknown-name' in html


def test_file_level_findings_list_no_empty_respondent(bikeshare) -> None:
    import pandas as pd

    q, _ = bikeshare
    findings = pd.DataFrame([
        {"check": "unknown-column", "severity": "info", "respondent": None, "row": None, "item": None,
         "value": None, "message": "column `extra` is not in the spec"},
        {"check": "unknown-column", "severity": "info", "respondent": None, "row": None, "item": None,
         "value": None, "message": "column `more` is not in the spec"},
    ])
    data = ReportData(q, [], respondents=3, items=pd.DataFrame(columns=["item"]), findings=findings)
    from logiccheck.report.html import _finding_groups

    (group,) = _finding_groups(data)
    assert group["count"] == 2 and group["ids"] == [] and group["respondents"] == 0
