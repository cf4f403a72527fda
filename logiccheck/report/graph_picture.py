"""The routing picture: sections as bands in order, statements as boxes, inputs as arrows.

Drawn with matplotlib (the `[report]` extra) on a fixed grid, so boxes never overlap and
every label is measured and shortened to fit its box. Specs with more boxes than
`MAX_NODES` are drawn one section per picture.
"""

from __future__ import annotations

import io
from collections.abc import Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, ClassVar, Literal

from logiccheck.diagnostics import Diagnostic
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.report.extra import require_report_extra
from logiccheck.report.graph_flow import FlowGroup, FlowPicture, flow_picture

if TYPE_CHECKING:
    from matplotlib.figure import Figure

MAX_NODES = 120  # above this a single picture gets too tall to read; common practice, no source
COLUMNS = 4
BOX_W, BOX_H = 2.4, 0.62  # inches
GAP_X, GAP_Y = 0.3, 0.38
MARGIN, PAD, HEADER = 0.3, 0.2, 0.42
TITLE_H, LEGEND_H = 0.55, 0.85
DPI = 100
PNG_DPI = 150  # sharper text in raster pictures
TEXT_PAD = 0.1  # inches kept free inside a box on each side

# Our own palette: (face, edge) per box kind.
BOX_STYLE: dict[str, tuple[str, str]] = {
    "item": ("#f4f7fb", "#4a6785"),
    "gate": ("#fff1cc", "#b07d00"),
    "row": ("#eef6f0", "#4f7d5c"),
    "let": ("#f3eefa", "#6c55a0"),
    "sample": ("#e9eef2", "#55616b"),
    "stop": ("#fde4e1", "#b3261e"),
    "skip": ("#ffffff", "#333333"),
}
KIND_LABEL = {
    "item": "item", "gate": "gate", "row": "grid row", "let": "derived value",
    "sample": "sample variable", "stop": "stop", "skip": "skip",
}
EDGE_STYLE: dict[str, tuple[str, Literal["-", "--"]]] = {  # via -> (colour, line style)
    "condition": ("#1f4e8c", "-"),
    "context": ("#7a3e9d", "-"),
    "let": ("#2e7d32", "-"),
    "pipe": ("#d17a00", "--"),
    "skip": ("#222222", "--"),
}
EDGE_LABEL = {
    "condition": "condition reads", "context": "section condition reads", "let": "derived from",
    "pipe": "piped into text", "skip": "skip lands on",
}
UNREACHABLE = ("#dddddd", "#999999")


@dataclass
class Picture:
    """One drawn picture: its name (a section for split pictures) and the figure."""

    name: str
    figure: Figure
    boxes: dict[str, tuple[float, float, float, float]]  # node id -> x, y, w, h (inches, y down)


class _Fitter:
    """Shortens text with an ellipsis until it fits a width.

    Widths are the sum of each character's measured advance (cached per font), plus a
    margin: measuring whole strings costs a font layout per attempt and dominated the
    drawing time, and summing advances over-estimates slightly (no kerning), so fitted
    text never spills.
    """

    _cache: ClassVar[dict[tuple[str, float, str], float]] = {}
    MARGIN = 1.03

    def __init__(self, figure: Figure) -> None:
        from matplotlib.backends.backend_agg import FigureCanvasAgg

        self.renderer = FigureCanvasAgg(figure).get_renderer()
        self.dpi = figure.dpi

    def _char(self, char: str, size: float, weight: str) -> float:
        key = (char, size, weight)
        if key not in self._cache:
            from matplotlib.font_manager import FontProperties

            prop = FontProperties(size=size, weight=weight)
            w, _, _ = self.renderer.get_text_width_height_descent(char, prop, ismath=False)
            self._cache[key] = w / self.dpi
        return self._cache[key]

    def width(self, text: str, size: float, weight: str) -> float:
        return self.MARGIN * sum(self._char(c, size, weight) for c in text)

    def fit(self, text: str, width: float, size: float, weight: str = "normal") -> str:
        if self.width(text, size, weight) <= width:
            return text
        lo, hi = 0, len(text)
        while lo < hi:
            mid = (lo + hi + 1) // 2
            if self.width(text[:mid] + "…", size, weight) <= width:
                lo = mid
            else:
                hi = mid - 1
        return text[:lo] + "…"


