"""Heat tracing, freeze protection and temperature drop: the register's cold-weather and flow
questions, answered with the engine's heat loss at the temperatures they need.

- ``tracing_needed [W/m]``: the heat loss per metre of a traced line held at its ``maintain``
  temperature, times the rule's margin (``tracing-shortfall``);
- ``outlet_temp [degC]``: a flowing line's temperature at the end of its run
  (:func:`audit.engine.cooling.outlet_temperature_marched`; ``temperature-drop``);
- ``time_to_freeze [h]``: a stagnant line of a freezing liquid (water), from its operating
  temperature to a share of it frozen (:func:`audit.engine.cooling.freeze_time_stagnant`;
  ``freeze-risk``).

Each answer is solved once per context, design case and parameter, and shared by the check and
the results (:meth:`audit.checks.base.CheckContext.memo`).  The bad input of these columns is
judged here too (:func:`input_problems`), for :func:`audit.thermal.resolve_names`.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.engine import solve_items
from audit.engine.batch import take_items
from audit.engine.cooling import freeze_time_stagnant, outlet_temperature_marched
from audit.pipe_sizes import DEFAULT_SCHEDULE, WALL_MM_BY_SCHEDULE
from audit.problems import Problem, problems_of
from audit.repeats import map_values, per_distinct
from audit.rules import Rules
from audit.thermal import ZERO_CELSIUS, fluid_column, site_batch

TRACED = ("electric", "steam")
#: Results columns of this module, in order.
COLUMNS = ("tracing_needed [W/m]", "time_to_freeze [h]", "outlet_temp [degC]")


def _column(table: pd.DataFrame, name: str, fill=np.nan) -> np.ndarray:
    """An item-table column, or ``fill`` for a table made without it."""
    if name not in table:
        return np.full(len(table), fill, dtype=object if isinstance(fill, str) else float)
    return table[name].fillna(fill).to_numpy(object if isinstance(fill, str) else float)


def traced(table: pd.DataFrame) -> np.ndarray:
    """Per row: the line has electric or steam tracing."""
    return np.isin(_column(table, "tracing", ""), TRACED)


def untraced(table: pd.DataFrame) -> np.ndarray:
    """Per row: the register says ``none`` or gives no tracing."""
    return np.isin(_column(table, "tracing", ""), ("none", ""))


def _fluid_property(table: pd.DataFrame, rules: Rules, name: str) -> np.ndarray:
    return map_values(fluid_column(table), {n: getattr(f, name) for n, f in rules.fluids.items()},
                      np.nan)


def _pipe(table: pd.DataFrame) -> np.ndarray:
    return (table["shape"] == "pipe").to_numpy()


def loss_per_metre(context, rows: np.ndarray, site: str):
    """The engine's heat loss per metre [W/m] of the items ``rows`` (positions, accepted) under
    ``site`` ("" = own conditions) as a function of their process temperatures ``T`` (shape
    ``(rows.size, k)`` [K]), and the air temperature each is judged in [K]."""
    items = context.prepared().take(rows)
    batch, conditions = site_batch(items, context.rules, site or None)
    tables = context.tables()[0]

    def loss(temps: np.ndarray) -> np.ndarray:
        n, k = temps.shape
        many = take_items(batch, np.repeat(np.arange(n), k))
        many.t_process = np.asarray(temps, float).ravel()
        states = solve_items(many, tables, surface_model=context.surface_model)
        return np.where(states.converged, states.heat_loss_per_m, np.nan).reshape(n, k)

    return loss, conditions["air_temp_K"]


def _computed(context, site: str) -> np.ndarray:
    return context.states(site)["computed"].to_numpy(bool)


def tracing_needed(context, site: str, margin: float) -> np.ndarray:
    """Per row [W/m]: heat loss per metre at ``maintain`` under ``site``, times ``margin``;
    NaN where the line is not a traced pipe with a maintain temperature."""
    def make():
        table = context.table
        maintain = _column(table, "maintain_K")
        rows = np.flatnonzero(_computed(context, site) & _pipe(table) & traced(table)
                              & np.isfinite(maintain))
        out = np.full(len(table), np.nan)
        if rows.size:
            loss, _ = loss_per_metre(context, rows, site)
            out[rows] = margin * loss(maintain[rows][:, None])[:, 0]
        return out
    return context.memo(("tracing_needed", site, margin), make)


def tracing_output(table: pd.DataFrame, steam_temp_K: float, steam_tracers) -> np.ndarray:
    """Per row [W/m]: what the tracing gives at its ``maintain`` temperature. Electric: its
    rating times cables. Steam: the tracer's conductance from ``steam_tracers`` (rows of
    (size [inch], W/(m K)), exact sizes only) times the steam temperature (the cell's, else
    ``steam_temp_K``) less the maintain temperature; NaN for a size not in the table."""
    kind = _column(table, "tracing", "")
    size = _column(table, "tracer_nps")
    conductance = map_values(size, dict(steam_tracers), np.nan)
    steam = _column(table, "tracing_steam_K")
    steam = np.where(np.isfinite(steam), steam, steam_temp_K)
    steam_output = conductance * (steam - _column(table, "maintain_K"))
    return np.select([kind == "electric", kind == "steam"],
                     [_column(table, "tracing_W_per_m"), steam_output], np.nan)


def outlet_temperatures(context, site: str) -> np.ndarray:
    """Per row [K]: the outlet temperature of a pipe with a flow and a fluid with ``cp``,
    marched along its run under ``site`` from its process temperature; NaN elsewhere. Any
    tracing's heat is left out (README)."""
    def make():
        table = context.table
        flow, cp = _column(table, "flow_kg_s"), _fluid_property(table, context.rules, "cp")
        rows = np.flatnonzero(_computed(context, site) & _pipe(table) & (flow > 0)
                              & np.isfinite(cp))
        out = np.full(len(table), np.nan)
        if rows.size:
            loss, air = loss_per_metre(context, rows, site)
            t_in = context.states(site)["process_temp_K"].to_numpy(float)[rows]
            out[rows] = outlet_temperature_marched(
                t_in, air, table["length_m"].to_numpy(float)[rows], flow[rows] * cp[rows], loss)
        return out
    return context.memo(("outlet", site), make)


