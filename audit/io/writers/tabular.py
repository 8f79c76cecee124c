"""Results as CSV, JSON and XLSX files.

All three carry the same rows and columns; numbers stay numbers, text that a spreadsheet would
evaluate is neutralised (:mod:`audit.io.writers.safety`).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pandas as pd

from audit.io.writers.safety import neutralise_frame


def write_csv(results: pd.DataFrame, path: Path) -> Path:
    """UTF-8 CSV with a header row; empty cells for missing numbers."""
    neutralise_frame(results).to_csv(path, index=False, encoding="utf-8", lineterminator="\n")
    return path


def write_json(results: pd.DataFrame, path: Path, *, meta: dict | None = None) -> Path:
    """``{"meta": {...}, "results": [{column: value}, ...]}``; missing numbers are null."""
    records = [{k: _plain(v) for k, v in row.items()} for row in results.to_dict(orient="records")]
    with open(path, "w", encoding="utf-8") as handle:
        json.dump({"meta": meta or {}, "results": records}, handle, ensure_ascii=False, indent=1)
    return path


def write_xlsx(sheets: dict[str, pd.DataFrame], path: Path) -> Path:
    """One worksheet per entry; frozen header row, filters on, numbers as numbers."""
    with pd.ExcelWriter(path, engine="openpyxl") as writer:
        for name, frame in sheets.items():
            safe = neutralise_frame(frame)
            safe.to_excel(writer, sheet_name=name, index=False)
            sheet = writer.sheets[name]
            sheet.freeze_panes = "A2"
            if len(safe.columns):
                sheet.auto_filter.ref = sheet.dimensions
    return path


def _plain(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if hasattr(value, "item"):  # numpy scalars
        value = value.item()
        if isinstance(value, float) and not math.isfinite(value):
            return None
    return value
