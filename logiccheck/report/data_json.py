"""`validate --format json`: the fields of docs/formats.md.

The findings list is written in slices straight from the finding blocks: each field is
made for a whole slice at once with Arrow string kernels (a million findings cost a few
seconds and a slice of memory, not a million dictionaries), and the text is the same,
byte for byte, as `json.dumps(result.to_json(), indent=2, ensure_ascii=False)`.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Iterator, Sequence
from json.encoder import encode_basestring  # type: ignore[attr-defined]

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from logiccheck.data.findings import FindingBlock
from logiccheck.data.result import ValidationResult
from logiccheck.safety.text import MAX_VALUE_CHARS, clip

# Findings rendered per slice: bounds the memory of the text being written.
SLICE = 200_000
_MARK = "\x00findings\x00"
# What JSON must escape in a string (ensure_ascii=False): quote, backslash, controls.
_ESCAPE = r'["\\\x00-\x1f]'
_PAD = " " * 6  # a finding's fields sit three levels deep


def validation_json(result: ValidationResult) -> str:
    parts: list[bytes] = []
    write_validation_json(result, parts.append)
    return b"".join(parts).decode("utf-8")


def write_validation_json(result: ValidationResult, write: Callable[[bytes], object]) -> None:
    """The JSON document, written in pieces (no trailing newline)."""
    head = json.dumps(result.to_json(findings=_MARK), indent=2, ensure_ascii=False)
    marker = json.dumps(_MARK, ensure_ascii=False)
    before, after = head.split(marker, 1)
    write(before.encode("utf-8"))
    wrote = False
    for text in finding_slices(result.blocks):
        write(("[\n" if not wrote else ",\n").encode("utf-8"))
        write(text)
        wrote = True
    write(b"\n  ]" if wrote else b"[]")
    write(after.encode("utf-8"))


def _escaped(values: pa.Array) -> pa.Array:
    """The inside of each JSON string literal of a string array (nulls stay null)."""
    needs = pc.fill_null(pc.match_substring_regex(values, _ESCAPE), False)
    if pc.any(needs).as_py():
        texts = values.to_pylist()
        flags = needs.to_pylist()
        body = pa.array([encode_basestring(t)[1:-1] if f and t is not None else t for t, f in zip(texts, flags, strict=True)],
                        pa.string())
    else:
        body = values
    return body


def _quoted(values: pa.Array) -> pa.Array:
    """JSON string literals of a string array (null → `null`)."""
    return pc.fill_null(pc.binary_join_element_wise('"', _escaped(values), '"', ""), "null")


def _literal(text: str | None) -> str:
    return json.dumps(text, ensure_ascii=False)


def _texts(values: Sequence[str | None] | np.ndarray, at: np.ndarray) -> pa.Array:
    picked = [values[i] for i in at.tolist()]
    return pa.array([None if v is None else str(v) for v in picked], pa.string())


def _plain(values: Sequence[str | None] | np.ndarray | None) -> bool:
    return values is None or all(v is None or isinstance(v, str) for v in values)


def _render_each(block: FindingBlock, at: np.ndarray) -> pa.Array:
    """One finding at a time (a block holding values that are not text)."""
    records = block.records()
    texts = [json.dumps(records[i].to_json(), indent=2, ensure_ascii=False) for i in at.tolist()]
    return pa.array(["    " + t.replace("\n", "\n    ") for t in texts], pa.string())


def _render(block: FindingBlock, at: np.ndarray) -> pa.Array:
    """The findings at positions `at` of one block, each as its indented JSON object."""
    n = len(at)
    if block.rows.size and not (_plain(block.values) and _plain(block.messages)):
        return _render_each(block, at)
    head = f'    {{\n{_PAD}"check": {_literal(block.check)},\n{_PAD}"severity": {_literal(block.severity.value)},\n'
    if block.rows.size == 0:
        text = (head + f'{_PAD}"respondent": null,\n{_PAD}"item": {_literal(block.item)},\n'
                f'{_PAD}"message": {_literal(block.message)},\n{_PAD}"row": null,\n{_PAD}"value": null\n    }}')
        return pa.array([text] * n, pa.string())
    respondent = _quoted(_texts(block.ids, at)) if block.ids is not None else pa.array(["null"] * n, pa.string())
    value_texts = _texts(block.values, at) if block.values is not None else pa.nulls(n, pa.string())
    value = _quoted(value_texts)
    if block.messages is not None:
        message = _quoted(_texts(block.messages, at))
    elif "{value}" in block.message:
        pieces = [encode_basestring(p)[1:-1] for p in block.message.split("{value}")]
        shown = value_texts
        if n and pc.any(pc.greater(pc.utf8_length(value_texts), MAX_VALUE_CHARS)).as_py():
            # A long value is cut in the message, as the record's own message cuts it.
            shown = pa.array([None if v is None else clip(v) for v in value_texts.to_pylist()], pa.string())
        inner = pc.fill_null(_escaped(shown), "")  # a blank value reads as ""
        spliced = [x for p in pieces[1:] for x in (inner, p)]
        message = pc.binary_join_element_wise('"' + pieces[0], *spliced, '"', "")
    else:
        message = pa.array([_literal(block.message)] * n, pa.string())
    row = pa.array(block.rows[at] + 1).cast(pa.string())
    return pc.binary_join_element_wise(
        head + f'{_PAD}"respondent": ', respondent,
        f',\n{_PAD}"item": {_literal(block.item)},\n{_PAD}"message": ', message,
        f',\n{_PAD}"row": ', row,
        f',\n{_PAD}"value": ', value,
        "\n    }", "",
    )


def finding_order(blocks: list[FindingBlock]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(block, position) of every finding in the order `ValidationResult.findings` lists
    them: file-level findings first, then by row; ties keep block order."""
    sizes = np.array([b.rows.size or 1 for b in blocks], dtype=np.int64)
    block = np.repeat(np.arange(len(blocks), dtype=np.int64), sizes)
    starts = np.cumsum(sizes) - sizes
    position = np.arange(int(sizes.sum()), dtype=np.int64) - np.repeat(starts, sizes)
    rows = np.concatenate([b.rows.astype(np.int64) if b.rows.size else np.array([-1]) for b in blocks]) if blocks \
        else np.zeros(0, np.int64)
    order = np.argsort(rows, kind="stable")
    return order, block, position


def finding_slices(blocks: list[FindingBlock], size: int = SLICE) -> Iterator[bytes]:
    """The findings list's items, joined by ",\\n", in slices of up to `size` findings."""
    order, block, position = finding_order(blocks)
    for start in range(0, len(order), size):
        take = order[start : start + size]
        b, p = block[take], position[take]
        grouped = np.argsort(b, kind="stable")
        gb = b[grouped]
        cuts = np.flatnonzero(np.diff(gb)) + 1
        pieces = [_render(blocks[int(gb[s])], p[grouped[s:e]])
                  for s, e in zip([0, *cuts.tolist()], [*cuts.tolist(), len(gb)], strict=True)]
        rendered = pa.concat_arrays(pieces) if len(pieces) > 1 else pieces[0]
        back = np.empty_like(grouped)
        back[grouped] = np.arange(len(grouped))
        texts = rendered.take(pa.array(back))
        yield ",\n".join(texts.to_pylist()).encode("utf-8")
