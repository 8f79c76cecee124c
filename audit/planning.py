"""Planning the work on each item: what to do (quantities), access, asbestos survey, labour
hours, what it costs, the order of work, and a stable work-order key.

The rules are the ``[planning]`` table of the rule files (grammar at the top of the shipped
``rules/planning.toml``), layered by the one loader and validated here by the one validator
(:func:`audit.rules.keys.convert_keys`).  What a register row is to have done is counted from
its findings' remedies (:func:`row_quantities`); nothing here computes physics.

One number per row: :func:`plan_rows` prices each planned row once, and that ``repair_cost``
is what results.csv shows, what the payback divides (:mod:`audit.economics`) and what its work
order adds up (:func:`plan_order`, the sum over the tag's rows)::

    repair_cost = installed_cost + guard_cost + scaffold_cost
    installed_cost  insulation and fitting covers at the [economics.repair] tables, which are
                    INSTALLED rates: material, jacket and the insulators' labour included
    guard_cost      personnel guards that are the row's only work: [planning.guard] material
                    + [planning.labour] hours x rate
    scaffold_cost   a row above the access height: scaffold hire + erect-and-strike hours x rate

A guard offered as the alternative to the insulation or covers of the same row (a check's
``guard_allowed``) is priced on its own, ``guard_alternative_cost``, and is in neither the
repair cost nor the hours: the order is costed as the insulation it lists first.
``labour [h]`` is every crew hour of that work for scheduling (insulation and covers from the
hour tables of ``[planning.labour]``, guards, scaffold); the insulation and cover hours are
not priced again, their labour being inside the installed rates.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from functools import cached_property, lru_cache

import numpy as np
import pandas as pd

from audit.checks.condensation import ICE
from audit.economics.repair import cover_cost, insulation_cost
from audit.errors import Problem, RuleError
from audit.repeats import per_distinct
from audit.rules import SEVERITIES, Rules
from audit.rules.converters import list_of, quantity, text
from audit.rules.keys import convert_keys
from audit.rules.loader import PLANNING

_HOURS = quantity("h", "h", low=0.0)
_MONEY = quantity("dimensionless", "dimensionless", low=0.0)
_NPS = quantity("dimensionless", "dimensionless", low=0.0, low_open=True)
_MM = quantity("mm", "m", low=0.0, low_open=True)

#: sub-table -> {key: (converter, required)}
SCHEMA = {
    "access": {"scaffold_above": (quantity("m", "m", low=0.0), True), "source": (text, True)},
    "asbestos": {"presumed_before": (quantity("dimensionless", "dimensionless", low=1800.0,
                                              high=2200.0), True),
                 "source": (text, True), "caution": (text, True)},
    "labour": {
        "sizes": (list_of(_NPS, "NPS upper bounds", increasing=True), True),
        "thicknesses": (list_of(_MM, "thicknesses", increasing=True), True),
        "pipe_per_m": (list_of(list_of(_HOURS, "hours per metre"), "rows of hours"), True),
        "surface_per_m2": (list_of(_HOURS, "hours per m2"), True),
        "cover_per_fitting": (list_of(_HOURS, "hours per fitting cover"), True),
        "guard_per_m": (_HOURS, True), "guard_per_m2": (_HOURS, True),
        "guard_per_piece": (_HOURS, True), "scaffold": (_HOURS, True),
        "rate": (_MONEY, True), "scaffold_hire": (_MONEY, True), "source": (text, True),
    },
    "guard": {"per_m": (_MONEY, True), "per_m2": (_MONEY, True), "per_piece": (_MONEY, True),
              "source": (text, True)},
}


@dataclass(frozen=True)
class HourTable:
    """Insulator hours in the grid of the repair cost tables (same attribute names, so the
    repair tables' lookup and interpolation serve both)."""

    sizes: tuple
    thicknesses: tuple
    pipe_per_m: tuple          #: [size row][thickness column] h per metre of run
    surface_per_m2: tuple      #: [thickness column] h per m2
    cover_per_fitting: tuple   #: [size row] h per fitting cover


@dataclass(frozen=True)
class PlanningRules:
    """The planning rules after layering (heights in m, years, hours, money)."""

    scaffold_above: float      #: [m]
    access_source: str
    presumed_before: float     #: [year]
    asbestos_source: str
    caution: str
    hours: HourTable
    guard_hours: dict          #: unit ("m", "m²", "pcs") -> h per unit
    scaffold_hours: float      #: [h] per order that needs scaffolding
    rate: float                #: currency per hour
    scaffold_hire: float       #: currency per order that needs scaffolding
    labour_source: str
    guard_cost: dict           #: unit -> currency per unit
    guard_source: str


def planning_rules(rules: Rules) -> PlanningRules:
    """The planning rules of rules already loaded; :class:`RuleError` naming file and key."""
    problems: list[Problem] = []
    values = {}
    for sub, keys in SCHEMA.items():
        raw, origin = rules.planning.get(sub, (None, None))
        where = f"{PLANNING}.{sub}"
        if not isinstance(raw, dict):
            problems.append(Problem(f"missing table [{where}]", column=where,
                                    file=origin or ", ".join(rules.files) or None,
                                    expected=f"[{where}] as in the shipped rules/planning.toml"))
            continue
        values[sub] = convert_keys(raw, keys, where=where, origin=origin, problems=problems)
    labour = values.get("labour", {})
    if len(problems) == 0:
        rows, cols = len(labour["sizes"]), len(labour["thicknesses"])
        if (len(labour["pipe_per_m"]) != rows or any(len(r) != cols for r in labour["pipe_per_m"])
                or len(labour["surface_per_m2"]) != cols or len(labour["cover_per_fitting"]) != rows):
            problems.append(Problem("the labour tables do not match sizes and thicknesses",
                                    file=rules.planning["labour"][1], column=f"{PLANNING}.labour",
                                    expected=f"pipe_per_m: {rows} rows of {cols}; surface_per_m2: "
                                             f"{cols}; cover_per_fitting: {rows}"))
    if problems:
        raise RuleError(f"{len(problems)} problem(s) in the [{PLANNING}] rules",
                        file=problems[0].file, problems=problems)
    access, asbestos, guard = values["access"], values["asbestos"], values["guard"]
    return PlanningRules(
        scaffold_above=access["scaffold_above"], access_source=access["source"],
        presumed_before=asbestos["presumed_before"], asbestos_source=asbestos["source"],
        caution=asbestos["caution"],
        hours=HourTable(*(tuple(labour[k]) for k in ("sizes", "thicknesses", "pipe_per_m",
                                                      "surface_per_m2", "cover_per_fitting"))),
        guard_hours={"m": labour["guard_per_m"], "m²": labour["guard_per_m2"],
                     "pcs": labour["guard_per_piece"]},
        scaffold_hours=labour["scaffold"], rate=labour["rate"],
        scaffold_hire=labour["scaffold_hire"], labour_source=labour["source"],
        guard_cost={"m": guard["per_m"], "m²": guard["per_m2"], "pcs": guard["per_piece"]},
        guard_source=guard["source"])


def needs_scaffold(elevation_m, scaffold_above: float) -> np.ndarray:
    """``True`` above the access height, ``False`` at or below it, ``None`` where the
    elevation is not given (not assessed)."""
    elevation = np.atleast_1d(np.asarray(elevation_m, float))
    return np.array([None if not np.isfinite(e) else bool(e > scaffold_above) for e in elevation],
                    dtype=object)


def presumed_asbestos(install_year, presumed_before: float) -> np.ndarray:
    """``True`` where insulation installed before ``presumed_before`` (or of unknown year) is
    presumed to contain asbestos until surveyed."""
    year = np.atleast_1d(np.asarray(install_year, float))
    with np.errstate(invalid="ignore"):
        return ~np.isfinite(year) | (year < presumed_before)


def work_order_key(tag, checks) -> str:
    """A key that is the same for the same tag and set of finding checks in every run (so a
    maintenance system does not import an order twice) and differs when either changes."""
    text = "\x1f".join([str(tag).strip(), *sorted(set(checks))])
    return "WO-" + hashlib.sha256(text.encode("utf-8")).hexdigest()[:12].upper()


#: A row is planned (gets quantities, hours and a cost) when its worst finding is at least
#: this severity; ``info`` findings alone (a CUI score at the bottom band) make no work.
PLANNED_FROM = "low"

#: Work words of the quantities, by remedy action (audit/checks/remedy.py ``ACTIONS``).
INSULATE = "insulate to the remedy thickness (whole item)"
REINSTATE = {"reinstate-damaged": "reinstate damaged share as installed",
             "replace-wet": "replace wet insulation as installed",
             "reinstate-missing": "reinstate missing insulation as installed",
             "replace-degraded": "replace insulation the survey found degraded, as installed"}
GUARD = "personnel guard (alternative to insulation)"
GUARD_FITTINGS = GUARD + ", fittings"

#: Per-row planning columns of the results (``repair_cost`` is the economics' column, the same
#: number: :attr:`RowPlans.repair_cost`).
ROW_COLUMNS = ["scaffold", "asbestos_survey", "labour [h]", "installed_cost", "guard_cost",
               "scaffold_cost", "guard_alternative_cost", "planning_note"]

#: The words of ``scaffold`` when the register gives no elevation.
UNKNOWN = "unknown"
NO_ELEVATION = "elevation not given: access not assessed, no scaffold costed"
NO_YEAR = "install_year not given: presumed to contain asbestos until surveyed"
NO_INSPECTION_HOURS = ("CUI inspection: its hours and the reinstatement after it are not in "
                       "the rules' tables, not counted")


def text_of(value) -> str:
    """A register cell as text, empty for a missing one."""
    if value is None or (isinstance(value, float) and not np.isfinite(value)):
        return ""
    return str(value).strip()


def size_words(item) -> str:
    """``NPS 4``, ``OD 610 mm`` or ``size not given``."""
    return _size_text(text_of(item["nps"]), float(item["od_m"]))


@lru_cache(maxsize=4096)
def _size_text(nps: str, od: float) -> str:
    """Worded once per distinct size (one string object for every row of that size)."""
    if nps:
        return f"NPS {nps}"
    return f"OD {od * 1000:.0f} mm" if np.isfinite(od) else "size not given"


def layers_words(item) -> str:
    """The installed layers, innermost first, or ``none (bare)``."""
    materials, thicknesses = item["layer_materials"], item["layer_thicknesses_m"]
    if not isinstance(materials, tuple) or not materials:
        return "none (bare)"
    return _layers_text(materials, tuple(thicknesses))


@lru_cache(maxsize=4096)
def _layers_text(materials: tuple, thicknesses: tuple) -> str:
    """Worded once per distinct build-up (a register repeats a few thousand at most)."""
    return " + ".join(f"{m} {t * 1000:.0f} mm" for m, t in zip(materials, thicknesses))


@dataclass
class FindingSummary:
    """What the quantities of a row need from its findings, per row of the item table (one
    vectorised pass over the findings, no record per finding)."""

    worst: np.ndarray          #: highest severity rank (-1: no finding)
    thickest_mm: np.ndarray    #: the thickest remedy thickness asked [mm] (NaN: none)
    thickest_material: np.ndarray  #: its material (the greatest name among equal thicknesses)
    actions: dict              #: remedy action -> bool per row: a finding asks for it
    over_bare: np.ndarray      #: every guard offered is over bare parts (no insulate, engineer)
    iced: np.ndarray           #: a condensation finding says the surface grows ice
    cui: np.ndarray            #: a cui-window finding (an inspection)


def summarise_findings(findings: pd.DataFrame, n: int) -> FindingSummary:
    """:class:`FindingSummary` of ``findings`` (with their remedies) over ``n`` rows."""
    empty = np.zeros(n, bool)
    if not len(findings):
        return FindingSummary(np.full(n, -1), np.full(n, np.nan), np.full(n, "", object),
                              {a: empty for a in ACTIONS_READ}, empty, empty, empty)
    row = findings["row"].to_numpy(int)

    def per_row(flags) -> np.ndarray:
        return np.bincount(row, weights=np.asarray(flags, float), minlength=n) > 0

    rank = findings["severity"].map({name: r for r, name in enumerate(SEVERITIES)}).to_numpy(int)
    worst = np.full(n, -1)
    np.maximum.at(worst, row, rank)
    codes, uniques = pd.factorize(findings["remedy_action"].fillna("").astype(str))
    tokens = [set(u.split(";")) for u in uniques]
    has = {a: np.array([a in t for t in tokens] + [False], bool)[codes] for a in ACTIONS_READ}
    mm = findings["remedy_thickness [mm]"].to_numpy(float)
    asked = pd.DataFrame({"row": row, "mm": mm,
                          "material": findings["remedy_material"].fillna("").astype(str)})
    asked = asked[np.isfinite(mm)].sort_values(["row", "mm", "material"], kind="stable")
    asked = asked.drop_duplicates("row", keep="last")
    thickest_mm, thickest_material = np.full(n, np.nan), np.full(n, "", object)
    thickest_mm[asked["row"].to_numpy()] = asked["mm"].to_numpy()
    thickest_material[asked["row"].to_numpy()] = asked["material"].to_numpy(object)
    guard = has["guard"]
    iced = findings["message"].astype(str).str.contains(ICE, regex=False).to_numpy(bool)
    return FindingSummary(
        worst=worst, thickest_mm=thickest_mm, thickest_material=thickest_material,
        actions={a: per_row(f) for a, f in has.items()},
        over_bare=per_row(guard) & ~per_row(guard & (has["insulate"] | has["engineer"])),
        iced=per_row(iced), cui=per_row(findings["check"].to_numpy(object) == "cui-window"))


#: The remedy actions (audit/checks/remedy.py ``ACTIONS``) the quantities read.
ACTIONS_READ = (*REINSTATE, "covers", "guard", "insulate", "engineer")
_COVER = {(cold, what): f"{'vapour-sealed removable cover' if cold else 'removable insulation cover'}"
                        f", {what}" for cold in (False, True) for what in ("valve", "flange")}


def row_quantities(item, outer_area: float, cold: bool, *, thickest: tuple | None,
                   actions: set, guarded: bool, over_bare: bool) -> list[dict]:
    """What to buy and fit for one register row, from its findings' remedies: dicts of
    :data:`QUANTITY_FIELDS`: ``work``, ``size``, ``material``, ``thickness_mm`` (NaN: as
    installed), ``quantity``, ``unit`` (``m``, ``m²``, ``pcs``) and ``od_m`` (inf when not
    given, so sizes sort by diameter).

    ``thickest``: (mm, material) of the thickest remedy its findings ask, or None;
    ``actions``: the remedy actions they ask; ``guarded``: a guard is offered;
    ``over_bare``: every guard offered is over bare parts.
    Insulation to a remedy thickness covers the whole item (each remedy is at least the
    installed thickness and the specification's), its fittings included; otherwise the bare
    parts are made good as installed (the damaged share, wet or missing insulation) and the
    fittings covered, where a remedy or a condition finding says so.  A personnel guard
    offered beside the insulation (the check's ``guard_allowed``) is counted on its own line:
    over the fittings of an otherwise insulated pipe, over the bare share of a damaged one,
    else over the whole item.
    """
    shape, pipe = text_of(item["shape"]), item["shape"] == "pipe"
    size = size_words(item) if shape != "flat" else "flat"
    whole = (float(item["length_m"]), "m") if pipe else (outer_area, "m²")
    valves, flanges = int(item["valves"] or 0), int(item["flanges"] or 0)
    share = float(item["damaged_pct"]) / 100.0 if item["condition"] == "damaged" else 0.0
    out = []
    if thickest is not None:
        mm, material = thickest
        out.append({"work": INSULATE, "size": size, "material": material,
                    "thickness_mm": mm, "quantity": whole[0], "unit": whole[1]})
        covers = pipe
    else:
        layers = layers_words(item)
        for action, work in REINSTATE.items():
            if action in actions:
                part = share if action == "reinstate-damaged" else 1.0
                out.append({"work": work, "size": size, "material": layers, "thickness_mm": np.nan,
                            "quantity": whole[0] * part, "unit": whole[1]})
        covers = pipe and "covers" in actions
    if covers:
        for count, what in ((valves, "valve"), (flanges, "flange")):
            if count:
                out.append({"work": _COVER[bool(cold), what], "size": size, "material": "",
                            "thickness_mm": np.nan, "quantity": count, "unit": "pcs"})
    if guarded:
        if over_bare and pipe and share == 0 and valves + flanges:
            out.append({"work": GUARD_FITTINGS, "size": size, "material": "",
                        "thickness_mm": np.nan, "quantity": valves + flanges, "unit": "pcs"})
        else:
            out.append({"work": GUARD, "size": size, "material": "", "thickness_mm": np.nan,
                        "quantity": whole[0] * (share if over_bare and share > 0 else 1.0),
                        "unit": whole[1]})
    od = float(item["od_m"])
    for row in out:
        row["od_m"] = od if np.isfinite(od) else np.inf
    return out


#: The fields of a quantity (:func:`row_quantities`), the columns of a quantity table.
QUANTITY_FIELDS = ("work", "size", "material", "thickness_mm", "quantity", "unit", "od_m")


def quantity_frame(pairs) -> pd.DataFrame:
    """A quantity table from (row, quantity dict) pairs: ``row`` and :data:`QUANTITY_FIELDS`,
    one row per quantity (tuples, not dicts, are kept while it is built)."""
    records = [(row, *(q[k] for k in QUANTITY_FIELDS)) for row, q in pairs]
    return pd.DataFrame.from_records(records, columns=["row", *QUANTITY_FIELDS])


def quantity_costs(quantities: pd.DataFrame, n: int, installed_m, repair, plan: PlanningRules):
    """Per row of ``n``: crew hours [h] and installed cost [currency] of its insulation and
    covers, and crew hours [h] and cost [currency] of its guards.

    ``quantities``: a quantity table (:func:`quantity_frame`); ``installed_m``: each row's
    total installed thickness [m], the thickness of a reinstatement as installed.  Insulation
    is priced at its remedy thickness (or as installed) from the per-metre table of its size,
    or per m2; covers per fitting by size; both from ``repair`` (installed rates) with their
    hours from the hour tables of the same grid.  Guards: material plus hours at the rate.
    NaN where a size or thickness lies outside the tables, never the nearest entry.
    """
    if not len(quantities):
        return np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n)
    row = quantities["row"].to_numpy(int)
    unit = quantities["unit"].to_numpy(object)
    amount = quantities["quantity"].to_numpy(float)
    od = quantities["od_m"].to_numpy(float)
    guard = quantities["work"].isin([GUARD, GUARD_FITTINGS]).to_numpy(bool)
    cover = (unit == "pcs") & ~guard
    insulation = ~guard & ~cover
    mm = quantities["thickness_mm"].to_numpy(float)
    thickness = np.where(np.isfinite(mm), mm / 1000.0, np.asarray(installed_m, float)[row])
    metres = unit == "m"
    shape = np.where(metres, "pipe", "surface").astype(object)
    length, area = np.where(metres, amount, np.nan), np.where(metres, np.nan, amount)

    def priced(table):
        laid = insulation_cost(table, shape, od, length, area, thickness)
        fitted = cover_cost(table, od, np.where(cover, amount, 0.0))
        return np.where(insulation, laid, 0.0) + np.where(cover, fitted, 0.0)

    guard_hours = pd.Series(unit).map(plan.guard_hours).to_numpy(float) * amount
    guard_material = pd.Series(unit).map(plan.guard_cost).to_numpy(float) * amount
    hours = np.where(guard, 0.0, priced(plan.hours))
    installed = np.where(guard, 0.0, priced(repair))
    guards = np.where(guard, guard_material + guard_hours * plan.rate, 0.0)
    return tuple(np.bincount(row, weights=w, minlength=n)
                 for w in (hours, installed, np.where(guard, guard_hours, 0.0), guards))


