"""Per-item chart: expected versus answered, with out-of-path and missing-on-path visible.

One horizontal bar per item in questionnaire order, a bold header row per section. Each
bar stacks answered-on-path, missing-on-path (hatched) and out-of-path (red, beyond
the expected mark); a black tick marks the expected count, so a broken route stands
out as a long red tail or a long hatched gap.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import pandas as pd

from logiccheck.report.extra import require_report_extra

if TYPE_CHECKING:
    from matplotlib.artist import Artist
    from matplotlib.figure import Figure

ROW_H = 0.22  # inches per bar
COLOURS = {"on_path": "#3b6ea5", "missing": "#f2b134", "out_of_path": "#c0392b", "expected": "#111111"}


def chart_rows(items: pd.DataFrame) -> list[tuple[str, bool, dict[str, float]]]:
    """(label, is section header, values) in drawing order; items must carry `section`."""
    rows: list[tuple[str, bool, dict[str, float]]] = []
    current: str | None = None
    for rec in items.to_dict("records"):
        section = rec.get("section") or ""
        if section != current:
            rows.append((section or "(outside sections)", True, {}))
            current = section
        answered = float(rec.get("answered") or 0)
        oop = float(rec.get("out_of_path") or 0)
        rows.append((str(rec["item"]), False, {
            "on_path": max(answered - oop, 0.0),
            "missing": float(rec.get("missing_on_path") or 0),
            "out_of_path": oop,
            "expected": float(rec.get("expected") or 0),
        }))
    return rows


def item_chart(items: pd.DataFrame, respondents: int | None = None) -> Figure:
    """The chart as a matplotlib Figure (items ordered, with a `section` column)."""
    require_report_extra("matplotlib")
    from matplotlib.figure import Figure
    from matplotlib.patches import Patch

    rows = chart_rows(items)
    height = max(2.0, 1.2 + ROW_H * len(rows))
    fig = Figure(figsize=(8.0, height), dpi=100)
    left = 1.9 / 8.0
    right = 0.9 / 8.0  # room for the off-path counts
    ax = fig.add_axes((left, 0.9 / height, 1 - left - right, 1 - 1.3 / height))
    ys = list(range(len(rows)))
    data = [v for _, header, v in rows if not header]
    bar_y = [y for y, (_, header, _) in zip(ys, rows, strict=False) if not header]
    on = [v["on_path"] for v in data]
    miss = [v["missing"] for v in data]
    oop = [v["out_of_path"] for v in data]
    ax.barh(bar_y, on, height=0.7, color=COLOURS["on_path"], label="answered on path", gid="bars-answered")
    ax.barh(bar_y, miss, left=on, height=0.7, color="white", edgecolor=COLOURS["missing"], hatch="////",
            linewidth=0.8, label="missing on path", gid="bars-missing")
    ax.barh(bar_y, oop, left=[a + b for a, b in zip(on, miss, strict=False)], height=0.7, color=COLOURS["out_of_path"],
            label="out of path", gid="bars-out-of-path")
    ax.scatter([v["expected"] for v in data], bar_y, marker="|", s=120, linewidths=1.6,
               color=COLOURS["expected"], label="expected (routed to the item)", zorder=4)
    # A count beside every bar with off-path answers: a handful among thousands would be
    # too thin to see as a bar segment.
    from matplotlib.transforms import blended_transform_factory

    beside = blended_transform_factory(ax.transAxes, ax.transData)
    for y, v in zip(bar_y, data, strict=True):
        if v["out_of_path"]:
            ax.text(1.01, y, f"◀ {int(v['out_of_path'])} off path", transform=beside, fontsize=6.5,
                    color=COLOURS["out_of_path"], va="center", ha="left", parse_math=False, gid="off-path-count")
    ax.set_yticks(ys, [label for label, _, _ in rows])
    for tick, (_, header, _) in zip(ax.get_yticklabels(), rows, strict=False):
        tick.set_parse_math(False)
        if header:
            tick.set_fontweight("bold")
            tick.set_color("#333333")
    for y, (_, header, _) in zip(ys, rows, strict=False):
        if header and y:
            ax.axhline(y - 0.5, color="#bbbbbb", linewidth=0.6)
    ax.tick_params(axis="y", labelsize=7.5, length=0)
    ax.tick_params(axis="x", labelsize=7.5)
    ax.set_ylim(len(rows) - 0.5, -0.5)
    top = max([v["expected"] for v in data] + [a + b + c for a, b, c in zip(on, miss, oop, strict=False)] + [respondents or 0, 1])
    ax.set_xlim(0, top * 1.02)
    ax.set_xlabel("respondents", fontsize=8)
    ax.grid(axis="x", color="#eeeeee", linewidth=0.6)
    ax.set_axisbelow(True)
    for spine in ("top", "right"):
        ax.spines[spine].set_visible(False)
    handles: list[Artist] = [
        Patch(facecolor=COLOURS["on_path"], label="answered on path"),
        Patch(facecolor="white", edgecolor=COLOURS["missing"], hatch="////", label="missing on path"),
        Patch(facecolor=COLOURS["out_of_path"], label="out of path"),
    ]
    handles.append(ax.collections[-1])
    fig.legend(handles=handles, loc="lower center", ncol=4, fontsize=7.5, frameon=False,
               bbox_to_anchor=(0.5, 0.05 / height))
    return fig
