"""A results table as the JSON text ``json.dump(..., ensure_ascii=False, indent=1)`` writes for
``{"meta": meta, "results": [record, ...]}``, built from whole columns.

Building a dictionary per row and letting :mod:`json` walk it costs about 20 s for a
100,000-item register.  Here each record is the same template: the key texts are made once per
column, float64 columns are laid out as bytes by numpy (JSON writes a float as Python's
``repr``, :func:`~audit.io.writers.csv_fast.float_into`), other columns are encoded once per
distinct value, and only rows are joined in Python.  Values are those of
``frame.to_dict(orient="records")`` made plain by ``plain``: missing and infinite numbers null.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd

from audit.io.writers.csv_fast import WIDTH, column_segments, float_into

#: Rows encoded and written at once: bounds the memory held by the texts.
CHUNK_ROWS = 20_000
_FIELD = "   "  # a record's fields sit at depth 3 of indent=1: top object, results list, record
_ROW_END = 0x02  # never raw in JSON text (control characters are escaped)


def write_records_json(frame: pd.DataFrame, path: Path, meta: dict, plain,
                       after: dict | None = None) -> Path:
    """``frame``'s records under ``"results"``, ``meta`` under ``"meta"`` (see the module);
    ``after``: further keys (a short table's plain records), written after the results."""
    after = after or {}
    head = json.dumps({"meta": meta, "results": []}, ensure_ascii=False, indent=1)
    # '"name": [...]' of each further key, indented as a key of the outer object
    tail = "".join(",\n" + json.dumps({k: v}, ensure_ascii=False, indent=1)[2:-2]
                   for k, v in after.items())
    with open(path, "w", encoding="utf-8") as handle:
        if not len(frame):
            handle.write(head[:-2] + tail + "\n}")
            return path
        handle.write(head[:-len("[]\n}")] + "[\n")  # up to '"results": '
        if not frame.shape[1]:
            handle.write(",\n".join(["  {}"] * len(frame)))
        keys = [json.dumps(str(c), ensure_ascii=False) + ": " for c in frame.columns]
        segments = _segments(frame, keys, plain) if frame.shape[1] else []
        for start in range(0, len(frame) if segments else 0, CHUNK_ROWS):
            stop = min(start + CHUNK_ROWS, len(frame))
            parts = [segment(start, stop) for segment in segments]
            fields = parts[0] if len(parts) == 1 else map(",\n".join, zip(*parts))
            handle.write(",\n".join([f"  {{\n{f}\n  }}" for f in fields]))
            handle.write(",\n" if stop < len(frame) else "")
        handle.write("\n ]" + tail + "\n}")
    return path


def _segments(frame: pd.DataFrame, keys: list[str], plain) -> list:
    """Functions ``(start, stop) -> list of texts`` (a record's fields of one column, or of a
    run of float64 columns), in column order."""
    def floats(j, series):
        is_float = isinstance(series.dtype, np.dtype) and series.dtype == np.float64
        return (keys[j], series.to_numpy()) if is_float else None
    return column_segments(frame, floats, _float_block,
                           lambda j, series: _column_fields(series, keys[j], plain))


def _float_block(run: list[tuple[str, np.ndarray]]):
    """Fields of adjacent float64 columns: each in a NUL-padded slot of bytes (key, value or
    ``null``, separator), the NULs deleted at the end."""
    prefixes = [(_FIELD + key).encode() for key, _ in run]
    width = max(map(len, prefixes)) + WIDTH + 2
    null = np.frombuffer(b"null", np.uint8)

    def texts(start, stop):
        matrix = np.zeros((stop - start, len(run), width), np.uint8)
        for c, (prefix, (_, values)) in enumerate(zip(prefixes, run)):
            values = values[start:stop]
            finite = np.isfinite(values)
            slots = matrix[:, c]
            slots[:, :len(prefix)] = np.frombuffer(prefix, np.uint8)
            float_into(np.where(finite, values, np.nan), slots[:, len(prefix):len(prefix) + WIDTH])
            slots[~finite, len(prefix):len(prefix) + 4] = null
            slots[:, -2:] = np.frombuffer(b",\n", np.uint8)
        matrix[:, -1, -2:] = [0, _ROW_END]
        return matrix.tobytes().translate(None, b"\0").decode("utf-8").split(chr(_ROW_END))[:-1]
    return texts


def _column_fields(series: pd.Series, key: str, plain):
    """Fields of one column, each distinct value encoded once (per-cell for values that cannot
    be told apart by hashing, such as lists)."""
    prefix = _FIELD + key
    dtype = series.dtype
    if isinstance(dtype, np.dtype) and dtype.kind in "iub":
        codes, uniques = pd.factorize(series.to_numpy())
        fields = np.array([prefix + json.dumps(v) for v in uniques.tolist()], dtype=object)
        return lambda start, stop: fields[codes[start:stop]].tolist()
    values = series.to_list()  # the Python values to_dict(orient="records") holds
    known: dict = {}

    def field(value):
        try:
            key_ = (type(value), value)
            text = known.get(key_)
        except TypeError:  # unhashable: encoded on its own
            return prefix + _encode(plain(value))
        if text is None:
            text = known[key_] = prefix + _encode(plain(value))
        return text

    return lambda start, stop: [field(v) for v in values[start:stop]]


def _encode(value) -> str:
    """``value`` as :mod:`json` writes it at a record's field (nested lines indented)."""
    return json.dumps(value, ensure_ascii=False, indent=1).replace("\n", "\n" + _FIELD)