@dataclass
class RowPlans:
    """The planning of every register row, aligned with the item table (planned rows: those
    whose worst finding is at least :data:`PLANNED_FROM`; the others have empty fields)."""

    planned: np.ndarray       #: bool
    quantities: pd.DataFrame  #: the quantity table of the planned rows (:func:`quantity_frame`)
    iced: np.ndarray          #: bool: a condensation finding says the surface grows ice
    frame: pd.DataFrame       #: ROW_COLUMNS, index of the item table
    repair_cost: np.ndarray   #: installed + guard + scaffold cost [currency]; NaN: not planned

    @cached_property
    def _columns(self) -> dict:
        return {c: self.frame[c].to_numpy(object) for c in ROW_COLUMNS}

    @cached_property
    def _starts(self) -> np.ndarray:
        return np.searchsorted(self.quantities["row"].to_numpy(int), np.arange(len(self.planned) + 1))

    @cached_property
    def _quantity_columns(self) -> list[np.ndarray]:
        return [self.quantities[c].to_numpy(object) for c in QUANTITY_FIELDS]

    def quantities_of(self, row: int) -> list[dict]:
        """The quantities of one row (by position), as dicts of :data:`QUANTITY_FIELDS`."""
        start, stop = self._starts[row], self._starts[row + 1]
        return [dict(zip(QUANTITY_FIELDS, values))
                for values in zip(*(column[start:stop] for column in self._quantity_columns))]

    def part(self, row: int) -> dict:
        """The planning fields of one row (by position), for its work order."""
        return {**{c: values[row] for c, values in self._columns.items()},
                "repair_cost": float(self.repair_cost[row]), "quantities": self.quantities_of(row),
                "iced": bool(self.iced[row])}


