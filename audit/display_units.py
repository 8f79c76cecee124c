"""Output units: SI (the default) or US customary, converted at the output edge by one table.

The engine, the checks and the item table stay SI.  An output in US units is the SI output
converted here: every column whose header ends in a unit of :data:`US_UNITS` (``name
[degC]`` -> ``name [degF]``, whatever the column is called, so columns added later are covered),
a finding's ``value`` and ``limit`` by its ``unit``, and the quantities written inside
messages (``250 degC``, ``50 mm``, ``2 K``).  Columns carried through from the register are
the register's own and are left as they are.

Each factor is pint's (``Btu_it``: the International Table Btu, as NIST SP 811 lists it),
read once per unit as ``us = scale * si + offset``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import pandas as pd

from audit.errors import LagauditError
from audit.results import significant
from audit.units import ureg

SYSTEMS = ("si", "us")


@dataclass(frozen=True)
class UsUnit:
    """How one SI unit of the outputs is shown in US customary units."""

    label: str      #: the US unit as headers and messages write it
    si: str         #: the SI unit, for pint
    us: str         #: the US unit, for pint
    decimals: int   #: fewest decimals in messages (1 mm is 0.04 in: two to say as much)


#: SI label (as headers and messages write it) -> its US customary counterpart.
US_UNITS = {
    "degC": UsUnit("degF", "degC", "degF", 0),
    "K": UsUnit("degF", "kelvin", "delta_degF", 1),  # a temperature difference
    "mm": UsUnit("in", "mm", "inch", 2),
    "m": UsUnit("ft", "m", "foot", 0),
    "m2": UsUnit("ft2", "m**2", "foot**2", 0),
    "m/s": UsUnit("mph", "m/s", "mile/hour", 1),
    "W": UsUnit("Btu/h", "W", "Btu_it/hour", 0),
    "W/m": UsUnit("Btu/h/ft", "W/m", "Btu_it/hour/foot", 0),
    "W/m2": UsUnit("Btu/(h ft2)", "W/m**2", "Btu_it/(hour*foot**2)", 1),
    "kg/h": UsUnit("lb/h", "kg/hour", "lb/hour", 0),
    "kg/s": UsUnit("lb/h", "kg/s", "lb/hour", 0),
    "MWh": UsUnit("MMBtu", "MWh", "megaBtu_it", 0),
    "t": UsUnit("ton", "metric_ton", "short_ton", 1),
}
_HEADER = re.compile(r"^(?P<name>.*\S) \[(?P<unit>[^\[\]]+)\]$")
# A number (or a range: "50 to 175", "50-60") and a unit of the table inside text; longest
# units first, each a whole word.  A run of digits starts a match at its first digit only (the
# look-behind), so the optional range costs each run a bounded number of tries: linear.
_NUMBER = r"-?\d+(?:\.(?P<{}>\d+))?(?:[eE][-+]?\d+)?"
_IN_TEXT = re.compile(r"(?<![\w.+])(?:(?P<low>" + _NUMBER.format("low_decimals")
                      + r")(?P<joint> to |-|–))?(?P<number>" + _NUMBER.format("decimals")
                      + r") ?(?P<unit>degC|°C|W/m2|W/m|W|kg/h|kg/s|mm|m/s|m2|m²|m|MWh|K)"
                      r"(?![\w/²])")
#: Units written as symbols in the reports: (the table's SI label, the US symbol)
_SYMBOLS = {"°C": ("degC", "°F"), "m²": ("m2", "ft²")}


def check_system(units: str) -> str:
    """``units`` when it names a unit system, else a LagauditError."""
    if units not in SYSTEMS:
        raise LagauditError(f"unknown unit system {units!r}", value=units, expected="si or us")
    return units


@lru_cache(maxsize=None)
def linear(si_label: str) -> tuple[float, float]:
    """``(scale, offset)``: US value = scale * SI value + offset, from pint's definitions.

    pint reaches degF through kelvin, so its answers carry rounding in the last digits
    (1.7999999999999972); 12 significant figures keep every factor's definition (NIST SP 811
    gives at most 7) and give back the exact ones (1.8, 32)."""
    unit = US_UNITS[si_label]
    zero = ureg.Quantity(0.0, unit.si).to(unit.us).magnitude
    scale = ureg.Quantity(1.0, unit.si).to(unit.us).magnitude - zero
    return float(f"{scale:.12g}"), float(f"{zero:.12g}")


def to_us(values, si_label: str):
    """Magnitudes in the SI unit ``si_label`` expressed in its US counterpart."""
    scale, offset = linear(si_label)
    return np.asarray(values, dtype=float) * scale + offset


def header(text: str) -> tuple[str, str | None]:
    """``("surface_temp", "degC")`` for ``"surface_temp [degC]"``; the unit None without one."""
    match = _HEADER.match(str(text))
    return (match["name"], match["unit"]) if match else (str(text), None)


def frame(table: pd.DataFrame, units: str, keep=()) -> pd.DataFrame:
    """``table`` in the unit system ``units``: every column (but ``keep``) whose header unit is
    in :data:`US_UNITS` converted and renamed; findings' ``value``/``limit`` by their ``unit``;
    the converted figures at :data:`audit.results.SIGNIFICANT` significant figures, as the
    findings' SI figures are written; ``message`` and ``remedy`` texts reworded.  The table
    itself is not changed."""
    if check_system(units) == "si" or table is None:
        return table
    out = table.copy()
    renames = {}
    for column in table.columns:
        name, unit = header(column)
        if column in keep or unit not in US_UNITS:
            continue
        values = pd.to_numeric(table[column], errors="coerce")
        if values.notna().sum() < table[column].replace("", np.nan).notna().sum():
            continue  # not a numeric column after all: left as written
        out[column] = significant(to_us(values, unit))  # no float noise (2.00000000000216)
        renames[column] = f"{name} [{US_UNITS[unit].label}]"
    if {"value", "limit", "unit"} <= set(table.columns):
        _finding_values(out, table)
    for column in ("message", "remedy", "reason", "warnings", "economics_note"):
        if column in out.columns and column not in keep:
            out[column] = texts(out[column])
    return out.rename(columns=renames)


def _finding_values(out: pd.DataFrame, table: pd.DataFrame) -> None:
    unit = table["unit"].astype(str).to_numpy(object)
    for si_label in set(unit) & set(US_UNITS):
        rows = unit == si_label
        for column in ("value", "limit"):
            values = pd.to_numeric(table[column], errors="coerce").to_numpy(float)
            converted = out[column].to_numpy(float, copy=True)
            converted[rows] = significant(to_us(values[rows], si_label))
            out[column] = converted
        out.loc[rows, "unit"] = US_UNITS[si_label].label


def texts(series: pd.Series) -> pd.Series:
    """Each text with its quantities in US units; one rewording per distinct text."""
    codes, uniques = pd.factorize(series.fillna("").astype(str))
    reworded = np.array([text(u) for u in uniques], dtype=object)
    return pd.Series(reworded[codes] if len(uniques) else series.to_numpy(object),
                     index=series.index)


@lru_cache(maxsize=65536)
def text(message: str) -> str:
    """``message`` with each ``<number> <SI unit>`` of the table written in US units, at the
    precision it was written in, or the unit's fewest decimals if more.  Text in double
    quotes is a register cell quoted as written (``thickness: "50 degC" is not ...``) and
    stays as it is."""
    parts = message.split('"')
    return '"'.join(part if k % 2 else _IN_TEXT.sub(_reworded, part)
                    for k, part in enumerate(parts))


def _reworded(match: re.Match) -> str:
    si_label, label = _SYMBOLS.get(match["unit"], (match["unit"], None))
    unit = US_UNITS[si_label]

    def shown(number: str, decimals: str | None) -> str | None:
        value = float(to_us(float(number), si_label))
        places = max(len(decimals or ""), unit.decimals)
        return f"{value:.{places}f}" if math.isfinite(value) else None

    high = shown(match["number"], match["decimals"])
    low = shown(match["low"], match["low_decimals"]) if match["low"] else ""
    if high is None or low is None:
        return match.group(0)
    return f"{low}{match['joint'] or ''}{high} {label or unit.label}"


def named(name: str, si_label: str, units: str) -> str:
    """The header of a column of ``name`` whose SI unit is ``si_label``, in ``units``."""
    return f"{name} [{us_label(si_label, units)}]"


def us_label(si_label: str, units: str) -> str:
    """The label of ``si_label`` in the unit system ``units`` (for headers built elsewhere)."""
    return US_UNITS[si_label].label if check_system(units) == "us" and si_label in US_UNITS \
        else si_label
