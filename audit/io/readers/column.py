"""The vectorised machinery of the table builder: a column parsed once per distinct text, and
the problems recorded per row."""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.io.readers.sheet import recode
from audit.problems import Problem, append_texts, records, words


class RowNotes:
    """The problems of a sheet's rows, recorded as data in the order found; the ``reason`` and
    ``warnings`` texts are written from them by :meth:`texts`.

    Each recording keeps its rows and, per row, an index into its few distinct
    ``(column, value, problem)``: a column's problems are worded once per distinct cell text.
    """

    def __init__(self, n: int):
        self.n = n
        self._found: list[tuple] = []  # (severity, rows, index, distinct, after)

    def reject(self, mask, column, problem, value=None, after: str = "") -> None:
        """Record ``problem`` (one, or one per row, ``None`` for none) for the rows in ``mask``;
        ``column`` and ``value`` (the raw cell, None for none) one or one per row likewise."""
        self._add("reject", mask, column, problem, value, after)

    def warn(self, mask, column, problem, value=None, after: str = "") -> None:
        self._add("warning", mask, column, problem, value, after)

    def cells(self, severity: str, mask, column: Column, problems: list, after: str = "") -> None:
        """Record each row's cell problem (``problems``: one per distinct text of ``column``)."""
        has = np.fromiter((p is not None for p in problems), dtype=bool, count=len(problems))
        if not has.any():
            return
        rows = np.flatnonzero(np.asarray(mask, dtype=bool) & has[column.codes])
        if len(rows):
            distinct = list(zip([column.name] * len(problems), column.uniques, problems))
            self._found.append((severity, rows, column.codes[rows], distinct, after))

    def _add(self, severity, mask, column, problem, value, after) -> None:
        mask = np.asarray(mask, dtype=bool)
        if isinstance(problem, np.ndarray):
            mask = mask & np.not_equal(problem, None)
        elif problem is None:
            return
        rows = np.flatnonzero(mask)
        if not len(rows):
            return
        per_row = [x[rows] if isinstance(x, np.ndarray) else [x] * len(rows)
                   for x in (column, value, problem)]
        # Two problems of one text but two codes stay apart: the code is in the key.
        seen: dict = {}
        index = np.fromiter((seen.setdefault((c, v, p, p.code), len(seen))
                             for c, v, p in zip(*per_row)), dtype=np.intp, count=len(rows))
        self._found.append((severity, rows, index, [k[:3] for k in seen], after))

    def blank(self, mask: np.ndarray) -> None:
        """Blank rows: their only problem is that they are blank."""
        kept = []
        for severity, rows, index, distinct, after in self._found:
            stay = ~mask[rows]
            if stay.any():
                kept.append((severity, rows[stay], index[stay], distinct, after))
        self._found = kept
        self.reject(mask, "", Problem("blank-row", "row is blank"))

    def records(self) -> pd.DataFrame:
        """Every problem, one row each: row (position in the sheet), column, code, value,
        expected, severity, text."""
        frames = []
        for severity, rows, index, distinct, after in self._found:
            def field(f):
                return np.array([f(c, v, p) for c, v, p in distinct], dtype=object)[index]
            frames.append(records(
                rows, field(lambda c, v, p: c), field(lambda c, v, p: getattr(p, "code", "")),
                field(lambda c, v, p: v), field(lambda c, v, p: getattr(p, "expected", "")),
                severity, field(lambda c, v, p: words(c, v, p, after) if p is not None else "")))
        return pd.concat(frames, ignore_index=True) if frames else records(
            np.zeros(0, np.int64), "", "", "", "", "reject", "")

    def texts(self, found: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
        """The ``reason`` and ``warnings`` column of each row, from :meth:`records`."""
        out = {s: np.full(self.n, "", dtype=object) for s in ("reject", "warning")}
        for severity, part in found.groupby("severity", sort=False):
            append_texts(out[severity], part["row"].to_numpy(),
                         part["text"].to_numpy(dtype=object))
        return out["reject"], out["warning"]


class Column:
    """One recognised column: its stripped texts factorised, parsed once per distinct text."""

    def __init__(self, name: str, stripped: tuple | None, n: int, unit: str | None,
                 decimal_comma: bool = False):
        self.name, self.unit, self.present = name, unit, stripped is not None
        if stripped is None:
            self.codes = np.zeros(n, dtype=np.intp)
            self.uniques = np.array([""], dtype=object)
        else:
            self.codes, self.uniques = stripped
            if decimal_comma:
                self.codes, self.uniques = recode(self.codes, np.array(
                    [u.replace(",", ".") for u in self.uniques], dtype=object))
        self.given = (self.uniques != "")[self.codes] if n else np.zeros(0, dtype=bool)

    def parse(self, func, *args, empty=None) -> list:
        """The parser's answer for each distinct text (``empty`` for the empty cell)."""
        return [empty if u == "" else func(u, *args) for u in self.uniques]

    def spread(self, answers: list, index: int | None = None, dtype=object) -> np.ndarray:
        values = [a if index is None else a[index] for a in answers]
        array = np.empty(len(values), dtype=dtype)
        array[:] = values if dtype is not object else _objects(values)
        return array[self.codes]


def _objects(values: list) -> np.ndarray:
    array = np.empty(len(values), dtype=object)
    for i, value in enumerate(values):
        array[i] = value
    return array
