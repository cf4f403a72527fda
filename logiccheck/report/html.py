"""The self-contained HTML report (and the notebook fragment) from `ReportData`.

Jinja2 templates shipped in `logiccheck/report/templates/`, autoescaping on for every
template, so respondent text is always escaped; charts are matplotlib SVG inlined. The
page has no scripts and loads nothing from the network.
"""

from __future__ import annotations

import datetime as _dt
from functools import lru_cache
from typing import Any

import pandas as pd

from logiccheck import __version__
from logiccheck.diagnostics import SEVERITY_ORDER
from logiccheck.report.extra import require_report_extra
from logiccheck.report.report_data import ReportData
from logiccheck.report.textsafe import html_text

MAX_IDS = 100  # respondent ids listed per check before "and N more"
MAX_ROWS = 25  # example findings shown per check
MAX_DIAGNOSTICS = 500


@lru_cache(maxsize=1)
def _environment() -> Any:
    require_report_extra("jinja2")
    import jinja2

    return jinja2.Environment(
        loader=jinja2.PackageLoader("logiccheck.report", "templates"),
        autoescape=True,  # every template, whatever its name: respondent text is untrusted
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        finalize=_neutral,
    )


def _neutral(value: Any) -> Any:
    """Every printed text has its bidirectional controls shown, not obeyed."""
    import markupsafe

    if isinstance(value, str) and not isinstance(value, markupsafe.Markup):
        return html_text(value)
    return value


def _num(value: Any) -> int:
    try:
        return 0 if pd.isna(value) else int(value)
    except (TypeError, ValueError):
        return 0


def _item_rows(data: ReportData) -> list[dict[str, Any]]:
    rows = []
    for rec in data.ordered_items().to_dict("records"):
        expected, answered = _num(rec["expected"]), _num(rec["answered"])
        oop, miss = _num(rec["out_of_path"]), _num(rec["missing_on_path"])
        scale = max(expected, answered, miss + answered, 1)
        rows.append({
            "item": rec["item"], "section": rec["section"], "expected": expected, "answered": answered,
            "out_of_path": oop, "missing_on_path": miss, "invalid": _num(rec["invalid"]),
            "bar_on": round(100 * max(answered - oop, 0) / scale, 1),
            "bar_miss": round(100 * miss / scale, 1),
            "bar_oop": round(100 * oop / scale, 1),
            "flag": oop > 0 or miss > 0 or _num(rec["invalid"]) > 0,
        })
    return rows


def _text(value: Any) -> str:
    if value is None:
        return ""
    try:
        if pd.isna(value):
            return ""
    except (TypeError, ValueError):
        pass
    return str(value)


def _finding_groups(data: ReportData) -> list[dict[str, Any]]:
    f = data.findings
    if f is None or f.empty:
        return []
    groups: list[dict[str, Any]] = []
    for (check, severity), part in f.groupby(["check", "severity"], sort=False):
        ids = [i for i in pd.unique(part["respondent"].map(_text)) if i]  # file-level findings have none
        sample = part.head(MAX_ROWS)
        groups.append({
            "check": check, "severity": severity, "count": len(part), "respondents": len(ids),
            "ids": ids[:MAX_IDS], "more_ids": max(len(ids) - MAX_IDS, 0),
            "rows": [{k: _text(v) for k, v in r.items()} for r in
                     sample[["respondent", "item", "value", "message"]].to_dict("records")],
            "more_rows": max(len(part) - MAX_ROWS, 0),
        })
    order = SEVERITY_ORDER
    groups.sort(key=lambda g: (order.get(g["severity"], 9), -g["count"]))
    return groups


def _diagnostic_rows(data: ReportData) -> list[dict[str, Any]]:
    q = data.questionnaire
    rows = []
    for diag in data.diagnostics[:MAX_DIAGNOSTICS]:
        source = q.source_line(diag.line) if diag.file == q.file else ""
        rows.append({
            "check": diag.check, "severity": diag.severity.value, "file": diag.file, "line": diag.line,
            "column": diag.column, "message": diag.message, "item": diag.item or "", "source": source,
            "caret": " " * max(diag.column - 1, 0) + "^",
            "witness": ", ".join(f"{k} = {v}" for k, v in (diag.witness or {}).items()),
        })
    return rows


def _settings_rows(settings: dict[str, Any], prefix: str = "") -> list[tuple[str, str]]:
    rows: list[tuple[str, str]] = []
    for key, value in settings.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            rows.extend(_settings_rows(value, name + "."))
        else:
            rows.append((name, _text(value)))
    return rows


def _svg(figure: Any) -> str:
    from logiccheck.report.graph_picture import inline_svg

    return inline_svg(figure)


