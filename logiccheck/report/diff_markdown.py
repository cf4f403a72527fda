"""`diff --format markdown`: a pull-request comment."""

from __future__ import annotations

from logiccheck.diff.model import KINDS, SpecDiff

# A pull-request comment has a size limit; the JSON output always has every change.
MAX_ROWS = 100
MARK = {"break": "🔴 break", "caution": "🟡 caution", "info": "⚪ info"}


def _cell(text: str) -> str:
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def diff_markdown(diff: SpecDiff) -> str:
    counts = diff.counts()
    lines = [
        f"### Spec changes: `{_cell(diff.old_file)}` → `{_cell(diff.new_file)}`",
        "",
        f"{counts['break']} break · {counts['caution']} caution · {counts['info']} info — "
        f"routing compared for {diff.compared} items, {diff.routing_same} proven the same.",
        "",
    ]
    if diff.routing_changed:
        lines += ["> **Who is asked changed.** Check the witnesses below before fielding.", ""]
    if not diff.changes:
        lines.append("No changes to items, answer lists, wording or routing.")
        return "\n".join(lines) + "\n"
    lines += ["| impact | change | item | what | line (new) |", "| --- | --- | --- | --- | --- |"]
    for c in diff.changes[:MAX_ROWS]:
        line = str(c.new.line) if c.new else (f"old {c.old.line}" if c.old else "")
        lines.append(
            f"| {MARK[c.impact]} | `{c.kind}` | {('`' + c.item + '`') if c.item else ''} | {_cell(c.message)} | {line} |"
        )
    if len(diff.changes) > MAX_ROWS:
        lines.append(f"\n… and {len(diff.changes) - MAX_ROWS} more changes (`logiccheck diff --format json` lists all).")
    witnesses = [(c, c.witness) for c in diff.changes[:MAX_ROWS] if c.witness is not None]
    if witnesses:
        lines += ["", "<details><summary>Witness respondents</summary>", ""]
        for c, witness in witnesses:
            answers = ", ".join(f"`{k}` = {_cell(v)}" for k, v in witness.items()) or "any respondent"
            lines.append(f"- `{c.item}` is asked only in the **{c.asked_in}** version of: {answers}")
        lines += ["", "</details>"]
    used = sorted({c.kind for c in diff.changes})
    lines += ["", "<sub>" + " · ".join(f"`{k}`: {KINDS[k][1]}" for k in used) + "</sub>"]
    return "\n".join(lines) + "\n"
