"""Sample against population: one panel per margin variable, a pair of horizontal bars per
category (the kept respondents' share and the population share), so a group that answered
less than its share stands out as a short sample bar beside a long population bar."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from logiccheck.report.extra import require_report_extra

if TYPE_CHECKING:
    from matplotlib.figure import Figure

COLOURS = {"sample": "#3b6ea5", "population": "#b9c4cf"}
BAR_H = 0.36  # inches per bar pair
WIDTH = 7.5  # inches


def margins_chart(rows: list[dict[str, Any]]) -> Figure:
    """The chart from the representativeness rows (variable, category, sample_share, population_share)."""
    require_report_extra("matplotlib")
    from matplotlib.figure import Figure
    from matplotlib.patches import Patch

    variables: dict[str, list[dict[str, Any]]] = {}
    for r in rows:
        variables.setdefault(r["variable"], []).append(r)
    heights = [0.7 + BAR_H * len(cats) for cats in variables.values()]
    total = sum(heights) + 0.8
    fig = Figure(figsize=(WIDTH, total), dpi=100)
    top = 1.0 - 0.45 / total
    left = 1.9 / WIDTH
    for (name, cats), h in zip(variables.items(), heights, strict=True):
        panel = h / total
        ax = fig.add_axes((left, top - panel + 0.5 / total, 1 - left - 0.9 / WIDTH, panel - 0.55 / total))
        top -= panel
        ys = list(range(len(cats)))
        sample = [c["sample_share"] or 0.0 for c in cats]
        population = [c["population_share"] for c in cats]
        ax.barh([y - 0.2 for y in ys], population, height=0.38, color=COLOURS["population"])
        ax.barh([y + 0.2 for y in ys], sample, height=0.38, color=COLOURS["sample"])
        for y, s, p in zip(ys, sample, population, strict=True):
            ax.text(max(s, p) + 0.01, y, f"{100 * (s - p):+.1f} pts", va="center", fontsize=8,
                    color="#c0392b" if abs(s - p) >= 0.05 else "#444444")
        ax.set_yticks(ys, [str(c["category"]) for c in cats], fontsize=8)
        ax.invert_yaxis()
        ax.set_xlim(0, min(1.0, max([*sample, *population]) * 1.25 + 0.08))
        ax.xaxis.set_major_formatter(lambda x, _pos: f"{100 * x:.0f}%")
        ax.tick_params(axis="x", labelsize=8)
        ax.set_title(name, loc="left", fontsize=9, fontweight="bold")
        for side in ("top", "right"):
            ax.spines[side].set_visible(False)
    fig.legend(handles=[Patch(color=COLOURS["sample"], label="sample (kept respondents)"),
                        Patch(color=COLOURS["population"], label="population (margins file)")],
               loc="lower center", ncol=2, fontsize=8, frameon=False)
    return fig