def _layout(picture: FlowPicture) -> tuple[dict[str, tuple[float, float]], list[tuple[str, float, float]], float]:
    """Top-left corner per box, (group id, top, height) per band, and the total height."""
    boxes: dict[str, tuple[float, float]] = {}
    bands = []
    y = MARGIN + TITLE_H
    for group in picture.groups:
        rows = max(1, -(-len(group.nodes) // COLUMNS))
        height = HEADER + PAD + rows * (BOX_H + GAP_Y) - GAP_Y + PAD
        for i, nid in enumerate(group.nodes):
            row, col = divmod(i, COLUMNS)
            boxes[nid] = (MARGIN + PAD + col * (BOX_W + GAP_X), y + HEADER + PAD + row * (BOX_H + GAP_Y))
        bands.append((group.id, y, height))
        y += height + GAP_Y
    return boxes, bands, y - GAP_Y + LEGEND_H + MARGIN


def draw_picture(picture: FlowPicture, name: str = "", *, legend: bool = True) -> Picture:
    """Draw one picture; raises ReportExtraMissing without matplotlib."""
    require_report_extra("matplotlib")
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D
    from matplotlib.patches import Circle, FancyArrowPatch, FancyBboxPatch, Patch, Rectangle

    corners, bands, total_h = _layout(picture)
    width = 2 * MARGIN + 2 * PAD + COLUMNS * BOX_W + (COLUMNS - 1) * GAP_X
    fig = Figure(figsize=(width, total_h), dpi=DPI)
    ax = fig.add_axes((0, 0, 1, 1))
    ax.set_xlim(0, width)
    ax.set_ylim(total_h, 0)
    ax.set_axis_off()
    fit = _Fitter(fig)
    band_w = width - 2 * MARGIN
    text_kw: dict[str, Any] = {"parse_math": False, "zorder": 5}

    ax.text(MARGIN, MARGIN + 0.2, fit.fit(picture.title, band_w, 12, "bold"),
            fontsize=12, weight="bold", va="center", ha="left", gid="picture-title", **text_kw)
    groups = {g.id: g for g in picture.groups}
    anchors: dict[str, Any] = {}
    for gid, top, height in bands:
        group = groups[gid]
        ax.add_artist(Rectangle((MARGIN, top), band_w, height, facecolor="#fafafa" if gid != "_inputs" else "#ffffff",
                               edgecolor="#c8c8c8", linewidth=0.8, zorder=0,
                               linestyle="-" if gid != "_inputs" else "--"))
        suffix = "  (shown only when its condition holds)" if group.condition else ""
        ax.text(MARGIN + 0.12, top + HEADER / 2 + 0.02, fit.fit(group.title + suffix, band_w - 0.8, 10, "bold"),
                fontsize=10, weight="bold", va="center", ha="left", color="#333333", **text_kw)
        if group.condition:
            marker = Circle((MARGIN + band_w - 0.3, top + HEADER / 2), 0.07, facecolor="#7a3e9d",
                            edgecolor="none", zorder=4)
            ax.add_artist(marker)
            anchors[gid] = marker

    boxes: dict[str, tuple[float, float, float, float]] = {}
    for nid, (x, y) in corners.items():
        node = picture.nodes[nid]
        face, outline = UNREACHABLE if node.unreachable else BOX_STYLE.get(node.kind, BOX_STYLE["item"])
        thick = 2.0 if node.kind in ("gate", "stop") else 1.0
        style = "round,pad=0,rounding_size=0.12" if node.kind != "stop" else "square,pad=0"
        patch = FancyBboxPatch((x, y), BOX_W, BOX_H, boxstyle=style, facecolor=face, edgecolor=outline,
                               linewidth=thick, linestyle="--" if node.kind == "skip" else "-",
                               hatch="///" if node.unreachable else None, zorder=3)
        ax.add_artist(patch)
        anchors[nid] = patch
        boxes[nid] = (x, y, BOX_W, BOX_H)
        label_w = BOX_W - 2 * TEXT_PAD
        title = node.name + (" ★" if node.key else "")
        detail = ("UNREACHABLE · " if node.unreachable else "") + node.detail
        ax.text(x + BOX_W / 2, y + 0.22, fit.fit(title, label_w, 9, "bold"), fontsize=9, weight="bold",
                ha="center", va="center", gid=f"box-{nid}", **text_kw)
        ax.text(x + BOX_W / 2, y + 0.45, fit.fit(detail, label_w, 7, "normal"), fontsize=7,
                ha="center", va="center", color="#444444", **text_kw)

    for edge in picture.edges:
        source, target = anchors.get(edge.source), anchors.get(edge.target)
        if source is None or target is None or source is target:
            continue
        colour, line = EDGE_STYLE.get(edge.via, ("#555555", "-"))
        start, end = _edge_point(source, _centre(target)), _edge_point(target, _centre(source))
        rad = 0.35 if abs(start[1] - end[1]) < 0.01 else 0.12
        # Endpoints are computed on the box outlines: letting matplotlib clip the arrow to
        # the patches costs a bezier search per arrow and dominated the drawing time.
        ax.add_artist(FancyArrowPatch(start, end, shrinkA=0, shrinkB=2, connectionstyle=f"arc3,rad={rad}",
                                     arrowstyle="-|>", mutation_scale=9, color=colour, linestyle=line,
                                     linewidth=1.0, alpha=0.75, zorder=2))

    handles: list[Any] = []
    # Only kinds and arrows this module styles get a legend entry (others draw as items).
    kinds = [k for k in BOX_STYLE if any(node.kind == k for node in picture.nodes.values())]
    for kind in kinds:
        face, edge_c = BOX_STYLE[kind]
        handles.append(Patch(facecolor=face, edgecolor=edge_c, label=KIND_LABEL[kind]))
    if any(node.unreachable for node in picture.nodes.values()):
        handles.append(Patch(facecolor=UNREACHABLE[0], edgecolor=UNREACHABLE[1], hatch="///", label="unreachable"))
    for via in [v for v in EDGE_STYLE if any(e.via == v for e in picture.edges)]:
        colour, line = EDGE_STYLE[via]
        handles.append(Line2D([], [], color=colour, linestyle=line, label=EDGE_LABEL[via]))
    if handles and legend:
        ax.legend(handles=handles, loc="lower left", bbox_to_anchor=(MARGIN, total_h - MARGIN),
                  bbox_transform=ax.transData, ncol=5, fontsize=7.5, frameon=False, borderaxespad=0)
    return Picture(name, fig, boxes)


def _centre(patch: Any) -> tuple[float, float]:
    if hasattr(patch, "center"):
        return tuple(patch.center)
    return patch.get_x() + patch.get_width() / 2, patch.get_y() + patch.get_height() / 2


def _edge_point(patch: Any, towards: tuple[float, float]) -> tuple[float, float]:
    """Where the line from the patch's centre towards a point leaves its outline."""
    cx, cy = _centre(patch)
    dx, dy = towards[0] - cx, towards[1] - cy
    if hasattr(patch, "center"):  # a section's marker dot
        return cx, cy
    half_w, half_h = patch.get_width() / 2, patch.get_height() / 2
    if dx == 0 and dy == 0:
        return cx, cy
    scale = min(half_w / abs(dx) if dx else float("inf"), half_h / abs(dy) if dy else float("inf"))
    return cx + dx * scale, cy + dy * scale


def routing_pictures(
    q: Questionnaire,
    diagnostics: Iterable[Diagnostic] = (),
    *,
    max_nodes: int = MAX_NODES,
    legend_every: bool = True,
) -> list[Picture]:
    """One picture, or one per band when the spec has more than `max_nodes` boxes.

    `legend_every=False` keeps the legend on the first picture only (pictures shown
    together on one page need it once, and legends are the costliest part to lay out).
    """
    whole = flow_picture(q, diagnostics)
    if len(whole.nodes) <= max_nodes:
        return [draw_picture(whole)]
    return [
        draw_picture(whole.subset(g.id), _picture_name(g, i), legend=legend_every or i == 0)
        for i, g in enumerate(whole.groups)
    ]


def _picture_name(group: FlowGroup, position: int) -> str:
    """A section's name, or `top-N` for a run of statements outside sections."""
    return group.title.split(" · ")[0] if group.line is not None else f"top-{position}"


def figure_bytes(figure: Figure, fmt: str) -> bytes:
    """SVG (text kept as text, no timestamp, stable ids) or PNG."""
    import matplotlib

    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "logiccheck"}):
        metadata = {"Date": None} if fmt == "svg" else None
        figure.savefig(buf, format=fmt, metadata=metadata, dpi=PNG_DPI if fmt == "png" else DPI)
    return buf.getvalue()


def inline_svg(figure: Figure) -> str:
    """The figure as an `<svg>` element for embedding in HTML (no XML prolog or doctype)."""
    text = figure_bytes(figure, "svg").decode("utf-8")
    start = text.find("<svg")
    return text[start:] if start >= 0 else text