def plan_rows(table: pd.DataFrame, states: pd.DataFrame, findings: pd.DataFrame,
              plan: PlanningRules, repair) -> RowPlans:
    """Quantities, access, asbestos survey, hours and cost of every register row with a
    finding at or above :data:`PLANNED_FROM`; ``states`` at the items' own conditions (their
    outer area and process and air temperatures); ``findings`` with their remedies; ``plan``
    from :func:`planning_rules`; ``repair`` the ``[economics.repair]`` tables."""
    n = len(table)
    found = summarise_findings(findings, n)
    planned = found.worst >= SEVERITIES.index(PLANNED_FROM)
    rows = np.flatnonzero(planned)
    outer = states["outer_area_m2"].to_numpy(float)
    with np.errstate(invalid="ignore"):
        cold = ((states["process_temp_K"].to_numpy(float) < states["air_temp_K"].to_numpy(float))
                | (table["service"].fillna("").to_numpy(object) == "cold"))
    columns = ["shape", "nps", "od_m", "length_m", "valves", "flanges", "damaged_pct",
               "condition", "layer_materials", "layer_thicknesses_m"]
    values = [table[c].to_numpy(object)[rows] for c in columns]
    guard = found.actions["guard"]
    asked = (*REINSTATE, "covers")
    quantities = quantity_frame(
        (r, q) for r, cells in zip(rows, zip(*values))
        for q in row_quantities(
            dict(zip(columns, cells)), outer[r], bool(cold[r]),
            thickest=(found.thickest_mm[r], found.thickest_material[r])
            if np.isfinite(found.thickest_mm[r]) else None,
            actions={a for a in asked if found.actions[a][r]},
            guarded=bool(guard[r]), over_bare=bool(found.over_bare[r])))
    installed_m = per_distinct(lambda t: float(sum(t)) if isinstance(t, tuple) else 0.0,
                               table["layer_thicknesses_m"].to_numpy(object)).astype(float)
    hours, installed, guard_hours, guards = quantity_costs(quantities, n, installed_m, repair, plan)
    q_row = quantities["row"].to_numpy(int)
    not_guard = ~quantities["work"].isin([GUARD, GUARD_FITTINGS]).to_numpy(bool)
    # a guard beside insulation or covers is their alternative, else it is the work itself
    alternative = np.bincount(q_row, weights=not_guard, minlength=n) > 0

    scaffold = needs_scaffold(table["elevation_m"].to_numpy(float), plan.scaffold_above)
    up, unknown_height = scaffold == True, scaffold == None  # noqa: E711,E712 (object array)
    # any insulation work or a CUI inspection may cut old insulation or its remnants (a guard
    # alone does not); a row without an install year is presumed old
    disturbs = alternative | found.cui
    year = table["install_year"].to_numpy(float)
    survey = disturbs & presumed_asbestos(year, plan.presumed_before)
    notes = np.full(n, "", dtype=object)
    for mask, words in ((unknown_height, NO_ELEVATION), (survey & ~np.isfinite(year), NO_YEAR),
                        (found.cui, NO_INSPECTION_HOURS)):
        notes = np.where(mask, np.where(notes == "", words, notes + "; " + words), notes)

    hours = hours + np.where(alternative, 0.0, guard_hours) + np.where(up, plan.scaffold_hours, 0.0)
    scaffold_cost = np.where(up, plan.scaffold_hire + plan.scaffold_hours * plan.rate, 0.0)
    guard_cost = np.where(alternative, 0.0, guards)
    frame = pd.DataFrame({
        "scaffold": _shared(np.where(up, "yes", np.where(unknown_height, UNKNOWN, "no"))),
        "asbestos_survey": _shared(np.where(survey, "yes", "no")),
        "labour [h]": hours,
        "installed_cost": installed, "guard_cost": guard_cost, "scaffold_cost": scaffold_cost,
        "guard_alternative_cost": np.where(alternative & (guards > 0), guards, np.nan),
        "planning_note": _shared(notes)}, index=table.index, columns=ROW_COLUMNS)
    frame.loc[~planned, :] = None
    return RowPlans(planned=planned, quantities=quantities, iced=found.iced & planned, frame=frame,
                    repair_cost=np.where(planned, installed + guard_cost + scaffold_cost, np.nan))


