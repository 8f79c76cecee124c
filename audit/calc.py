"""``lagaudit calc``: the what-if for one item, from command-line flags, printed as a table.

The flags are the register's columns (same names, same cell notation, units in the text:
``--temp "350 F"``, ``--layers "calcium-silicate 50mm + mineral-wool 2in"``).  They are read as
a one-row register, in memory, by :func:`audit.io.readers.read_rows` (the register reader's
header matching and cell parsing), so a value means exactly what it means in a register file;
then :func:`audit.pipeline.audit_table` audits the row with every enabled check, as
``lagaudit run`` would, and the printed state is the audit's own (one solve).

Hook-up for the command line::

    calc = sub.add_parser("calc", ...)
    add_calc_arguments(calc)
    calc.set_defaults(run=run_calc)
"""

from __future__ import annotations

import argparse
import math
import textwrap
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from audit import methods
from audit.coldweather import COLUMNS
from audit.errors import LagauditError
from audit import display_units
from audit.io.readers import read_rows, reader_options
from audit.problems import problems_of
from audit.pipeline import audit_table
from audit.rules import Rules, load_rules
from audit.schema import BY_NAME, SCHEMA
from audit.thermal import ZERO_CELSIUS, resolve_names

#: Flag -> register column, in the order of the one-row register: the schema's calc flags.
FLAG_COLUMNS = tuple(c.name for c in SCHEMA if c.calc_flag)

#: Quantity kind -> its SI display unit, a key of the one conversion table
#: (:data:`audit.display_units.US_UNITS`).
DISPLAY_UNITS = {"temperature": "degC", "heat_rate_per_length": "W/m", "heat_rate": "W",
                 "heat_flux": "W/m2", "thickness": "mm", "length": "m", "area": "m2",
                 "speed": "m/s"}


def convert(value, kind: str, units: str = "si"):
    """A magnitude in the SI display unit of ``kind`` expressed in the chosen unit system.

    Parameters
    ----------
    value : float or array_like
        Magnitude in the SI display unit of ``kind`` (degC, W/m, W, W/m2, mm, m, m2, m/s).
    kind : str
        A key of :data:`DISPLAY_UNITS`.
    units : str
        ``si`` (returned unchanged) or ``us``.

    Returns
    -------
    (float or numpy.ndarray, str)
        The magnitude and the label of its unit.
    """
    si = DISPLAY_UNITS[kind]
    if display_units.check_system(units) == "si":
        return value, si
    return display_units.to_us(value, si), display_units.us_label(si, units)


@dataclass
class CalcResult:
    """One audited item: its table row, its thermal state at its own conditions, its findings."""

    item: pd.Series       #: the item-table row (SI magnitudes)
    state: pd.Series      #: thermal state at its own conditions (kelvin, W, W/m, W/m2)
    findings: pd.DataFrame
    site: str             #: site condition its own conditions come from
    rules: Rules
    #: the results' cold-weather columns of the item (audit.coldweather.COLUMNS), NaN if none
    cold_weather: dict = field(default_factory=dict)


def flag_of(column: str) -> str:
    """The ``calc`` flag of a register column: ``--area-code`` for ``area_code``, as the
    command line spells its other flags."""
    return "--" + column.replace("_", "-")


