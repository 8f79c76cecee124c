"""Reconcile field readings of surface temperature with the register.

Per reading (:func:`reconcile`), for the item as registered and at the reading's own
conditions (its ``ambient``, ``wind``, ``rh`` and ``emissivity`` as row values over the item's;
a condition not recorded is the item's own, with a warning from the reader):

- ``predicted_temp_K``: the engine's surface temperature of the insulated part (of the bare
  metal for an item registered without insulation);
- ``condition_factor``: the multiplier on the layers' conductivity (over what the register
  says, wet factor included; 1 = as registered) at which the engine reproduces the reading,
  found by bisection on its logarithm for the whole survey at once, within
  ``[FACTOR_LOW, FACTOR_HIGH]``; NaN with a reason where none does (hotter than the item with
  its insulation a thousandfold more conductive, i.e. than bare metal);
- ``measured_heat_loss_W``: the engine's heat loss of the whole item at that factor, whose
  insulated surface then sits at the measured temperature, so that the outer surface gives off
  exactly what the engine's surface model says a surface at that temperature gives off.

Readings are matched to register rows by tag, exactly.  A tag on several register rows: the
reading goes to the first audited one, in register order, and its warnings list the rows.
Statuses: ``matched``, ``rejected`` (the reader's reason, a register row that was rejected,
or a reading the item cannot show: below the air on a hot line, above the process
temperature, and the mirror images on a cold line) and ``unknown tag``.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pandas as pd

from audit.engine import solve_items
from audit.problems import Problem, words
from audit.results import significant
from audit.rules import Rules
from audit.thermal import ZERO_CELSIUS, PreparedItems, conductivity_tables, has_layers, prepare_items, site_batch

FACTOR_LOW = 0.1      # [-] a tenth of the registered conductivity: better than any insulation
FACTOR_HIGH = 1000.0  # [-] the layers a thousandfold more conductive: as good as bare metal
BISECTIONS = 24       # halvings of ln(FACTOR_HIGH/FACTOR_LOW) = 9.2: the factor to 6e-7 relative

#: Columns :func:`reconcile` adds to the readings.
ADDED = ("item_row", "item_source", "predicted_temp_K", "condition_factor",
         "measured_heat_loss_W", "predicted_heat_loss_W", "air_temp_K", "process_temp_K",
         "wind_used_m_s", "rh_used_pct", "surroundings_temp_K")


def reconcile(readings: pd.DataFrame, table: pd.DataFrame, rules: Rules, *,
              prepared: PreparedItems | None = None, tables=None,
              surface_model: str = "correlations") -> pd.DataFrame:
    """Match each reading to its register row and compute its figures.

    Parameters
    ----------
    readings : pandas.DataFrame
        :func:`audit.io.readers.survey.read_survey`.
    table : pandas.DataFrame
        The item table after :func:`audit.thermal.resolve_names`.
    rules : Rules
        The active rules.
    prepared, tables : optional
        :func:`audit.thermal.prepare_items` of ``table`` and
        :func:`audit.thermal.conductivity_tables`, if the caller has them.
    surface_model : str
        Outer-surface model of the engine.

    Returns
    -------
    pandas.DataFrame
        ``readings`` with ``status`` (``matched``/``rejected``/``unknown tag``), ``reason``
        and ``warnings`` brought up to date, and :data:`ADDED`: the register row's index
        label (-1: none) and source; kelvin, watts and the factor [-], NaN where not known;
        and ``conditions_from``: ``reading`` where the reading recorded its own air, wind or
        humidity, else the item's (its location's name, or ``plant``); empty if unmatched.
    """
    tables = conductivity_tables(rules) if tables is None else tables
    prepared = prepare_items(table, rules, tables[1]) if prepared is None else prepared
    out = readings.copy()
    n = len(out)
    reason = out["reason"].fillna("").to_numpy(object).copy()
    warning = out["warnings"].fillna("").to_numpy(object).copy()
    status = np.where(out["status"] == "ok", "matched", "rejected").astype(object)
    position = _match(out, table, status, reason, warning)
    for name in ADDED[2:]:
        out[name] = np.full(n, np.nan)
    out["conditions_from"] = np.full(n, "", dtype=object)
    out["item_row"] = np.where(position >= 0, table.index.to_numpy()[np.maximum(position, 0)], -1)
    out["item_source"] = np.where(position >= 0, table["source"].to_numpy(object)[
        np.maximum(position, 0)], "")
    matched = np.flatnonzero(status == "matched")
    if matched.size:
        _figures(out, matched, position[matched], prepared, rules, tables[0], surface_model,
                 status, reason, warning)
    out["status"], out["reason"], out["warnings"] = status, reason, warning
    return out


def _add(texts: np.ndarray, i: int, text: str) -> None:
    texts[i] = f"{texts[i]}; {text}" if texts[i] else text


def _match(out, table, status, reason, warning) -> np.ndarray:
    """Each reading's register row (position in ``table``; -1 for none), statuses updated."""
    tags = table["tag"].fillna("").astype(str).str.strip().to_numpy(object)
    accepted = (table["status"] == "ok").to_numpy(bool)
    sources = table["source"].to_numpy(object)
    rows_of: dict[str, list[int]] = {}
    for i, tag in enumerate(tags):
        rows_of.setdefault(tag, []).append(i)
    position = np.full(len(out), -1)
    for i, tag in enumerate(out["tag"].to_numpy(object)):
        if status[i] != "matched":
            continue
        rows = rows_of.get(tag, [])
        if not rows:
            status[i] = "unknown tag"
            _add(reason, i, words("tag", tag, Problem("unknown-tag", "is not in the register",
                                                      "the tag of a register row, exactly")))
            continue
        audited = [r for r in rows if accepted[r]]
        if not audited:
            status[i] = "rejected"
            _add(reason, i, words("tag", tag, Problem(
                "not-recognised", f"its register row {sources[rows[0]]} was rejected",
                "a register row that can be audited")))
            continue
        position[i] = audited[0]
        if len(rows) > 1:
            _add(warning, i, words("tag", tag, Problem(
                "duplicate-tag", f"is on {len(rows)} register rows "
                f"({', '.join(str(sources[r]) for r in rows)}); the reading is assigned to "
                f"the first audited one, {sources[audited[0]]}")))
    return position


