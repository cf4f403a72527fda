"""The HTML report's sample-against-population part: the chart and the table, read back
with the standard library's HTML parser and compared with validate's JSON."""

from __future__ import annotations

import json
from html.parser import HTMLParser
from pathlib import Path

import pytest

from tests.cli_run import run_cli
from tests.weights.scenario import make

pytest.importorskip("matplotlib")
pytest.importorskip("jinja2")


class _Tables(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.ids: set[str] = set()
        self.rows: list[list[str]] = []
        self._in_table = False
        self._cell: list[str] | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        d = dict(attrs)
        if d.get("id"):
            self.ids.add(str(d["id"]))
        if tag == "table" and d.get("id") == "margins-table":
            self._in_table = True
        elif self._in_table and tag == "tr":
            self.rows.append([])
        elif self._in_table and tag == "td":
            self._cell = []

    def handle_endtag(self, tag: str) -> None:
        if tag == "table":
            self._in_table = False
        elif tag == "td" and self._cell is not None:
            self.rows[-1].append("".join(self._cell).strip())
            self._cell = None

    def handle_data(self, data: str) -> None:
        if self._cell is not None:
            self._cell.append(data)


def test_report_shows_the_chart_and_the_table(tmp_path: Path) -> None:
    spec, export, margins, _ = make(tmp_path, n=120)
    html = tmp_path / "report.html"
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins), "--format", "html",
                  "--out", str(html))
    assert ran.returncode in (0, 1), ran.stderr
    page = _Tables()
    page.feed(html.read_text(encoding="utf-8"))
    assert {"margins", "margins-chart", "margins-table"} <= page.ids
    j = json.loads(run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins), "--format", "json").stdout)
    want = [[r["variable"], r["category"], str(r["sample_count"]), f"{100 * r['sample_share']:.1f}%",
             f"{100 * r['population_share']:.1f}%", f"{100 * r['difference']:+.1f}"] for r in j["representativeness"]]
    assert [row for row in page.rows if row] == want
    text = html.read_text(encoding="utf-8")
    assert "<svg" in text[text.index('id="margins-chart"'):]
    assert "decision for the study&#39;s own protocol" in text or "decision for the study's own protocol" in text


def test_report_without_margins_has_no_such_part(tmp_path: Path) -> None:
    spec, export, _, _ = make(tmp_path, n=40)
    html = tmp_path / "report.html"
    run_cli("validate", str(spec), "--data", str(export), "--format", "html", "--out", str(html))
    page = _Tables()
    page.feed(html.read_text(encoding="utf-8"))
    assert "margins" not in page.ids
