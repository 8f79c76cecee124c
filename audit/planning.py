"""Planning a work order: access, asbestos survey, labour, cost, sequence and a stable key.

The rules are the ``[planning]`` table of the rule files (grammar at the top of the shipped
``rules/planning.toml``), layered by the one loader and validated here by the one validator
(:func:`audit.rules.keys.convert_keys`).  What an order is to do comes from the work-order
quantities (:mod:`audit.report.workorders`); nothing here computes physics.  Materials are
costed with the repair tables of ``[economics.repair]`` (:mod:`audit.economics.repair`), the
labour with the hour tables of ``[planning.labour]`` in the same grid.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass

import numpy as np

from audit.economics.repair import cover_cost, insulation_cost
from audit.errors import Problem, RuleError
from audit.rules import Rules
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


def _quantity_tables(table, q: dict, thickness_m: float):
    """(materials cost, hours) of one quantity row from a per-metre/per-m2 table pair."""
    pipe, count = q["unit"] == "m", float(q["quantity"])
    od = np.array([q["od_m"] if np.isfinite(q["od_m"]) else np.nan])
    return insulation_cost(table, np.array(["pipe" if pipe else "surface"], object), od,
                           np.array([count if pipe else np.nan]),
                           np.array([np.nan if pipe else count]), thickness_m)[0]


def labour_and_materials(quantities: list[dict], installed_m: float, repair,
                         plan: PlanningRules) -> tuple[float, float]:
    """Insulator hours [h] and materials cost [currency] of one register row's quantities.

    Insulation to a remedy thickness is priced at that thickness; a reinstatement as
    installed at ``installed_m`` (total installed thickness [m]); covers per fitting by size;
    guards per unit.  NaN where a size or thickness lies outside the tables.
    """
    hours = cost = 0.0
    for q in quantities:
        work, unit = q["work"], q["unit"]
        if "guard" in work:
            hours += plan.guard_hours[unit] * q["quantity"]
            cost += plan.guard_cost[unit] * q["quantity"]
        elif unit == "pcs":
            hours += float(cover_cost(plan.hours, [q["od_m"]], [q["quantity"]])[0])
            cost += float(cover_cost(repair, [q["od_m"]], [q["quantity"]])[0])
        else:
            t = q["thickness_mm"] / 1000.0 if q.get("thickness_mm") else installed_m
            hours += float(_quantity_tables(plan.hours, q, t))
            cost += float(_quantity_tables(repair, q, t))
    return hours, cost


def sequence(*, scaffold, asbestos: bool, cui: bool, iced: bool) -> list[str]:
    """The planner's order of work for one order, first step first."""
    steps = []
    if scaffold:
        steps.append("erect scaffolding or bring a lift; inspect it before use")
    if asbestos:
        steps.append("asbestos survey of the existing insulation before any removal or cutting")
    if iced:
        steps.append("de-ice and dry the surface before work (a condensation finding says it ices)")
    if cui:
        steps.append("CUI inspection of the bare metal before reinstatement")
    steps.append("insulate, cover and guard as listed; measure the surface temperature after")
    return steps


def plan_order(order: dict, parts: list[dict], repair, plan: PlanningRules) -> dict:
    """Planning fields of one work order from its register rows.

    ``parts`` are dicts with ``quantities``, ``installed_m``, ``elevation_m``,
    ``install_year`` and ``iced`` (a condensation finding says the surface ices); ``order`` has ``tag``, ``findings`` and ``quantities``
    (summed over its rows: the materials list).
    """
    scaffold_rows = needs_scaffold([p["elevation_m"] for p in parts], plan.scaffold_above)
    scaffold = True if any(s is True for s in scaffold_rows) else (
        None if any(s is None for s in scaffold_rows) else False)
    disturbs = [any("guard" not in q["work"] for q in p["quantities"]) for p in parts]
    presumed = presumed_asbestos([p["install_year"] for p in parts], plan.presumed_before)
    asbestos = bool(any(d and a for d, a in zip(disturbs, presumed)))
    checks = [f["check"] for f in order["findings"]]
    hours = materials = 0.0
    for p in parts:
        h, c = labour_and_materials(p["quantities"], p["installed_m"], repair, plan)
        hours, materials = hours + h, materials + c
    if scaffold:
        hours += plan.scaffold_hours
    labour_cost = hours * plan.rate
    notes = [] if scaffold is not None else ["elevation not given: access not assessed"]
    return {
        "key": work_order_key(order["tag"], checks),
        "scaffold": {True: "yes", False: "no", None: ""}[scaffold],
        "asbestos_survey": "yes" if asbestos else "no",
        "labour_h": hours, "materials_cost": materials, "labour_cost": labour_cost,
        "scaffold_cost": plan.scaffold_hire if scaffold else 0.0,
        "repair_cost": materials + labour_cost + (plan.scaffold_hire if scaffold else 0.0),
        "materials": "; ".join(_material_line(q) for q in order["quantities"]),
        "sequence": sequence(scaffold=scaffold, asbestos=asbestos, cui="cui-window" in checks,
                             iced=any(p["iced"] for p in parts)),
        "notes": notes, "caution": plan.caution if asbestos else "",
    }


def _material_line(q: dict) -> str:
    what = " ".join(x for x in (q["material"], f"{q['thickness']} mm" if q["thickness"] else "")
                    if x)
    return f"{q['work']} {q['size']}" + (f" {what}" if what else "") + f": {q['text']} {q['unit']}"
