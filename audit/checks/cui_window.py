"""``cui-window``: corrosion-under-insulation screening, as a ranked inspection priority.

An insulated item whose metal runs inside a temperature window where published recommended
practice expects corrosion under insulation (carbon steel) or external chloride stress
corrosion cracking (austenitic stainless steel) gets a score::

    score = window weight x condition factor [x no-jacket factor] x cyclic factor x age factor

and a finding whose severity is the highest band its score reaches (capped at the check's
own ``severity``).  The windows, weights, factors and bands are the check's parameters (see
the grammar at the top of ``rules/checks-cui.toml``).

What is read, per item of the table:

* metal: ``material``, else the rules' ``[defaults] metal``; a metal with no window is outside
  the check;
* temperature: the operating temperature ``temp_K``, up to ``temp_max_K`` when the register
  gives ``normal/max`` (the metal passes through every temperature in between, so the highest
  weight over that range counts); an item at ambient (``AMB``) runs at its air temperature
  under the check's site condition;
* insulation: only insulated items (at least one layer) are screened: CUI needs insulation to
  hold water against the metal.  Bare items, including ``condition`` = ``missing``, are outside
  (the ``condition`` check reports missing insulation); ``intact``, ``damaged`` and ``wet``
  take their factor, and a row whose ``jacket`` cell says ``none``/``bare`` takes the
  ``no-jacket`` factor when the rules give one;
* cyclic service and age: not contract columns; read from extra columns of the register,
  found by header (case-insensitive, ignoring spaces, underscores, hyphens and dots).
  ``cyclic`` cells are yes/no words; ``age`` cells are years (a unit in the header or cell is
  converted); install years are calendar years, aged against ``audit_year``: the register's
  ``install_year`` column as the reader read it, else an extra column by header.  A cell
  that cannot be read counts as not known and the finding's message says so.  A cyclic item
  above its metal's highest window edge still scores the metal's ``intermittent`` weight
  (API RP 581 names carbon steel in intermittent service above 175 degC as CUI-prone).

Rejected rows are never screened.  Adding insulation thickness cannot fix CUI, so the remedy
is an inspection, and ``fixable_by_insulation`` is False.
"""

from __future__ import annotations

import datetime

import numpy as np
import pandas as pd

from audit.checks.base import CheckKind, Verdict, has_layers
from audit.io.readers.headers import normalise_name, split_unit
from audit.repeats import per_distinct
from audit.rules import SEVERITIES
from audit.rules.converters import list_of, quantity, rows, temperature, text
from audit.schema import ITEM_COLUMNS
from audit.thermal import ZERO_CELSIUS
from audit.units import UnitParseError, parse_quantity

NAME = "cui-window"

REMEDY = "inspect for CUI (remove insulation at the worst points) before reinstating"
CONDITIONS = ("intact", "damaged", "wet")
NO_JACKET = "no-jacket"
DEFAULT_CYCLIC_COLUMNS = ("cyclic", "cyclic service", "thermal cycling", "intermittent")
DEFAULT_AGE_COLUMNS = ("age",)
DEFAULT_INSTALL_YEAR_COLUMNS = ("install year", "installation year", "year installed",
                                "installed")
_YES = frozenset({"yes", "y", "true", "1", "x", "cyclic", "intermittent"})
_NO = frozenset({"no", "n", "false", "0", "-", "continuous"})
_BARE_JACKET = frozenset({"none", "bare", "uninsulated", "no", "no-jacket"})

_WEIGHT = quantity("dimensionless", "dimensionless", low=0.0, low_open=True)


def _windows(value) -> dict:
    """metal -> ((low K, high K, weight), ...), ascending and not overlapping."""
    if not isinstance(value, dict) or not value:
        raise ValueError("not a table of metal = [[low degC, high degC, weight], ...]")
    out = {}
    for metal, entries in value.items():
        if not isinstance(entries, list) or not entries:
            raise ValueError(f"{metal}: not a list of [low degC, high degC, weight] rows")
        parsed = []
        for entry in entries:
            if not isinstance(entry, list) or len(entry) != 3:
                raise ValueError(f"{metal}: row {entry!r} is not [low degC, high degC, weight]")
            low, high, weight = temperature(entry[0]), temperature(entry[1]), _WEIGHT(entry[2])
            if not low < high:
                raise ValueError(f"{metal}: row {entry!r} does not run from low to high")
            parsed.append((low, high, weight))
        if any(b[0] < a[1] for a, b in zip(parsed, parsed[1:])):
            raise ValueError(f"{metal}: rows overlap or are not in ascending order")
        out[metal] = tuple(parsed)
    return out