def survey_trial(prepared: PreparedItems, table: pd.DataFrame, rows: np.ndarray,
                 readings: pd.DataFrame) -> tuple[PreparedItems, np.ndarray]:
    """The register rows ``rows`` (positions in ``table``) as trial items at the readings'
    conditions (one trial item per reading), and whether each has insulation to judge."""
    trial = prepared.take(rows)
    own = lambda column, row: np.where(  # noqa: E731
        np.isfinite(readings[column].to_numpy(float)), readings[column].to_numpy(float), row)
    eps = readings["emissivity"].to_numpy(float)
    insulated = has_layers(table.iloc[rows]) & (table["condition"].to_numpy(object)[rows]
                                                != "missing")
    fixed = dict(trial.fixed)
    fixed["emissivity"] = np.where(np.isfinite(eps), eps, fixed["emissivity"])
    fixed["bare_emissivity"] = np.where(np.isfinite(eps) & ~insulated, eps,
                                        fixed["bare_emissivity"])
    trial = replace(trial, fixed=fixed, row_air=own("ambient_K", trial.row_air),
                    row_wind=own("wind_m_s", trial.row_wind), row_rh=own("rh_pct", trial.row_rh))
    return trial, insulated


def _figures(out, matched, rows, prepared, rules, conductivity, surface_model,
             status, reason, warning) -> None:
    """Predicted temperature, condition factor and measured heat loss of matched readings."""
    table = prepared.source
    trial, insulated = survey_trial(prepared, table, rows, out.iloc[matched])
    batch, conditions = site_batch(trial, rules, None)
    solve = lambda factor: solve_items(  # noqa: E731
        replace(batch, layer_factor=batch.layer_factor * factor[:, None]), conductivity,
        surface_model=surface_model)
    measured = out["surface_temp_K"].to_numpy(float)[matched]
    air, process = conditions["air_temp_K"], conditions["process_temp_K"]
    registered = solve(np.ones(matched.size))
    predicted = np.where(insulated, registered.surface_temp_insulated, registered.surface_temp)
    hot = process >= air
    # What no item can show: a surface outside the span from the air to the process.
    low, high = np.minimum(air, process), np.maximum(air, process)
    outside = (measured < low) | (measured > high)
    for k in np.flatnonzero(outside):
        i = matched[k]
        status[i] = "rejected"
        side = ("below the air" if hot[k] else "above the air") if (
            measured[k] < low[k]) == hot[k] else "beyond the process temperature"
        _add(reason, i, words("surface_temp", None, Problem(
            "reading-impossible", f"{measured[k] - 273.15:.1f} degC is {side} "
            f"({air[k] - 273.15:.1f} degC air, {process[k] - 273.15:.1f} degC process) on this "
            f"{'hot' if hot[k] else 'cold'} item", "a reading between the air and the process "
            "temperature; check the tag, the emissivity setting and reflections")))
    judged = insulated & ~outside & registered.converged
    factor, found, note = _condition_factors(solve, measured, hot, judged)
    for k in np.flatnonzero(~outside):
        if note[k]:
            _add(warning, matched[k], note[k])
    at_factor = solve(np.where(found, factor, 1.0))
    out.loc[out.index[matched], "predicted_temp_K"] = predicted
    out.loc[out.index[matched], "predicted_heat_loss_W"] = registered.heat_loss
    out.loc[out.index[matched], "condition_factor"] = np.where(found & ~outside, factor, np.nan)
    out.loc[out.index[matched], "measured_heat_loss_W"] = np.where(
        found & ~outside, at_factor.heat_loss, np.nan)
    out.loc[out.index[matched], "air_temp_K"] = air
    out.loc[out.index[matched], "process_temp_K"] = process
    out.loc[out.index[matched], "wind_used_m_s"] = conditions["wind_m_s"]
    out.loc[out.index[matched], "rh_used_pct"] = conditions["rh_pct"]
    out.loc[out.index[matched], "surroundings_temp_K"] = conditions["surroundings_temp_K"]
    # "reading" where the reading recorded a condition of its own; else whose the item's were.
    own = np.zeros(matched.size, bool)
    for column in ("ambient_K", "wind_m_s", "rh_pct"):
        own |= np.isfinite(out[column].to_numpy(float)[matched])
    out.loc[out.index[matched], "conditions_from"] = np.where(
        own, "reading", conditions["conditions_from"])
    uninsulated = ~insulated & ~outside
    for k in np.flatnonzero(uninsulated):
        _add(warning, matched[k], "surface_temp: the item is registered without insulation; "
             "no condition factor")