def add_calc_arguments(parser: argparse.ArgumentParser) -> None:
    """The ``calc`` flags: one per register column, plus ``--rules`` and ``--units``."""
    what = parser.add_argument_group("the item (register notation; a unit may follow the number)")
    what.add_argument("--shape", default="pipe",
                      help="pipe (default), vertical-vessel, horizontal-vessel, sphere or flat")
    size = what.add_mutually_exclusive_group()
    size.add_argument("--nps", help='nominal pipe size: 4, 1-1/2", DN100')
    size.add_argument("--od", help="outside diameter of the metal (mm if no unit): 2400, 3.6 m")
    what.add_argument("--length", help="pipe run or vessel tangent length (m if no unit; "
                                       "default 1 m for a pipe)")
    what.add_argument("--area", help="area of a flat item (m2 if no unit)")
    what.add_argument("--heads",
                      help="vessel heads: ellipsoidal (default), hemispherical, flat, none")
    what.add_argument("--orientation",
                      help="horizontal (default) or vertical; flat: also up, down")
    what.add_argument("--temp", required=True,
                      help="operating temperature (degC if no unit): 250, '480 F', AMB")
    what.add_argument("--layers", required=True,
                      help="insulation, innermost first: 'calcium-silicate 50mm + mineral-wool "
                           "2in', 'mineral-wool 2x50', or none for bare metal")
    surface = what.add_mutually_exclusive_group()
    surface.add_argument("--jacket",
                         help="jacket name from the rules (default: the rules' default)")
    surface.add_argument("--emissivity", help="emissivity of the outer surface, 0-1")
    what.add_argument("--material",
                      help="metal, for bare parts: carbon-steel, stainless-steel, ...")
    what.add_argument("--service",
                      help="insulation purpose: heat-conservation, personnel, cold, ...")
    what.add_argument("--condition", help="intact (default), damaged, wet or missing")
    what.add_argument("--damaged", help="share of the length bare when damaged (%%)")
    what.add_argument("--valves", help="uninsulated valves on the run")
    what.add_argument("--flanges", help="uninsulated flanges on the run")
    what.add_argument("--accessible", action="store_true",
                      help="within the personnel reach zone (burn check applies)")
    air = parser.add_argument_group("conditions (a value given here wins over the site's)")
    air.add_argument("--location",
                     help="site condition from the rules (default: the rules' default)")
    air.add_argument("--ambient", help="air temperature (degC if no unit)")
    air.add_argument("--wind", help="wind speed (m/s if no unit)")
    air.add_argument("--rh", help="relative humidity (%%)")
    air.add_argument("--surroundings",
                     help="temperature of the surfaces the item radiates to (degC if no unit; "
                          "default: the site's, else the air temperature)")
    declared = {action.dest for action in parser._actions}
    for column in FLAG_COLUMNS:  # a schema column without a hand-written flag gets a plain one
        if column not in declared:
            what.add_argument(flag_of(column), dest=column, help=_flag_help(BY_NAME[column]))
    parser.add_argument("--rules", action="append", default=[], metavar="DIR",
                        help="layer this folder's *.toml over the shipped rules (repeatable)")
    parser.add_argument("--units", choices=display_units.SYSTEMS,
                        help="print in SI or US customary units (default: the rules' "
                             "[defaults] units, else si)")
    parser.add_argument("--surface-model", default="correlations", metavar="NAME",
                        help="outer-surface model: correlations (default) or iso12241-simplified")
    parser.add_argument("--explain", action="store_true",
                        help="also print the methods and references the figures come from")


def _flag_help(column) -> str:
    """Help of a flag declared only in the schema: its meaning, and its unit if it has one."""
    unit = f" ({column.default_unit} if no unit)" if column.default_unit else ""
    meaning = column.item[0].meaning if column.item else column.name
    return f"{meaning}{unit}".replace("%", "%%")


def calc_item(*, rules: Rules | None = None, rules_dirs=(), surface_model: str = "correlations",
              **flags) -> CalcResult:
    """Audit one item given as register cells (the ``calc`` flags, as text).

    Parameters
    ----------
    rules : Rules, optional
        The rules to use; loaded from the shipped rules and ``rules_dirs`` when not given.
    rules_dirs : sequence of path
        Folders layered over the shipped rules.
    surface_model : str
        Outer-surface model of the engine.
    **flags : str, bool or None
        Register columns (:data:`FLAG_COLUMNS`) in register notation; ``None`` is an empty cell;
        ``accessible`` may be a bool.

    Raises
    ------
    LagauditError
        When the item cannot be read or computed; the message says which flag and why.
    """
    unknown = sorted(set(flags) - set(FLAG_COLUMNS))
    if unknown:
        raise LagauditError(f"unknown item field(s) {', '.join(unknown)}",
                            expected="one of " + ", ".join(FLAG_COLUMNS))
    rules = load_rules(rules_dirs) if rules is None else rules
    if str(flags.get("shape") or "pipe").strip().lower() == "pipe" and not flags.get("length"):
        flags["length"] = "1"  # per metre: the figures that matter for a pipe are per metre
    cells = {column: _cell(flags.get(column)) for column in FLAG_COLUMNS}
    table = resolve_names(_read_one(cells, rules), rules)
    row = table.iloc[0]
    if row["status"] != "ok":
        found = problems_of(table).of_rows(table.index[:1])
        raise LagauditError("the item cannot be computed: "
                            + _as_flags(found[found["severity"] == "reject"]))
    audit = audit_table(table, rules, surface_model=surface_model)
    state = audit.states.iloc[0]
    if not bool(state["computed"]):
        raise LagauditError(f"the engine could not compute the item: {state['engine_reason']}")
    site = row["location"] or rules.defaults.get("site", "")
    return CalcResult(row, state, audit.findings, site, rules,
                      {c: float(audit.results[c].iloc[0]) for c in COLUMNS})