def _weights(value) -> dict:
    """metal -> weight."""
    if not isinstance(value, dict) or not value:
        raise ValueError("not a table of metal = weight")
    return {metal: _WEIGHT(w) for metal, w in value.items()}


def _condition_factors(value) -> dict:
    if not isinstance(value, dict):
        raise ValueError("not a table of condition = factor")
    unknown = set(value) - {*CONDITIONS, NO_JACKET}
    if unknown:
        raise ValueError(f"unknown condition(s) {', '.join(sorted(unknown))}; expected "
                         f"{', '.join(CONDITIONS)} and optionally {NO_JACKET}")
    missing = [c for c in CONDITIONS if c not in value]
    if missing:
        raise ValueError(f"missing factor(s) for {', '.join(missing)}")
    return {c: _WEIGHT(f) for c, f in value.items()}


def _bands(value) -> tuple:
    """((score threshold, severity), ...), thresholds strictly ascending."""
    if not isinstance(value, list) or not value:
        raise ValueError("not a list of [score, severity] rows")
    out = []
    for entry in value:
        if not isinstance(entry, list) or len(entry) != 2 or entry[1] not in SEVERITIES:
            raise ValueError(f"row {entry!r} is not [score, severity] with severity one of "
                             f"{', '.join(SEVERITIES)}")
        out.append((_WEIGHT(entry[0]), entry[1]))
    if any(b[0] <= a[0] for a, b in zip(out, out[1:])):
        raise ValueError("band scores are not strictly ascending")
    return tuple(out)


def _year(value) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or not 1800 <= value <= 3000:
        raise ValueError(f"{value!r} is not a calendar year")
    return value


_HEADERS = list_of(text, "register headers")


_ITEM = frozenset(ITEM_COLUMNS)


def _extra_column(table: pd.DataFrame, names) -> tuple[str | None, str | None]:
    """The first extra column whose header (unit stripped) matches one of ``names``, by the
    register's own header rules (:mod:`audit.io.readers.headers`)."""
    wanted = {normalise_name(n) for n in names}
    for column in table.columns:
        if not isinstance(column, str) or column.startswith("raw:") or column in _ITEM:
            continue
        name, unit = split_unit(column)
        if normalise_name(name) in wanted:
            return column, unit
    return None, None


def _cyclic(table, names) -> tuple[np.ndarray, np.ndarray, str]:
    """(cyclic bool, cell not read bool, header)."""
    n = len(table)
    column, _ = _extra_column(table, names)
    if column is None:
        return np.zeros(n, bool), np.zeros(n, bool), ""
    cells = table[column].fillna("").astype(str).str.strip().str.lower().to_numpy()
    yes = np.isin(cells, list(_YES))
    unread = ~yes & ~np.isin(cells, list(_NO)) & (cells != "")
    return yes, unread, column


def _ages(table, age_names, year_names, audit_year) -> tuple[np.ndarray, np.ndarray, str]:
    """(age in years, NaN if not known; cell not read bool; header)."""
    n = len(table)
    column, unit = _extra_column(table, age_names)
    if column is None and "install_year" in table.columns:
        # The register's install_year column, read by the reader as years.
        years = table["install_year"].to_numpy(float)
        if np.isfinite(years).any():
            ages = audit_year - years
            late = ages < 0  # an install year after the audit year is a data error, not age 0
            return np.where(late, np.nan, ages), late, "install_year"
    by_year = column is None
    if by_year:
        column, _ = _extra_column(table, year_names)
        if column is None:
            return np.full(n, np.nan), np.zeros(n, bool), ""

    def convert(cell):
        if by_year:
            return audit_year - _year(int(float(cell)))
        return parse_quantity(cell, unit or "year", "year")
    cells = table[column].fillna("").astype(str).str.strip()
    codes, uniques = pd.factorize(cells)
    values = np.full(len(uniques), np.nan)
    unread = np.zeros(len(uniques), bool)
    for i, cell in enumerate(uniques):
        if not cell:
            continue
        try:
            values[i] = convert(cell)
        except (ValueError, UnitParseError):
            unread[i] = True
            continue
        if values[i] < 0:  # an install year after the audit year is a data error, not age 0
            values[i], unread[i] = np.nan, True
    return values[codes], unread[codes], column


