"""Survey import: field readings of outer-surface temperatures (infrared or contact) in CSV/XLSX.

One row per reading: ``tag``, ``surface_temp``, and the conditions it was taken in
(``ambient``, ``wind``, ``rh``, the ``emissivity`` of the surface), its ``date``, optional
``note`` and ``position`` on the item.  Headers follow the register's convention (case,
spaces, hyphens and underscores ignored; a unit in square brackets); cells may carry their own
unit.  Units are converted here, once, with the register's cell parsers; what comes out is SI.

Each reading gets ``status`` ``ok`` or ``rejected`` with a ``reason`` (``column: "value" is
...; expected ...``), and ``warnings``; a bad cell never stops the file.  What can only be
judged against the register (unknown tag, a reading the item cannot show) is judged in
:mod:`audit.survey`.
"""

from __future__ import annotations

import datetime as dt
import math
from pathlib import Path

import numpy as np
import pandas as pd

from audit.errors import RegisterError
from audit.io.readers import cells
from audit.io.readers.files import read_raw
from audit.io.readers.headers import Lookup, match_headers, normalise_name
from audit.io.readers.table import QUANTITIES
from audit.problems import Problem, words

#: Survey column -> (default unit, SI unit, what, low, high, low_open) for the numbers.
_NUMBERS = {name: QUANTITIES[name] for name in ("ambient", "wind", "rh", "emissivity")}
SURVEY_COLUMNS = ("tag", "surface_temp", "ambient", "wind", "rh", "emissivity", "date", "note",
                  "position")
#: Survey column -> column of the readings table.
_OUT = {"ambient": "ambient_K", "wind": "wind_m_s", "rh": "rh_pct", "emissivity": "emissivity"}
_CONDITIONS = ("ambient", "wind", "rh")


def survey_lookup() -> Lookup:
    """Header names of a survey file (no aliases: the names of the contract only)."""
    return Lookup({normalise_name(c): (c, 0, None) for c in SURVEY_COLUMNS})


def read_survey(paths, *, today: dt.date | None = None) -> pd.DataFrame:
    """Read survey files into one table of readings, in file and row order.

    Parameters
    ----------
    paths : str, Path or iterable of them
        CSV or XLSX survey files (every sheet of a workbook with a ``tag`` header).
    today : datetime.date, optional
        The day of the audit, for readings dated in the future (default: today, UTC).

    Returns
    -------
    pandas.DataFrame
        ``source`` (``file:sheet:row``), ``tag``, ``surface_temp_K`` [K], ``ambient_K`` [K],
        ``wind_m_s`` [m/s], ``rh_pct`` [%], ``emissivity`` [-] (NaN where not given),
        ``date`` (ISO text, empty where not given), ``note``, ``position``, ``status``
        (``ok``/``rejected``), ``reason``, ``warnings``.

    Raises
    ------
    RegisterError
        A file that cannot be read, or one without ``tag`` and ``surface_temp`` headers.
    """
    if isinstance(paths, (str, Path)):
        paths = [paths]
    today = today or dt.datetime.now(dt.timezone.utc).date()
    lookup = survey_lookup()
    frames = []
    for path in dict.fromkeys(Path(p) for p in paths):
        raws, _ = read_raw(path, None, lookup)
        for raw in raws:
            frames.append(_sheet_readings(path, raw, lookup, today))
    if not frames:
        raise RegisterError("no survey readings found", expected="a .csv or .xlsx survey file")
    return pd.concat(frames, ignore_index=True)


def _sheet_readings(path: Path, raw, lookup: Lookup, today: dt.date) -> pd.DataFrame:
    header_map = match_headers([h.strip() for h in raw.header], lookup)
    for needed in ("tag", "surface_temp"):
        if needed not in header_map.columns:
            raise RegisterError(f"no {needed} column in the survey", file=str(path),
                                sheet=raw.sheet or None,
                                expected="headers tag, surface_temp, ambient, wind, rh, "
                                         "emissivity, date (note, position optional)")
    keep = ~raw.blank if raw.blank.size else np.ones(len(raw.data), bool)
    data = raw.data.loc[keep]
    n = len(data)
    reasons = [[] for _ in range(n)]
    warnings = [[] for _ in range(n)]

    def text(column: str) -> list[str]:
        if column not in header_map.columns:
            return [""] * n
        values = data[header_map.columns[column]].to_numpy(object)
        return [cells.squeeze(str(v)).strip() for v in values]

    def flag(target, i, column, value, problem):
        target[i].append(words(column, value or None, problem))

    out = {"source": [f"{raw.file}:{raw.sheet}:{r}" if raw.sheet else f"{raw.file}::{r}"
                      for r in raw.row_numbers[keep]],
           "tag": text("tag")}
    for i, tag in enumerate(out["tag"]):
        if not tag:
            flag(reasons, i, "tag", None, Problem("empty", "empty", "the item's tag"))

    unit = header_map.units.get("surface_temp") or "degC"
    surface = np.full(n, math.nan)
    for i, cell in enumerate(text("surface_temp")):
        if not cell:
            flag(reasons, i, "surface_temp", None, Problem("empty", "empty",
                                                           "the surface temperature read"))
            continue
        kelvin, high, ambient, problem, _ = cells.temperature(cell, unit)
        if ambient or math.isfinite(high):
            problem = Problem("not-a-temperature", "is not one temperature",
                              f"one reading ({unit} if no unit)")
        if problem:
            flag(reasons, i, "surface_temp", cell, problem)
        else:
            surface[i] = kelvin
    out["surface_temp_K"] = surface

    given = np.zeros((n, len(_CONDITIONS)), bool)
    for name, (default, target, what, low, high, low_open) in _NUMBERS.items():
        column_unit = header_map.units.get(name) or default
        values = np.full(n, math.nan)
        for i, cell in enumerate(text(name)):
            if not cell:
                continue
            value, problem = cells.quantity(cell, column_unit, target, what, low, high, low_open)
            if problem:
                flag(reasons, i, name, cell, problem)
            else:
                values[i] = value
                if name in _CONDITIONS:
                    given[i, _CONDITIONS.index(name)] = True
        out[_OUT[name]] = values

    missing = [[c for c, g in zip(_CONDITIONS, row) if not g] for row in given]
    for i, absent in enumerate(missing):
        if absent:
            flag(warnings, i, "/".join(absent), None, Problem(
                "no-conditions", "not recorded with the reading; the item's own conditions "
                "(its row, else its location, else the rules' default site) are used"))

    dates = []
    for i, cell in enumerate(text("date")):
        day = _date(cell)
        if isinstance(day, Problem):
            flag(reasons, i, "date", cell, day)
            dates.append("")
        elif day is not None and day > today:
            flag(reasons, i, "date", cell, Problem(
                "date-in-future", f"is after the day of the audit ({today.isoformat()})",
                "the day the reading was taken"))
            dates.append(day.isoformat())
        else:
            dates.append("" if day is None else day.isoformat())
    out["date"] = dates
    out["note"], out["position"] = text("note"), text("position")
    out["status"] = ["rejected" if r else "ok" for r in reasons]
    out["reason"] = ["; ".join(r) for r in reasons]
    out["warnings"] = ["; ".join(w) for w in warnings]
    return pd.DataFrame(out)


def _date(cell: str) -> dt.date | Problem | None:
    """A reading's date: ISO ``2026-11-03`` (a time after it, as a workbook writes, ignored)."""
    if not cell:
        return None
    try:
        return dt.date.fromisoformat(cell.split(" ")[0].split("T")[0])
    except ValueError:
        return Problem("not-a-date", "is not a date", "year-month-day, e.g. 2026-11-03")