def _condition_factors(solve, measured, hot, judged):
    """Bracketed bisection on ln(factor) for every judged reading at once.

    Returns ``(factor, found, note)``: the factor [-], whether one reproduces the reading,
    and why not where none does."""
    n = measured.size
    sign = np.where(hot, 1.0, -1.0)
    # Above zero where the factor gives a surface hotter (on a cold item: colder) than read.
    excess = lambda factor: sign * (solve(factor).surface_temp_insulated - measured)  # noqa: E731
    lo, hi = np.full(n, np.log(FACTOR_LOW)), np.full(n, np.log(FACTOR_HIGH))
    at_low, at_high = excess(np.exp(lo)), excess(np.exp(hi))
    found = judged & (at_low <= 0) & (at_high >= 0)
    note = np.full(n, "", dtype=object)
    word = np.where(hot, "hotter", "colder")
    for k in np.flatnonzero(judged & (at_high < 0)):
        note[k] = (f"surface_temp: {word[k]} than the item with its insulation "
                   f"{FACTOR_HIGH:g} times as conductive (as bare metal): no condition factor "
                   "reproduces the reading; probably missing cover, or a reading biased by "
                   "emissivity or reflections")
    for k in np.flatnonzero(judged & (at_low > 0)):
        note[k] = (f"surface_temp: closer to the air than the item with its insulation "
                   f"{FACTOR_LOW:g} times as conductive: no condition factor reproduces the "
                   "reading; check the tag, the emissivity setting and the conditions")
    for _ in range(BISECTIONS):
        mid = 0.5 * (lo + hi)
        above = excess(np.exp(mid)) > 0
        hi = np.where(above, mid, hi)
        lo = np.where(above, lo, mid)
    return np.exp(0.5 * (lo + hi)), found, note


def worst_readings(survey: pd.DataFrame | None, index: pd.Index) -> tuple[np.ndarray, np.ndarray]:
    """Per item-table row (``index``: the table's labels): the position in ``survey`` of its
    worst matched reading (-1: none), the one furthest on the side of more heat through the
    insulation (hotter than predicted on a hot item, colder on a cold one); and its count of
    matched readings."""
    n = len(index)
    worst, count = np.full(n, -1), np.zeros(n, int)
    if survey is None or not len(survey):
        return worst, count
    matched = np.flatnonzero((survey["status"] == "matched").to_numpy())
    hot = survey["process_temp_K"].to_numpy(float) >= survey["air_temp_K"].to_numpy(float)
    deviation = np.where(hot, 1.0, -1.0) * (survey["surface_temp_K"].to_numpy(float)
                                           - survey["predicted_temp_K"].to_numpy(float))
    np.add.at(count, index.get_indexer(survey["item_row"].to_numpy()[matched]), 1)
    # Ascending, so that the worst of an item's readings is written last.
    order = matched[np.argsort(np.nan_to_num(deviation[matched], nan=-np.inf), kind="stable")]
    worst[index.get_indexer(survey["item_row"].to_numpy()[order])] = order
    return worst, count