def _step(table_rows, x: np.ndarray) -> np.ndarray:
    """Factor of the last row whose threshold ``x`` reaches; 1 below the first or if unknown."""
    out = np.ones(len(x))
    for threshold, factor in table_rows:
        with np.errstate(invalid="ignore"):
            out[x >= threshold] = factor
    return out


def window_weight(windows, low_K: np.ndarray, high_K: np.ndarray):
    """Highest window weight over each item's temperature range, and the row index that gives it.

    Parameters
    ----------
    windows : sequence of (low [K], high [K], weight [-])
        One metal's window rows; each is closed at both ends.
    low_K, high_K : numpy.ndarray
        Lowest and highest operating temperature of each item [K].

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Weight [-] (0 outside every window) and the index of the window row (-1 outside).
    """
    weight = np.zeros(len(low_K))
    which = np.full(len(low_K), -1)
    for j, (low, high, w) in enumerate(windows):
        with np.errstate(invalid="ignore"):
            hit = (low <= high_K) & (high >= low_K) & (w > weight)
        weight[hit], which[hit] = w, j
    return weight, which


def evaluate(context, check, params):
    table = context.table
    rules = context.rules
    n = len(table)
    states = context.states(check.site)
    chosen = (table["status"] == "ok").to_numpy()
    if check.applies_to is not None:
        chosen = chosen & check.applies_to.mask(table)
    insulated = context.once(has_layers)
    condition = table["condition"].to_numpy(object)
    chosen = chosen & insulated & np.isin(condition, CONDITIONS)

    default_metal = rules.defaults.get("metal", "")
    given = table["material"].fillna("").astype(str).to_numpy(object)
    metal = np.where(given != "", given, default_metal)

    ambient = table["temp_is_ambient"].to_numpy(bool)
    air = states["air_temp_K"].to_numpy(float)
    temp = np.where(ambient, air, table["temp_K"].to_numpy(float))
    top = table["temp_max_K"].to_numpy(float)
    top = np.where(np.isfinite(top) & ~ambient, np.fmax(top, temp), temp)

    cyclic, cyclic_unread, cyclic_header = _cyclic(
        table, params.get("cyclic_columns", DEFAULT_CYCLIC_COLUMNS))
    audit_year = params.get("audit_year", datetime.datetime.now(datetime.timezone.utc).year)
    age, age_unread, age_header = _ages(
        table, params.get("age_columns", DEFAULT_AGE_COLUMNS),
        params.get("install_year_columns", DEFAULT_INSTALL_YEAR_COLUMNS), audit_year)

    windows = params["windows"]
    intermittent = params.get("intermittent", {})
    weight = np.zeros(n)
    label = np.full(n, "", dtype=object)
    for name, rows_ in windows.items():
        mine = chosen & (metal == name)
        if not mine.any():
            continue
        w, which = window_weight(rows_, temp, top)
        for j, (low, high, wj) in enumerate(rows_):
            hit = mine & (which == j)
            weight[hit] = w[hit]
            label[hit] = (f"window {low - ZERO_CELSIUS:g} to {high - ZERO_CELSIUS:g} degC "
                          f"(weight {wj:g})")
        if name in intermittent:
            edge = max(high for _, high, _ in rows_)
            with np.errstate(invalid="ignore"):
                above = mine & cyclic & (weight == 0) & (temp > edge)
            weight[above] = intermittent[name]
            label[above] = (f"above {edge - ZERO_CELSIUS:g} degC in cyclic service "
                            f"(intermittent weight {intermittent[name]:g})")

    factors = params["condition_factors"]
    condition_factor = per_distinct(lambda c: factors.get(c, 1.0), condition).astype(float)
    no_jacket = np.zeros(n, bool)
    if NO_JACKET in factors and "raw:jacket" in table:
        cells = table["raw:jacket"].fillna("").astype(str).str.strip().str.lower()
        no_jacket = cells.isin(_BARE_JACKET).to_numpy()
    jacket_factor = np.where(no_jacket, factors.get(NO_JACKET, 1.0), 1.0)
    cyclic_factor = np.where(cyclic, params.get("cyclic_factor", 1.0), 1.0)
    age_factor = _step(params.get("age_factors", ()), age)
    score = weight * condition_factor * jacket_factor * cyclic_factor * age_factor

    bands = params["bands"]
    thresholds = np.array([b[0] for b in bands])
    band = np.searchsorted(thresholds, score, side="right") - 1
    hit = np.flatnonzero(chosen & (weight > 0) & (band >= 0))
    cap = SEVERITIES.index(check.severity)
    severity = [SEVERITIES[min(SEVERITIES.index(bands[b][1]), cap)] for b in band[hit].tolist()]

    return Verdict(hit, value=score[hit], limit=thresholds[band[hit]], unit="score",
                   severity=np.asarray(severity, dtype=object), facts={
                       "columns": [np.asarray(a)[hit] for a in (
                           temp - ZERO_CELSIUS, top - ZERO_CELSIUS, (top == temp) | ~np.isfinite(top),
                           metal, given != "", condition, condition_factor, no_jacket,
                           jacket_factor, cyclic, cyclic_factor, age, age_factor, cyclic_unread,
                           age_unread, band, label, score)],
                       "headers": (cyclic_header, age_header)})