def wall_thickness(table: pd.DataFrame) -> np.ndarray:
    """Per row [m]: the ``wall`` given, else the wall of its ``schedule`` (default 40, ASME
    B36.10M) at its NPS; NaN where neither is known (an ``od`` without a wall)."""
    wall = _column(table, "wall_m")
    schedule = _column(table, "schedule", "")
    schedule = np.where(schedule == "", DEFAULT_SCHEDULE, schedule)
    nps = table["nps"].fillna("").to_numpy(object)
    from_table = per_distinct(lambda s, n: WALL_MM_BY_SCHEDULE.get(s, {}).get(n, np.nan) / 1000.0,
                              schedule, nps).astype(float)
    return np.where(np.isfinite(wall), wall, from_table)


def stagnant_freezing(table: pd.DataFrame, rules: Rules) -> np.ndarray:
    """Per row: a pipe of a liquid the rules can freeze (``freezing_point``, ``cp``,
    ``density``, ``fusion_heat``) that does not flow (no ``flow``, or 0)."""
    flow = _column(table, "flow_kg_s")
    known = np.ones(len(table), bool)
    for name in ("freezing_point", "cp", "density", "fusion_heat"):
        known &= np.isfinite(_fluid_property(table, rules, name))
    return _pipe(table) & known & ~(flow > 0)


def freeze_times(context, site: str, frozen_share: float) -> np.ndarray:
    """Per row [s]: time a stagnant line takes to cool from its process temperature to its
    fluid's freezing point and freeze ``frozen_share`` of its liquid under ``site``, its
    liquid and steel wall cooling together; inf where it does not freeze; NaN where it is not
    such a line or its wall or the wall metal's density and cp are not known."""
    def make():
        table, rules = context.table, context.rules
        wall = wall_thickness(table)
        metal = table["material"].fillna("").replace("", rules.defaults.get("metal", ""))
        metals = rules.metals
        wall_cp = map_values(metal.to_numpy(object), {n: m.density * m.cp for n, m in metals.items()},
                             np.nan)
        rows = np.flatnonzero(_computed(context, site) & stagnant_freezing(table, rules)
                              & np.isfinite(wall) & np.isfinite(wall_cp))
        out = np.full(len(table), np.nan)
        if not rows.size:
            return out
        od = table["od_m"].to_numpy(float)[rows]
        bore = np.pi / 4.0 * (od - 2.0 * wall[rows]) ** 2
        steel = np.pi / 4.0 * od ** 2 - bore
        prop = {name: _fluid_property(table, rules, name)[rows]
                for name in ("freezing_point", "cp", "density", "fusion_heat")}
        liquid = prop["density"] * bore
        loss, air = loss_per_metre(context, rows, site)
        out[rows] = freeze_time_stagnant(
            context.states(site)["process_temp_K"].to_numpy(float)[rows], prop["freezing_point"],
            air, liquid * prop["cp"] + steel * wall_cp[rows],
            frozen_share * liquid * prop["fusion_heat"], loss)
        return out
    return context.memo(("freeze", site, frozen_share), make)