def item_factors(survey: pd.DataFrame | None, index: pd.Index) -> tuple[np.ndarray, np.ndarray]:
    """Per item-table row (``index``: the table's labels), the condition factors [-] its
    matched readings give the rest of the audit (NaN: none; the item is judged as registered).

    Returns ``(local, whole)``:

    - ``local``, for what one spot decides (a burn, a cold touch, sweating, a layer's hot
      face): the largest factor of the item's readings, the spot letting most heat through;
      NaN where that is not above 1, since a reading cooler than predicted never relaxes a
      safety check (a low-emissivity jacket or a reflection biases a reading cold);
    - ``whole``, for what the whole item decides (its heat loss, energy and money): the mean
      of its readings' factors, each reading a sample of the item's length.

    Readings no factor reproduces (hotter than bare metal, or nearer the air than a tenth of
    the registered conductivity allows) give none: they stand in the survey-deviation check.
    """
    n = len(index)
    local, whole = np.full(n, np.nan), np.full(n, np.nan)
    if survey is None or not len(survey):
        return local, whole
    factor = survey["condition_factor"].to_numpy(float)
    use = np.flatnonzero((survey["status"] == "matched").to_numpy() & np.isfinite(factor))
    at = index.get_indexer(survey["item_row"].to_numpy()[use])
    total, count, high = np.zeros(n), np.zeros(n), np.full(n, -np.inf)
    np.add.at(total, at, factor[use])
    np.add.at(count, at, 1)
    np.maximum.at(high, at, factor[use])
    has = count > 0
    whole[has] = total[has] / count[has]
    local[has & (high > 1.0)] = high[has & (high > 1.0)]
    return local, whole


def more_heat_than_predicted(survey: pd.DataFrame | None, index: pd.Index) -> np.ndarray:
    """Per item-table row: whether its worst reading lets more heat through than the item as
    registered would (hotter than predicted on a hot item, colder on a cold one)."""
    worst, _ = worst_readings(survey, index)
    out = np.zeros(len(index), bool)
    has = worst >= 0
    if has.any():
        picked = survey.iloc[worst[has]]
        hot = picked["process_temp_K"].to_numpy(float) >= picked["air_temp_K"].to_numpy(float)
        out[has] = np.where(hot, 1.0, -1.0) * (picked["surface_temp_K"].to_numpy(float)
                                               - picked["predicted_temp_K"].to_numpy(float)) > 0
    return out


#: Results columns of the survey (contract names) -> column of the reconciled survey; kelvin
#: columns go to degC.
RESULT_COLUMNS = {"measured_temp [degC]": "surface_temp_K",
                  "predicted_temp [degC]": "predicted_temp_K",
                  "measured_heat_loss [W]": "measured_heat_loss_W",
                  "condition_factor [-]": "condition_factor"}


def result_columns(survey: pd.DataFrame | None, index: pd.Index) -> pd.DataFrame:
    """The survey's results columns per item-table row, from the item's worst reading (NaN
    for an item without a matched reading)."""
    worst, _ = worst_readings(survey, index)
    has = worst >= 0
    out = {}
    for name, column in RESULT_COLUMNS.items():
        values = np.full(len(index), np.nan)
        if has.any():
            values[has] = survey[column].to_numpy(float)[worst[has]]
        out[name] = values - ZERO_CELSIUS if column.endswith("_K") else values
    return pd.DataFrame(out)


def survey_out(survey: pd.DataFrame) -> pd.DataFrame:
    """``survey.csv``: every reading once, in file order, with its status, reasons and figures
    under ``name [unit]`` headers."""
    celsius = lambda column: survey[column].to_numpy(float) - ZERO_CELSIUS  # noqa: E731
    out = pd.DataFrame({
        "tag": survey["tag"], "source": survey["source"], "status": survey["status"],
        "reason": survey["reason"], "warnings": survey["warnings"],
        "item_source": survey["item_source"], "date": survey["date"],
        "position": survey["position"], "note": survey["note"],
        "measured_temp [degC]": celsius("surface_temp_K"),
        "predicted_temp [degC]": celsius("predicted_temp_K"),
        "air_temp [degC]": celsius("air_temp_K"),
        "wind [m/s]": survey["wind_m_s"], "rh [%]": survey["rh_pct"],
        "emissivity [-]": survey["emissivity"],
        "condition_factor [-]": survey["condition_factor"],
        "measured_heat_loss [W]": survey["measured_heat_loss_W"],
        "predicted_heat_loss [W]": survey["predicted_heat_loss_W"]})
    for column in out.columns[SURVEY_FIGURES:]:
        out[column] = significant(out[column].to_numpy(float))
    return out


#: survey.csv's columns from this position on are figures (written to 6 significant figures).
SURVEY_FIGURES = 9
