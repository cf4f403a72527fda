"""The routing picture: content (boxes, bands, arrows), readability and the command."""

from __future__ import annotations

import itertools

import pytest
from click.testing import CliRunner

pytest.importorskip("matplotlib")

from matplotlib.text import Text

from logiccheck.cli.main import cli
from logiccheck.diagnostics import Diagnostic, Severity, Span
from logiccheck.graph.deps import dependency_graph
from logiccheck.loader import load_file, load_text
from logiccheck.report.graph_flow import flow_picture
from logiccheck.report.graph_picture import BOX_STYLE, figure_bytes, routing_pictures
from tests.report.specgen import sixty_item_spec


def _text_boxes(figure):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    canvas = FigureCanvasAgg(figure)
    canvas.draw()  # lays out the legend, so every text has its final place
    renderer = canvas.get_renderer()
    out = []
    for text in figure.findobj(Text):
        if text.get_visible() and text.get_text().strip():
            out.append((text.get_text(), text.get_window_extent(renderer)))
    return out


def test_sixty_item_spec_labels_do_not_overlap() -> None:
    q = load_text(sixty_item_spec(), "sixty.qlc").questionnaire
    assert len(q.items()) == 60
    pictures = routing_pictures(q)
    assert len(pictures) == 1  # 60 items still fit one picture
    boxes = _text_boxes(pictures[0].figure)
    assert len(boxes) > 2 * 60  # a name and a detail line per box, plus bands and legend
    for (a, ea), (b, eb) in itertools.combinations(boxes, 2):
        assert not ea.overlaps(eb), f"labels overlap: {a!r} and {b!r}"


def test_labels_fit_inside_their_boxes() -> None:
    q = load_text(sixty_item_spec(), "sixty.qlc").questionnaire
    picture = routing_pictures(q)[0]
    fig = picture.figure
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    renderer = FigureCanvasAgg(fig).get_renderer()
    ax = fig.axes[0]
    for text in fig.findobj(Text):
        gid = text.get_gid() or ""
        if not gid.startswith("box-"):
            continue
        x, y, w, h = picture.boxes[gid[4:]]
        (x0, y0), (x1, y1) = ax.transData.transform([(x, y + h), (x + w, y)])
        ext = text.get_window_extent(renderer)
        assert x0 <= ext.x0 and ext.x1 <= x1 and y0 <= ext.y0 and ext.y1 <= y1, gid
    # long names are shortened with an ellipsis, never spilled
    assert any(t.get_text().endswith("…") for t in fig.findobj(Text))


def test_bikeshare_picture_content_matches_the_example() -> None:
    # The worked example is the routing semantics (DEVELOPERS.md)'s normative spec: its comments say which
    # condition reads which item.
    q = load_file("specs/bikeshare.qlc").questionnaire
    pic = flow_picture(q)
    titles = [g.title.split(" · ")[0] for g in pic.groups]
    assert titles == ["Sample variables (known before the interview)", "screening", "riding", "lapsed", "overall"]
    ids = {name: pic.by_name(name).id for name in ("purpose", "purpose_other", "used", "trips", "praise", "frequent")}
    edges = {(e.source, e.target, e.via) for e in pic.edges}
    assert (ids["purpose"], ids["purpose_other"], "condition") in edges
    assert (ids["used"], pic.band("riding").id, "context") in edges
    assert (ids["used"], pic.band("lapsed").id, "context") in edges
    assert (ids["trips"], ids["praise"], "pipe") in edges
    assert (ids["frequent"], ids["praise"], "condition") in edges
    assert pic.by_name("used").kind == "gate" and pic.by_name("ebike").kind == "gate"
    assert pic.by_name("age").kind == "item" and pic.by_name("dock_app").kind == "row"
    assert pic.by_name("age").key and not pic.by_name("used").key
    assert any(node.kind == "stop" and node.name == "underage" for node in pic.nodes.values())
    assert [pic.nodes[i].name for i in pic.band("riding").nodes][:3] == ["freq", "trips", "purpose"]
    # Every read in the networkx dependency graph (checks aside) is drawn; reads by a
    # section's condition go to its band.
    graph = dependency_graph(q)
    drawn = {(pic.nodes[e.source].name, e.target) for e in pic.edges}
    for reader, source in graph.edges():
        entry = graph.nodes[reader]["entry"]
        if entry.kind == "check":
            continue
        reader_ids = {n.id for n in pic.nodes.values() if n.line == entry.span.line}
        band = pic.band(entry.section.name).id if entry.section is not None else None
        assert any((source, t) in drawn for t in reader_ids | {band}), (source, reader)


def test_skips_point_where_they_land() -> None:
    q = load_text(sixty_item_spec(), "sixty.qlc").questionnaire
    pic = flow_picture(q)
    skip = next(n for n in pic.nodes.values() if n.kind == "skip")
    target = pic.by_name(skip.name)
    assert (skip.id, target.id, "skip") in {(e.source, e.target, e.via) for e in pic.edges}


def test_gates_and_stops_are_drawn_differently() -> None:
    q = load_file("specs/bikeshare.qlc").questionnaire
    assert BOX_STYLE["gate"] != BOX_STYLE["item"] != BOX_STYLE["stop"]
    svg = figure_bytes(routing_pictures(q)[0].figure, "svg").decode()
    for face, _ in (BOX_STYLE["gate"], BOX_STYLE["stop"], BOX_STYLE["item"]):
        assert face in svg
    assert ">used<" in svg and ">underage<" in svg