def result_columns(context, params: dict) -> pd.DataFrame:
    """The results' cold-weather columns: ``tracing_needed`` and ``time_to_freeze`` as the
    first enabled ``tracing-shortfall`` and ``freeze-risk`` checks judge them (their design
    case and parameters; NaN without such a check), ``outlet_temp`` at each item's own
    conditions and, for a surveyed line, its whole-item condition (NaN where not computed; a
    line that never freezes is NaN too)."""
    checks = {}
    for check in context.rules.checks.values():
        if check.enabled:
            checks.setdefault(check.kind, check)
    n = len(context.table)
    needed = np.full(n, np.nan)
    if (check := checks.get("tracing-shortfall")) is not None:
        needed = tracing_needed(context, check.site, params[check.name]["margin"])
    hours = np.full(n, np.nan)
    if (check := checks.get("freeze-risk")) is not None:
        seconds = freeze_times(context, check.site, params[check.name]["frozen_share"])
        hours = np.where(np.isfinite(seconds), seconds / 3600.0, np.nan)
    # The outlet sums the loss along the run: a surveyed line at its mean condition.
    outlet = outlet_temperatures(context.for_whole_item(), "") - ZERO_CELSIUS
    return pd.DataFrame(dict(zip(COLUMNS, (needed, hours, outlet))))


def input_problems(table: pd.DataFrame, rules: Rules) -> list[tuple]:
    """``(severity, rows, column, problem)`` of the tracing, maintain and flow cells that
    contradict each other or the rules: a flow of a fluid without ``cp`` (reject), ``maintain``
    above the operating temperature of an untraced line (reject), tracing without
    ``maintain`` (warning), a stagnant water line whose wall is not known (warning), tracing or
    a flow on an item that is not a pipe (warning: not judged)."""
    flow = _column(table, "flow_kg_s")
    maintain = _column(table, "maintain_K")
    temp = table["temp_K"].to_numpy(float)
    cp = _fluid_property(table, rules, "cp")
    found = []
    with np.errstate(invalid="ignore"):
        found.append(("reject", np.isfinite(flow) & ~np.isfinite(cp), "flow", Problem(
            "no-heat-capacity", "given, but the line's fluid is not given or has no cp in the "
            "rules", "a fluid of the rules with cp (the flow's heat capacity), or no flow")))
        # a tracing cell that could not be read is its own reason, not an untraced line
        recorded = problems_of(table).frame
        unread = table.index.isin(recorded.loc[recorded["column"] == "tracing", "row"])
        found.append(("reject", untraced(table) & ~unread & (maintain > temp), "maintain", Problem(
            "maintain-above-temp", "is above the operating temperature of an untraced line",
            "at most the operating temperature, or the line's tracing")))
    found.append(("warning", traced(table) & ~np.isfinite(maintain), "maintain", Problem(
        "no-maintain", "empty on a traced line; its tracing is not checked",
        "the temperature the tracing must hold")))
    found.append(("warning", stagnant_freezing(table, rules) & ~np.isfinite(wall_thickness(table)),
                  "wall", Problem("no-wall", "not known for a stagnant line that can freeze; its "
                                  "time to freeze is not computed",
                                  "a wall thickness, or an NPS of 1/8 to 24 (its schedule's "
                                  "wall, schedule 40 if none given)")))
    not_pipe = ~_pipe(table)
    for column, given in (("tracing", _column(table, "tracing", "") != ""),
                          ("flow", np.isfinite(flow))):
        found.append(("warning", not_pipe & given, column, Problem(
            "ignored", "given on an item that is not a pipe; the cold-weather checks judge "
            "pipes only")))
    return [(severity, np.flatnonzero(mask), column, problem)
            for severity, mask, column, problem in found if mask.any()]
