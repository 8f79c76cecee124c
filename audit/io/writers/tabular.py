"""Results as CSV, JSON and XLSX files (XLSX by :mod:`audit.io.writers.xlsx`).

All three carry the same rows and columns; numbers stay numbers, text that a spreadsheet would
evaluate is neutralised (:mod:`audit.io.writers.safety`).
"""

from __future__ import annotations

import math
from pathlib import Path

import pandas as pd

from audit.io.writers.csv_fast import write_frame_csv
from audit.io.writers.json_fast import write_records_json
from audit.io.writers.safety import neutralise_text


def write_csv(results: pd.DataFrame, path: Path) -> Path:
    """UTF-8 CSV with a header row; empty cells for missing numbers.

    Lines end in CRLF (RFC 4180), which also makes the writer quote any cell holding a
    carriage return, so a register's multi-line cell reads back as one cell.  The bytes are
    those ``DataFrame.to_csv`` writes for the neutralised table
    (:func:`~audit.io.writers.safety.neutralise_frame`), neutralised as they are written;
    :func:`~audit.io.writers.csv_fast.write_frame_csv` writes them several times faster,
    which a 100,000-item register needs.
    """
    return write_frame_csv(results, path, text=neutralise_text)


def write_json(results: pd.DataFrame, path: Path, *, meta: dict | None = None,
               tables: dict | None = None) -> Path:
    """``{"meta": {...}, "results": [{column: value}, ...]}``; missing numbers are null;
    ``tables`` (name -> a short table, e.g. the survey's readings) follow as further keys,
    ``"survey": [{column: value}, ...]``.

    The text is what ``json.dump(..., ensure_ascii=False, indent=1)`` writes for the records of
    ``results.to_dict(orient="records")``, each value made plain (numpy scalars as Python
    values, NaN and infinities as null); :func:`~audit.io.writers.json_fast.write_records_json`
    builds it from the columns, which a 100,000-item register needs.
    """
    after = {name: [{str(k): _plain(v) for k, v in record.items()}
                    for record in table.to_dict(orient="records")]
             for name, table in (tables or {}).items()}
    return write_records_json(results, path, meta or {}, _plain, after)


def _plain(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if hasattr(value, "item"):  # numpy scalars
        value = value.item()
        if isinstance(value, float) and not math.isfinite(value):
            return None
    return value
