"""Row problems as data: which row, which column, what code, what value, what was expected.

The register reader and the name resolver record every problem of a row here, with its
severity (``reject`` or ``warning``).  The words come last and from these records only: the
``reason`` and ``warnings`` columns of the item table (``column: "value" said; expected ...``),
``lagaudit validate``'s summary (grouped by code) and ``calc``'s messages.

The table of an item table is ``problems_of(table)``; it travels in ``table.attrs`` as an
immutable :class:`Problems`, which pandas's deep copy of ``attrs`` passes on without copying.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

#: Every problem code, with what it means.  A code is a kind of problem, the same in every
#: column it can occur in; the column says where.
CODES = {
    "empty": "a cell the row needs is empty",
    "not-a-number": "not a number with a unit of the column's kind",
    "out-of-range": "a number outside the range the column allows",
    "not-a-temperature": "not a temperature, AMB or normal/max",
    "below-absolute-zero": "a temperature below -273.15 degC",
    "max-below-normal": "normal/max with the maximum below the normal temperature",
    "normal-max": "normal/max given; the normal temperature is used",
    "not-a-pipe-size": "not a nominal pipe size (NPS) or DN of ASME B36.10M",
    "not-a-thickness": "not a thickness or a list of thicknesses",
    "not-a-length": "a thickness with a unit that is not a length (50 degC)",
    "not-layers": "not a list of insulation layers",
    "too-many-layers": "more insulation layers than an item may have",
    "not-recognised": "a word that is not one of the column's allowed words",
    "not-yes-no": "not yes or no",
    "not-a-date": "not a date (year-month-day)",
    "date-in-future": "a date later than the day of the audit",
    "unknown-tag": "a survey reading whose tag is not in the register",
    "reading-impossible": "a surface reading the registered item cannot show",
    "no-conditions": "a survey reading without its ambient, wind or humidity",
    "not-a-count": "not a whole number, 0 or more",
    "cell-too-long": "a cell longer than a spreadsheet cell holds",
    "unit-assumed": "a bare number in a column that elsewhere gives units",
    "ignored": "a cell given but not used for this row",
    "od-differs": "od differs from the nominal size's outside diameter",
    "od-below-smallest-pipe": "od below the smallest steel pipe",
    "contradicts-shape": "orientation contradicting the shape",
    "orientation-assumed": "no orientation for a flat item; vertical assumed",
    "share-unknown": "a damaged item without its damaged share",
    "duplicate-row": "a row equal to an earlier row in every recognised cell",
    "duplicate-tag": "a tag on several differing rows",
    "blank-row": "a row with no cells",
    "design-temperature": "a design temperature read as the operating temperature",
    "design-temperature-refused": "only a design temperature, which the rules refuse",
    "not-in-rules": "a name (material, jacket, site, metal, fluid) the rules do not define",
    "rules-missing": "the rules lack what the row needs (wet_factor, a fitting, a default)",
    "rules-default": "an empty cell filled from the rules' [defaults]",
    "own-air-surroundings": "the row's own ambient used for radiation too",
    "fittings-not-counted": "fittings given on an item that is not a pipe",
    "beyond-fitting-table": "a pipe size beyond the rules' fitting table",
    "above-boiling-point": "a boiling liquid of the rules hotter than its boiling point",
    "not-tracing": "not a heat-tracing description (none, electric RATING, steam SIZE)",
    "no-heat-capacity": "a flow given for a line whose fluid has no cp in the rules",
    "maintain-above-temp": "maintain above the operating temperature on an untraced line",
    "no-maintain": "tracing given without the maintain temperature it must hold",
    "no-wall": "a stagnant water line whose pipe wall is not known (no wall, schedule or NPS)",
}

SEVERITIES = ("reject", "warning")
FIELDS = ("row", "column", "code", "value", "expected", "severity", "text")


class Problem(str):
    """What is wrong with one cell: its code, what is said and what was expected.

    A ``str`` (``'is not a temperature; expected a number ...'``) so that a parser's answer
    reads as the end of a reason; ``code``, ``said`` and ``expected`` are its parts.
    """

    def __new__(cls, code: str, said: str, expected: str = ""):
        if code not in CODES:
            raise ValueError(f"unknown problem code {code!r}; add it to audit.problems.CODES")
        self = super().__new__(cls, f"{said}; expected {expected}" if expected else said)
        self.code, self.said, self.expected = code, said, expected
        return self

    def __reduce__(self):
        return Problem, (self.code, self.said, self.expected)


def words(column: str, value: str | None, problem: Problem, after: str = "") -> str:
    """A problem as the ``reason``/``warnings`` columns say it: ``temp: "TBA" is not ...``."""
    if not column:
        return str(problem) + after
    shown = "" if value is None else f'"{quoted(value)}" '
    return f"{column}: {shown}{problem}{after}"


QUOTE_CHARS = 60  # characters of a raw cell quoted in a reason


def quoted(text: str) -> str:
    """A raw cell as a reason quotes it: cut to QUOTE_CHARS characters, with an ellipsis."""
    return text if len(text) <= QUOTE_CHARS else text[:QUOTE_CHARS] + "…"


class Problems:
    """The problems of one item table: a frame with :data:`FIELDS`; ``row`` is the table's
    index label.  Immutable: adding gives a new object."""

    def __init__(self, frame: pd.DataFrame | None = None):
        self.frame = frame if frame is not None else pd.DataFrame(
            {f: pd.Series(dtype=np.int64 if f == "row" else object) for f in FIELDS})

    def __deepcopy__(self, memo):  # pandas deep-copies attrs on every operation
        return self

    def __len__(self) -> int:
        return len(self.frame)

    def plus(self, other: pd.DataFrame) -> Problems:
        if not len(other):
            return self
        if not len(self.frame):
            return Problems(other.reset_index(drop=True))
        return Problems(pd.concat([self.frame, other], ignore_index=True))

    def of_rows(self, rows) -> pd.DataFrame:
        """The records of the rows with these index labels, in the order recorded."""
        return self.frame[self.frame["row"].isin(np.asarray(rows))]


def problems_of(table: pd.DataFrame) -> Problems:
    """The problems recorded for an item table (none for a table not read by the reader)."""
    return table.attrs.get("problems") or Problems()


def records(rows: np.ndarray, column, code, value, expected, severity: str,
            text) -> pd.DataFrame:
    """A frame of problem records, scalars broadcast over ``rows``."""
    n = len(rows)
    spread = lambda x: x if isinstance(x, np.ndarray) else np.full(n, x, dtype=object)  # noqa: E731
    return pd.DataFrame({"row": rows.astype(np.int64), "column": spread(column),
                         "code": spread(code), "value": spread(value),
                         "expected": spread(expected), "severity": severity,
                         "text": spread(text)})


def append_texts(target: np.ndarray, rows: np.ndarray, texts: np.ndarray) -> None:
    """Add ``texts`` to ``target[rows]``, ``; ``-joined after what is there; a row that comes
    several times gets its texts in the order given."""
    if not len(rows):
        return
    rank = pd.Series(rows).groupby(rows).cumcount().to_numpy()
    for k in range(rank.max() + 1):
        take = rank == k
        current = target[rows[take]]
        target[rows[take]] = np.where(current == "", texts[take], current + "; " + texts[take])