def word(context, check, params, verdict):
    bands = params["bands"]
    cyclic_header, age_header = verdict.facts["headers"]
    messages = []
    # Python values in the loop, not numpy scalars: tens of thousands of rows.
    for (t, t_top, one_temp, who_metal, named, cond, f_cond, bare_jacket, f_jacket, cyc, f_cyc, years,
         f_age, cyc_bad, age_bad, b, lab, s) in zip(*(a.tolist() for a in verdict.facts["columns"])):
        span = f"{t:.0f} degC" if one_temp else f"{t:.0f} to {t_top:.0f} degC"
        who = who_metal + (" (default metal)" if not named else "")
        raised = []
        if f_cond != 1.0:
            raised.append(f"{cond} insulation x{f_cond:g}")
        if bare_jacket and f_jacket != 1.0:
            raised.append(f"no jacket x{f_jacket:g}")
        if cyc and f_cyc != 1.0:
            raised.append(f"cyclic service x{f_cyc:g}")
        if f_age != 1.0:
            raised.append(f"age {years:g} yr x{f_age:g}")
        unread = [f"{h}: cell not read, counted as not known"
                  for h, bad in ((cyclic_header, cyc_bad), (age_header, age_bad)) if bad]
        threshold, level = bands[b]
        messages.append(
            f"{who} at {span}, inside the CUI {lab}"
            + (f"; raised by {', '.join(raised)}" if raised else "")
            + f"; score {s:.3g} reaches the band from {threshold:g} ({level})"
            + ("; " + "; ".join(unread) if unread else ""))

    return messages, REMEDY


KIND = CheckKind(
    thermal=False,
    evaluate=evaluate,
    word=word,
    params={
        "windows": (_windows, True),
        "condition_factors": (_condition_factors, True),
        "bands": (_bands, True),
        "intermittent": (_weights, False),
        "cyclic_factor": (_WEIGHT, False),
        "cyclic_columns": (_HEADERS, False),
        "age_factors": (rows(quantity("year", "year", low=0.0), _WEIGHT, "age years, factor"),
                        False),
        "age_columns": (_HEADERS, False),
        "install_year_columns": (_HEADERS, False),
        "audit_year": (_year, False),
    },
    fixable_by_insulation=False,
    description="metal and operating temperature inside a corrosion-under-insulation window, "
                "ranked by a score raised by insulation condition, cyclic service and age")