def _margins(sections: dict[str, Any], chart: bool) -> tuple[dict[str, Any] | None, str]:
    """The sample-against-population part (with `validate --margins`), and its chart."""
    rows = sections.get("representativeness")
    if not rows:
        return None, ""
    from logiccheck.report.weights_text import percent as _pct

    rates = {(r["variable"], r["category"]): r for r in sections.get("response_rates", [])}
    weights = sections.get("weights") or {}
    shown = []
    for r in rows:
        rate = rates.get((r["variable"], r["category"]))
        shown.append({**r, "sample": _pct(r["sample_share"]), "population": _pct(r["population_share"]),
                      "difference": "–" if r["difference"] is None else f"{100 * r['difference']:+.1f}",
                      "rate": "–" if rate is None else f"{_pct(rate['response_rate'])} of {rate['frame']}"})
    svg = ""
    if chart:
        from logiccheck.report.margins_chart import margins_chart

        svg = _svg(margins_chart(rows))
    return {"rows": shown, "fit": list(sections.get("fit", {}).items()), "rates": bool(rates), "weights": weights,
            "respondents": weights.get("respondents", [])}, svg


def _scale_rows(scales: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """Per scale: the heading figures and one row per item with the item-total bar as a
    share of half the bar (left of the centre for a negative correlation)."""
    from logiccheck.scales.checks import ALPHA_FLOOR, MISFIT_RISE

    out = []
    for s in scales:
        alpha = s.get("alpha")
        rows = []
        for item in s["items"]:
            r = s["item_total"].get(item)
            without = s["alpha_if_deleted"].get(item)
            rows.append({
                "item": item,
                "reversed": item in s.get("reversed", []),
                "without": "–" if without is None else f"{without:.3f}",
                "rises": without is not None and alpha is not None and without - alpha >= MISFIT_RISE,
                "r": "–" if r is None else f"{r:.3f}",
                "negative": r is not None and r < 0,
                "width": 0 if r is None else round(min(abs(r), 1.0) * 50, 1),
            })
        ci = s.get("alpha_ci")
        out.append({
            "scale": s["scale"], "title": s.get("title", ""),
            "alpha": "–" if alpha is None else f"{alpha:.3f}",
            "low": alpha is not None and alpha < ALPHA_FLOOR,
            "ci": f"{ci[0]:.3f} to {ci[1]:.3f}" if ci else "–",
            "n": s["n"], "scored": s["scored"],
            "mean": "–" if s.get("mean") is None else f"{s['mean']:.3f}",
            "sd": "–" if s.get("sd") is None else f"{s['sd']:.3f}",
            "rule": s.get("rule", ""), "rows": rows,
        })
    return out


def report_context(data: ReportData, *, pictures: bool = True, chart: bool = True) -> dict[str, Any]:
    """Everything the templates show, as plain values (no live objects)."""
    q = data.questionnaire
    diag_counts = {"error": 0, "warning": 0, "info": 0}
    for diag in data.diagnostics:
        diag_counts[diag.severity.value] += 1
    chart_svg = ""
    if chart and data.has_data and data.items is not None and not data.items.empty:
        from logiccheck.report.item_chart import item_chart

        chart_svg = _svg(item_chart(data.ordered_items(), data.respondents))
    picture_svgs: list[tuple[str, str]] = []
    if pictures:
        from logiccheck.report.graph_picture import routing_pictures

        picture_svgs = [(p.name, _svg(p.figure)) for p in routing_pictures(q, data.diagnostics, legend_every=False)]
    summary = data.findings_summary()
    margins, margins_svg = _margins(data.sections, chart)
    return {
        "title": q.spec.title or q.spec.name or q.file,
        "spec_file": q.file,
        "export": data.export or "",
        "version": __version__,
        "generated": _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC"),
        "has_data": data.has_data,
        "respondents": data.respondents,
        "item_count": len(q.items()),
        "dispositions": sorted(data.dispositions.items(), key=lambda kv: -kv[1]),
        "disposition_total": sum(data.dispositions.values()) or 1,
        "severity": data.severity_counts(),
        "finding_summary": summary.to_dict("records"),
        "items": _item_rows(data) if data.has_data else [],
        "finding_groups": _finding_groups(data),
        "diagnostics": _diagnostic_rows(data),
        "diagnostics_more": max(len(data.diagnostics) - MAX_DIAGNOSTICS, 0),
        "diag_counts": diag_counts,
        "settings": _settings_rows(data.settings),
        "chart_svg": chart_svg,
        "pictures": picture_svgs,
        "margins": margins,
        "margins_svg": margins_svg,
        "scales": _scale_rows(data.scales),
    }


def render_html(data: ReportData) -> str:
    """The whole report as one HTML page."""
    return _environment().get_template("report.html.j2").render(**report_context(data))


def render_fragment(data: ReportData) -> str:
    """Summary and chart for a notebook cell (no page chrome, no routing picture)."""
    return _environment().get_template("fragment.html.j2").render(**report_context(data, pictures=False))


def render_cleaning(summary: dict[str, Any]) -> str:
    """A cleaning run's summary for a notebook cell: counts, removals, blanked cells, policy."""
    rows = _settings_rows({k: summary.get(k) for k in ("input", "output", "removed", "blanked", "policy")
                           if summary.get(k)})
    return _environment().get_template("cleaning.html.j2").render(rows=rows, spec=summary.get("spec", ""))