def test_unreachable_items_are_marked() -> None:
    q = load_file("specs/bikeshare.qlc").questionnaire
    diag = Diagnostic(check="unreachable-item", severity=Severity.warning,
                      span=q.symbols["range_ok"].span, message="never asked", item="range_ok")
    other = Diagnostic(check="unknown-name", severity=Severity.error,
                       span=Span(file=q.file, line=1, column=1), message="x", item="age")
    pic = flow_picture(q, [diag, other])
    assert pic.by_name("range_ok").unreachable
    assert not pic.by_name("age").unreachable
    assert sum(n.unreachable for n in pic.nodes.values()) == 1
    svg = figure_bytes(routing_pictures(q, [diag])[0].figure, "svg").decode()
    assert "UNREACHABLE" in svg and "unreachable" in svg  # box tag and legend entry


def test_large_specs_fall_back_to_one_picture_per_section() -> None:
    q = load_file("specs/bikeshare.qlc").questionnaire
    pictures = routing_pictures(q, max_nodes=5)
    names = [p.name for p in pictures]
    assert names == ["top-0", "screening", "riding", "lapsed", "overall"]
    riding = pictures[2]
    # the inputs from other sections are drawn in a band of their own
    assert {"n_used", "n_freq"} <= set(riding.boxes) and "n_age" not in riding.boxes


def test_graph_command_svg_png_and_errors(tmp_path) -> None:
    runner = CliRunner()
    result = runner.invoke(cli, ["graph", "specs/bikeshare.qlc", "--format", "svg"])
    assert result.exit_code == 0 and "<svg" in result.output
    out = tmp_path / "routing.png"
    result = runner.invoke(cli, ["graph", "specs/bikeshare.qlc", "--format", "png", "--out", str(out)])
    assert result.exit_code == 0
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    result = runner.invoke(cli, ["graph", "specs/bikeshare.qlc", "--format", "svg", "--max-boxes", "5", "--out",
                                 str(tmp_path / "r.svg")])
    assert result.exit_code == 0 and (tmp_path / "r.riding.svg").exists()
    result = runner.invoke(cli, ["graph", "specs/bikeshare.qlc", "--format", "svg", "--max-boxes", "5"])
    assert result.exit_code == 2 and "--out" in result.output
    result = runner.invoke(cli, ["graph", str(tmp_path / "missing.qlc"), "--format", "svg"])
    assert result.exit_code == 2 and "no such file" in result.output


def test_missing_report_extra_says_how_to_install(monkeypatch) -> None:
    import importlib.util

    real = importlib.util.find_spec
    monkeypatch.setattr(importlib.util, "find_spec", lambda name, *a: None if name == "matplotlib" else real(name, *a))
    result = CliRunner().invoke(cli, ["graph", "specs/bikeshare.qlc", "--format", "png"])
    assert result.exit_code == 2
    assert 'pip install "logiccheck[report]"' in result.output
    assert len(result.output.strip().splitlines()) == 1


def test_unreachable_marks_from_the_routing_checks() -> None:
    from logiccheck.checks.registry import get
    from logiccheck.checks.runner import run_checks

    if get("unreachable-item") is None or get("unreachable-item").run is None:
        pytest.skip("the routing check unreachable-item is not registered in this build")
    text = (
        'survey u "U"\n\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n\n'
        'a: single yesno "A?" gate\n'
        'b: text "B?" when a = yes and a = no\n'
        'c: text "C?" when a = yes\n'
    )
    loaded = load_text(text, "u.qlc")
    pic = flow_picture(loaded.questionnaire, run_checks(loaded))
    assert pic.by_name("b").unreachable
    assert not pic.by_name("a").unreachable and not pic.by_name("c").unreachable


def test_large_generated_spec_is_split_and_stays_readable() -> None:
    from benchmarks.generate import generate

    q = load_text(generate(items=300, skips=True, stops=True), "big.qlc").questionnaire
    pictures = routing_pictures(q)
    assert len(pictures) > 1
    assert len({p.name for p in pictures}) == len(pictures)  # one file name per picture
    biggest = max(pictures, key=lambda p: len(p.boxes))
    boxes = _text_boxes(biggest.figure)
    for (a, ea), (b, eb) in itertools.combinations(boxes, 2):
        assert not ea.overlaps(eb), f"labels overlap: {a!r} and {b!r}"


@pytest.mark.parametrize("spec", sorted(p.name for p in __import__("pathlib").Path("specs").rglob("*.qlc")))
def test_every_demo_spec_draws(spec) -> None:
    # Faulty specs too: a picture of what could be read, never a crash.
    from pathlib import Path

    from logiccheck.checks.runner import run_checks

    path = next(Path("specs").rglob(spec))
    loaded = load_file(path)
    pictures = routing_pictures(loaded.questionnaire, run_checks(loaded, solver=False))
    drawn = set().union(*(p.boxes for p in pictures))
    q = loaded.questionnaire
    items = {f"n_{e.name}" for e in q.items() if q.symbols.get(e.name) is e}
    assert items and items <= drawn  # every item that resolved has its box
    assert figure_bytes(pictures[0].figure, "svg").startswith(b"<?xml")
