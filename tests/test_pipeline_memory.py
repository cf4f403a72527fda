"""The pipeline keeps compact cells and types columns on demand: what it hands the checks
must equal what the typed frame of every cell gave (the data stage's own `validate`
with `keep_frame`), and compacting must read back every cell unchanged (pyarrow's own
`to_pylist` of the table as read is the oracle)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from logiccheck.data.readers import open_export
from logiccheck.data.simulate import simulate
from logiccheck.data.validate import Validator
from logiccheck.loader import load_file
from logiccheck.pipeline import run_pipeline
from logiccheck.pipeline.run import _typed_values, compact

ROOT = Path(__file__).resolve().parents[1]
SPECS = ["bikeshare.qlc", "clinic_visit.qlc", "onboarding.qlc"]


def test_compact_reads_back_the_same_cells() -> None:
    table = pa.table({
        "codes": pa.array(["1", "2", None, "98a", "1"]).dictionary_encode(),
        "many": pa.array([str(i) for i in range(300)] + [None] * 5)[:5].dictionary_encode(),
        "ints": pa.array([1, None, 300, -5, 0], pa.int64()),
        "big": pa.array([1, 2, 3, 4, 2**40], pa.int64()),
        "nulls": pa.array([None] * 5, pa.int64()),
        "text": pa.array(["a", "b", None, "c", "d"]),
    })
    small = compact(table)
    assert small.column("codes").type.index_type == pa.int8()
    assert small.column("ints").type == pa.int16()
    assert small.column("big").type == pa.int64()
    for name in table.column_names:
        assert small.column(name).to_pylist() == table.column(name).to_pylist(), name
    assert small.nbytes < table.nbytes


@pytest.mark.parametrize("spec", SPECS)
@pytest.mark.parametrize("fmt", ["csv", "parquet"])
def test_values_equal_the_typed_frame(tmp_path: Path, spec: str, fmt: str) -> None:
    q = load_file(ROOT / "specs" / spec).questionnaire
    sim = simulate(q, 400, seed=11, faults=0.05).table
    path = tmp_path / f"export.{fmt}"
    if fmt == "csv":
        sim.to_pandas().to_csv(path, index=False)
    else:
        pq.write_table(sim, path)
    result = run_pipeline(q, path)
    assert result.frame is None  # the pipeline keeps no typed frame of every cell
    # The typed frame as the data stage builds it when asked to keep it, chunk by chunk.
    export = open_export(path, chunk_rows=97)
    full = Validator(q, result.mapping, export.columns, keep_cells=True, keep_frame=True).run(export.chunks, None, None)
    assert full.frame is not None
    assert result.nonresponse is not None and np.array_equal(result.nonresponse, full.nonresponse)
    validator = Validator(q, result.mapping, export.columns, keep_cells=True, keep_frame=False)
    validator.memo = {}
    value_of = _typed_values(result.export, validator, result.respondents)
    compared = 0
    for column in full.frame.columns:
        if column == "id" or str(full.frame[column].dtype) == "string":
            continue
        expected = full.frame[column].to_numpy(dtype=np.float64, na_value=np.nan)
        assert np.array_equal(value_of(column), expected, equal_nan=True), column
        compared += 1
    assert compared >= 5
    assert np.isnan(value_of("no_such_name")).all()