def _shared(values) -> np.ndarray:
    """``values`` as an object array holding one string object per distinct text (a column
    of 100,000 "no" holds one)."""
    codes, uniques = pd.factorize(pd.Series(values, dtype=object))
    return np.append(np.asarray(uniques, object), None)[codes]


def sequence(*, scaffold: str, asbestos: bool, cui: bool, iced: bool) -> list[str]:
    """The planner's order of work for one order, first step first; ``scaffold`` is
    ``yes``, ``no`` or :data:`UNKNOWN`."""
    steps = []
    if scaffold == "yes":
        steps.append("erect scaffolding or bring a lift; inspect it before use")
    elif scaffold == UNKNOWN:
        steps.append("confirm access on site (no elevation in the register): scaffolding or a "
                     "lift may be needed")
    if asbestos:
        steps.append("asbestos survey of the existing insulation before any removal or cutting")
    if iced:
        steps.append("de-ice and dry the surface before work (a condensation finding says it ices)")
    if cui:
        steps.append("CUI inspection of the bare metal before reinstatement")
    steps.append("insulate, cover and guard as listed; measure the surface temperature after")
    return steps


#: Money fields of an order, each the sum of its rows'.
MONEY = ("installed_cost", "guard_cost", "scaffold_cost", "repair_cost")