def _cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)


def _read_one(cells: dict[str, str], rules: Rules) -> pd.DataFrame:
    """The cells as a one-row register, read by the register reader (one code path)."""
    return read_rows(["tag", *cells], [["calc", *cells.values()]], name="calc",
                     **reader_options(rules))


def _as_flags(found: pd.DataFrame) -> str:
    """The row's problems in terms of the flags (``--length: "TBA" is not ...``)."""
    return "; ".join(f"{flag_of(column)}: {text[len(column) + 2:]}" if column in FLAG_COLUMNS
                     else text
                     for column, text in zip(found["column"], found["text"]))


def format_calc(result: CalcResult, units: str = "si") -> str:
    """The printed what-if: the item, the conditions, the results and the checks it fails."""
    item, state = result.item, result.state
    c = lambda kelvin: kelvin - ZERO_CELSIUS  # noqa: E731  (degC for display)
    lines = [_describe_item(item, units), ""]

    air, air_unit = convert(c(state["air_temp_K"]), "temperature", units)
    wind, wind_unit = convert(state["wind_m_s"], "speed", units)
    surroundings, _ = convert(c(state["surroundings_temp_K"]), "temperature", units)
    own = [name for name, column in (("ambient", "ambient_K"), ("wind", "wind_m_s"),
                                     ("rh", "rh_pct"), ("surroundings", "surroundings_K"))
           if math.isfinite(item[column])]
    lines.append("Conditions")
    lines.append(f"  site             {result.site or '(none)'}"
                 + (f" (overridden: {', '.join(own)})" if own else ""))
    lines.append(f"  air              {air:.1f} {air_unit}, wind {wind:.3g} {wind_unit}, "
                 f"RH {state['rh_pct']:.0f} %, surroundings {surroundings:.1f} {air_unit}")
    insulated = math.isfinite(state["surface_temp_insulated_K"])
    bare_worst = not insulated or state["surface_temp_K"] != state["surface_temp_insulated_K"]
    parts = ([f"{state['emissivity_used']:.2f} (insulated surface)"] if insulated else []) + \
        ([f"{state['bare_emissivity_used']:.2f} (bare metal)"] if bare_worst else [])
    lines.append(f"  emissivity       {', '.join(parts)}")
    lines.append("")

    rows = []
    process, unit = convert(c(state["process_temp_K"]), "temperature", units)
    rows.append(("process temperature", process, unit))
    surface, unit = convert(c(state["surface_temp_K"]), "temperature", units)
    rows.append(("surface temperature (worst part)", surface, unit))
    if math.isfinite(state["surface_temp_insulated_K"]) and not np.isclose(
            state["surface_temp_insulated_K"], state["surface_temp_K"], rtol=0, atol=1e-9):
        value, unit = convert(c(state["surface_temp_insulated_K"]), "temperature", units)
        rows.append(("surface temperature (insulated part)", value, unit))
    materials = item["layer_materials"] if isinstance(item["layer_materials"], tuple) else ()
    if item["condition"] != "missing":
        for j, name in enumerate(materials):
            column = f"interface_{j}_K"
            if column in state and math.isfinite(state[column]):
                value, unit = convert(c(state[column]), "temperature", units)
                rows.append((f"hot face of layer {j + 1} ({name})", value, unit))
    if item["shape"] == "pipe":
        value, unit = convert(state["heat_loss_W_per_m"], "heat_rate_per_length", units)
        rows.append(("heat loss per metre of run" if units == "si" else "heat loss per foot of run",
                     value, unit))
    value, unit = convert(state["heat_loss_W"], "heat_rate", units)
    rows.append(("heat loss, whole item", value, unit))
    value, unit = convert(state["heat_flux_W_m2"], "heat_flux", units)
    rows.append(("heat flux at the outer surface", value, unit))
    value, unit = convert(state["outer_area_m2"], "area", units)
    rows.append(("outer area", value, unit))
    outlet = result.cold_weather.get("outlet_temp [degC]", math.nan)
    if math.isfinite(outlet):
        value, unit = convert(outlet, "temperature", units)
        rows.append(("temperature at the end of the run", value, unit))
    lines.append("Results at these conditions")
    width = max(len(r[0]) for r in rows)
    lines += [f"  {label:<{width}}  {_number(v):>10}  {u}" for label, v, u in rows]
    lines.append("")
    words = display_units.text if units == "us" else str
    notes = [words(str(text)) for text in (item["warnings"], state["engine_warnings"]) if text]
    if notes:
        lines.append("Notes")
        lines += [textwrap.fill(text, 96, initial_indent="  ", subsequent_indent="  ")
                  for text in notes]
        lines.append("")
    lines += _findings_lines(result.findings, units)
    return "\n".join(lines)


