"""`logiccheck graph`: the drawing data and its dot and mermaid emitters."""

from __future__ import annotations

import re

from click.testing import CliRunner

from logiccheck.cli.main import cli
from logiccheck.loader import load_file, load_text
from logiccheck.report.graph_data import build_drawing, span_text
from logiccheck.report.graph_dot import to_dot
from logiccheck.report.graph_mermaid import to_mermaid


def test_drawing_groups_gates_and_labels(bikeshare_path) -> None:
    drawing = build_drawing(load_file(bikeshare_path).questionnaire)
    assert drawing.nodes["n_used"].kind == "gate"
    assert drawing.nodes["n_age"].kind == "item"
    assert drawing.nodes["n_frequent"].kind == "let"
    assert drawing.nodes["n_district"].kind == "sample"
    riding = next(g for g in drawing.groups.values() if g.name == "riding")
    docks = next(g for g in drawing.groups.values() if g.name == "docks")
    assert docks.parent == riding.id and docks.kind == "grid" and docks.shuffled
    assert "n_dock_app" in docks.nodes and "n_freq" in riding.nodes
    assert riding.condition == "used = yes"
    edges = {(e.source, e.target): e for e in drawing.edges}
    # The section condition is drawn once, to the section, not to each of its items.
    assert edges["n_used", riding.id].label == "used = yes"
    assert not any(e.source == "n_used" and e.target == "n_freq" for e in drawing.edges)
    assert edges["n_purpose", "n_purpose_other"].label == "purpose has other"
    assert edges["n_trips", "n_praise"].via == "pipe"
    assert edges["n_freq", "n_frequent"].label == "freq = daily or trips >= 150"


def _dot_ids(text: str) -> tuple[set[str], list[tuple[str, str]]]:
    declared = set(re.findall(r'^\s*"([^"]+)" \[label=', text, re.M))
    edges = re.findall(r'^\s*"([^"]+)" -> "([^"]+)"', text, re.M)
    return declared, edges


def test_dot_is_well_formed(bikeshare_path) -> None:
    text = to_dot(build_drawing(load_file(bikeshare_path).questionnaire))
    assert text.startswith("digraph routing {") and text.rstrip().endswith("}")
    assert text.count("{") - text.count("{…}") == text.count("}") - text.count("{…}")
    declared, edges = _dot_ids(text)
    assert edges and all(a in declared and b in declared for a, b in edges)
    assert 'subgraph "cluster_g2_riding"' in text
    assert 'lhead="cluster_g2_riding"' in text
    assert 'label="age < 16"' in text


def test_mermaid_is_well_formed(bikeshare_path) -> None:
    text = to_mermaid(build_drawing(load_file(bikeshare_path).questionnaire))
    assert "flowchart TB" in text
    assert text.count("subgraph ") == len(re.findall(r"^\s*end$", text, re.M))
    nodes = set(re.findall(r"^\s*(\w+)[\[\(\{>]", text, re.M))
    nodes |= set(re.findall(r"^\s*subgraph (\w+)\[", text, re.M))
    for source, target in re.findall(r"^\s*(\w+) -\.?->(?:\|[^|]*\|)? (\w+)$", text, re.M):
        assert source in nodes and target in nodes, (source, target)
    assert '|"used = yes"|' in text
    assert "class n_used,n_ebike gate" in text


def test_labels_with_quotes_and_multiline_conditions() -> None:
    text = (
        'survey t "A \\"quoted\\" title"\n'
        "codes yesno\n  yes = 1 \"Yes\"\n  no = 2 \"No\"\n"
        'a: single yesno "First?"\n'
        'b: single yesno "Second?"\n'
        "c: text \"Third?\"\n  when (a = yes\n    and b = no)\n"
    )
    q = load_text(text, "t.qlc").questionnaire
    assert load_text(text, "t.qlc").syntax == []
    drawing = build_drawing(q)
    edge = next(e for e in drawing.edges if e.target == "n_c")
    assert edge.label == "a = yes and b = no"
    assert '\\"quoted\\"' in to_dot(drawing)
    assert "#quot;quoted#quot;" in to_mermaid(drawing)


def test_span_text_out_of_range_is_empty() -> None:
    from logiccheck.diagnostics import Span

    assert span_text("a\n", Span(file="f", line=9, column=1, end_line=9, end_column=2)) == ""
    assert span_text("abc\n", Span(file="f", line=1, column=2)) == ""


def test_graph_command(bikeshare_path) -> None:
    runner = CliRunner()
    result = runner.invoke(cli, ["graph", str(bikeshare_path), "--format", "mermaid"])
    assert result.exit_code == 0
    assert result.output.startswith("---\n")
    result = runner.invoke(cli, ["graph", str(bikeshare_path)])
    assert result.exit_code == 0 and result.output.startswith("digraph")
    result = runner.invoke(cli, ["graph", "no/such/file.qlc"])
    assert result.exit_code == 2
    assert "no such file" in result.output