def _sum_given(values) -> float:
    """The sum of the values given (not NaN); NaN when none is."""
    given = [v for v in values if v is not None and np.isfinite(v)]
    return float(sum(given)) if given else np.nan


def plan_order(order: dict, parts: list[dict], plan: PlanningRules) -> dict:
    """Planning fields of one work order from its register rows' planning
    (:meth:`RowPlans.part`): hours and costs are the sums over the rows (each row is its own
    run at its own elevation, so each row above the access height has its own scaffold);
    ``scaffold`` is ``yes`` if any row needs it, else :data:`UNKNOWN` if any row's elevation
    is not given, else ``no``; an asbestos survey if any row needs one.  ``order`` has
    ``tag`` and ``findings``."""
    scaffolds = {p["scaffold"] for p in parts}
    scaffold = "yes" if "yes" in scaffolds else UNKNOWN if UNKNOWN in scaffolds else "no"
    asbestos = any(p["asbestos_survey"] == "yes" for p in parts)
    checks = [f["check"] for f in order["findings"]]
    notes = [n for p in parts for n in str(p["planning_note"] or "").split("; ") if n]
    return {
        "key": work_order_key(order["tag"], checks),
        "scaffold": scaffold, "asbestos_survey": "yes" if asbestos else "no",
        "labour_h": float(sum(p["labour [h]"] for p in parts)),
        **{k: float(sum(p[k] for p in parts)) for k in MONEY},  # NaN if a row is unpriced
        "guard_alternative_cost": _sum_given([p["guard_alternative_cost"] for p in parts]),
        "sequence": sequence(scaffold=scaffold, asbestos=asbestos, cui="cui-window" in checks,
                             iced=any(p["iced"] for p in parts)),
        "notes": list(dict.fromkeys(notes)), "caution": plan.caution if asbestos else "",
    }