def _describe_item(item: pd.Series, units: str) -> str:
    shape = item["shape"]
    parts = [shape]
    if item["nps"]:
        parts.append(f"NPS {item['nps']}")
    if math.isfinite(item["od_m"]):
        value, unit = convert(item["od_m"] * 1000.0, "thickness", units)
        parts.append(f"OD {_number(value)} {unit}")
    if math.isfinite(item["length_m"]):
        value, unit = convert(item["length_m"], "length", units)
        parts.append(f"length {_number(value)} {unit}")
    if math.isfinite(item["area_m2"]):
        value, unit = convert(item["area_m2"], "area", units)
        parts.append(f"area {_number(value)} {unit}")
    materials = item["layer_materials"] if isinstance(item["layer_materials"], tuple) else ()
    layers = []
    for name, thickness in zip(materials, item["layer_thicknesses_m"]):
        value, unit = convert(thickness * 1000.0, "thickness", units)
        layers.append(f"{name} {_number(value)} {unit}")
    insulation = " + ".join(layers) if layers else "bare metal"
    if item["condition"] not in ("", "intact"):
        insulation += f" ({item['condition']}" + (
            f", {item['damaged_pct']:g} % bare)" if item["condition"] == "damaged" else ")")
    fittings = [f"{int(item[k])} {k}" for k in ("valves", "flanges") if (item[k] or 0) > 0]
    if fittings:
        insulation += f"; uninsulated {', '.join(fittings)}"
    return (f"Item: {', '.join(parts)}\nInsulation: {insulation}"
            + (f"\nJacket: {item['jacket']}" if item["jacket"] else ""))


def _findings_lines(findings: pd.DataFrame, units: str) -> list[str]:
    if not len(findings):
        return ["Checks: none failed."]
    lines = [f"Checks failed ({len(findings)})"]
    for f in findings.to_dict("records"):
        value, limit, unit = f["value"], f["limit"], f["unit"]
        if unit in display_units.US_UNITS:
            if units == "us":
                value, limit = display_units.to_us([value, limit], unit)
                unit = display_units.us_label(unit, units)
            value, limit = _number(value), _number(limit)
        else:  # counts, scores, shares: as the check gave them
            value, limit = f"{value:.3g}", f"{limit:.3g}"
        air, air_unit = convert(f["air_temp [degC]"], "temperature", units)
        words = display_units.text if units == "us" else str
        lines.append(f"  {f['check']} [{f['severity']}]: {value} {unit} against a limit "
                     f"of {limit} {unit} (site {f['site']}, air {air:.0f} {air_unit})")
        lines.append(f"      {words(f['message'])}")
        lines.append(f"      remedy: {words(f['remedy'])}")
    return lines


def _number(value) -> str:
    value = float(value)
    if not math.isfinite(value):
        return "-"
    return f"{value:.1f}" if abs(value) < 1e5 else f"{value:.4g}"


def run_calc(args: argparse.Namespace) -> int:
    """``lagaudit calc``: print the what-if; a :class:`LagauditError` propagates (exit 2)."""
    flags = {column: getattr(args, column, None) for column in FLAG_COLUMNS}
    result = calc_item(rules_dirs=args.rules, surface_model=args.surface_model, **flags)
    print(format_calc(result, args.units or result.rules.defaults.get("units", "si")))
    if getattr(args, "explain", False):
        print()
        print(methods.text())
    return 0
