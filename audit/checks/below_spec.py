"""``below-spec``: installed insulation thinner than the plant specification requires.

The specification (``[spec.SERVICE]`` in the rules, :class:`audit.rules.Spec`) gives a
thickness per size row and operating-temperature band.  For each item:

* **Which specification.**  The item's ``service`` when the register gives one (a service
  the rules have no specification for asks for nothing).  When ``service`` is empty the item
  must meet every specification that fits it: ``cold`` when its process runs below the air
  temperature, otherwise ``heat-conservation``, and also ``personnel`` when it is accessible;
  the thickest requirement governs (an item of unknown purpose is held to the strictest one
  that can apply).
* **Which band.**  The process temperature as the engine used it under the check's site (an
  item at ``AMB`` runs at the air temperature); the first band with low <= T <= high.  Outside
  every band the specification asks for nothing (no finding).
* **Which size row.**  Pipes: the first row whose NPS has an outside diameter (ASME B36.10M,
  :mod:`audit.pipe_sizes`) at least the item's; pipes beyond the last row, vessels, spheres and
  flat items take the ``flat`` row.

The installed thickness is the sum of the item's layers (0 when bare or ``missing``).  A
finding when it is below the requirement minus the specification's tolerance, or when the
item has no insulation and the specification asks for some.  Thickness is compared whatever
the installed material; whether a thinner, better material performs as well is the
heat-loss-limit check's question (``multiple_of_spec``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from audit.checks.base import CheckKind, Verdict, rule_source
from audit.pipe_sizes import NOMINAL_PIPE_SIZES
from audit.repeats import per_distinct
from audit.thermal import ZERO_CELSIUS

NAME = "below-spec"

_OD_OF_NPS = {value: mm / 1000.0 for _, value, _, mm in NOMINAL_PIPE_SIZES}
#: Band edges and size bounds are compared with this slack [K] / relative, so that the same
#: number written in a register and in a rule file meets at the edge whatever the rounding of
#: the unit conversions.
_EDGE_K = 1e-6
_EDGE_REL = 1e-9
#: Likewise for thickness [m]: 9 mm - 2 mm is not exactly 7 mm in binary floating point.
_EDGE_M = 1e-9


@dataclass(frozen=True)
class Requirement:
    """What the specification asks of each item of a table (arrays aligned with its rows)."""

    thickness_m: np.ndarray   #: required total thickness [m]; 0 = nothing required
    tolerance_m: np.ndarray   #: tolerance of the governing specification [m]
    spec: np.ndarray          #: name of the governing specification ("" if none)
    material: np.ndarray      #: its material ("" if none)


def size_bounds_od(spec) -> np.ndarray:
    """Outside diameter [m] of each size row's upper NPS (the loader admits listed NPS only)."""
    return np.array([_OD_OF_NPS[nps] for nps in spec.sizes], float)


def spec_thickness(spec, shape, od_m, temp_k) -> np.ndarray:
    """Thickness ``spec`` requires of each item, by size row and temperature band.

    Parameters
    ----------
    spec : Spec
        A plant specification from the rules.
    shape : array of str
        Item shapes (``pipe`` uses the size rows, every other shape the ``flat`` row) [-]
    od_m : array of float
        Outside diameter of the metal [m]
    temp_k : array of float
        Process temperature [K]

    Returns
    -------
    numpy.ndarray
        Required thickness [m]; NaN where the temperature is outside every band (or unknown),
        or a pipe's diameter is unknown: nothing is required.
    """
    shape = np.asarray(shape, object)
    od = np.asarray(od_m, float)
    temp = np.asarray(temp_k, float)
    band = np.full(temp.shape, -1)
    for j in range(len(spec.bands) - 1, -1, -1):   # reversed: the first listed band wins
        low, high = spec.bands[j]
        with np.errstate(invalid="ignore"):
            inside = (temp >= low - _EDGE_K) & (temp <= high + _EDGE_K)
        band[inside] = j
    bounds = size_bounds_od(spec)
    table = np.vstack([np.asarray(spec.thickness, float), np.asarray(spec.flat, float)[None, :]])
    with np.errstate(invalid="ignore"):
        row = np.searchsorted(bounds * (1 + _EDGE_REL), od, side="left")
    pipe = shape == "pipe"
    row = np.where(pipe, np.minimum(row, len(bounds)), len(bounds))
    known = (band >= 0) & (np.isfinite(od) | ~pipe)
    return np.where(known, table[row, np.maximum(band, 0)], np.nan)


def requirement(table, rules, process_temp_k, air_temp_k) -> Requirement:
    """The governing specification requirement of every row of an item table.

    Parameters
    ----------
    table : pandas.DataFrame
        Item table (``service``, ``shape``, ``od_m``, ``accessible``).
    rules : Rules
        Its ``specs``.
    process_temp_k, air_temp_k : array of float
        Process and air temperature of each row under the scenario evaluated [K].
    """
    n = len(table)
    service = table["service"].fillna("").astype(str).to_numpy(object)
    shape = table["shape"].to_numpy(object)
    od = table["od_m"].to_numpy(float)
    accessible = table["accessible"].fillna(False).to_numpy(bool)
    with np.errstate(invalid="ignore"):
        cold = np.asarray(process_temp_k, float) < np.asarray(air_temp_k, float)
    declared = service != ""
    candidates = {  # specification -> rows it applies to
        name: np.where(declared, service == name,
                       {"cold": cold, "heat-conservation": ~cold,
                        "personnel": ~cold & accessible}.get(name, np.zeros(n, bool)))
        for name in rules.specs}
    out = Requirement(np.zeros(n), np.zeros(n), np.full(n, "", object), np.full(n, "", object))
    # A fixed order, so that equal requirements always resolve to the same specification.
    for name in sorted(candidates, key=lambda s: (s != "heat-conservation", s)):
        spec = rules.specs[name]
        rows = candidates[name]
        if not rows.any():
            continue
        need = spec_thickness(spec, shape, od, process_temp_k)
        with np.errstate(invalid="ignore"):
            wins = rows & (need > out.thickness_m)
        out.thickness_m[wins] = need[wins]
        out.tolerance_m[wins] = spec.tolerance
        out.spec[wins] = name
        out.material[wins] = spec.material
    return out


def spec_sources(rules, names) -> np.ndarray:
    """Per specification name: the rule file and ``[spec.NAME]`` table it comes from, with
    its source (the plant's own file where a plant's rules define it)."""
    return per_distinct(lambda name: rule_source(rules.specs[name].origin, f"spec.{name}",
                                                 rules.specs[name].source)
                        if name in rules.specs else "", np.asarray(names, dtype=object))


def installed_thickness(table) -> np.ndarray:
    """Total installed insulation thickness [m] of each row; 0 when bare or missing."""
    total = per_distinct(lambda x: float(sum(x)) if isinstance(x, tuple) else 0.0,
                         table["layer_thicknesses_m"].to_numpy(object)).astype(float)
    return np.where(table["condition"].to_numpy(object) == "missing", 0.0, total)


def evaluate(context, check, params):
    table = context.table
    states = context.states(check.site)
    need = requirement(table, context.rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    have = installed_thickness(table)
    asked = need.thickness_m > 0
    bare = asked & (have <= 0)
    thin = asked & (have < need.thickness_m - need.tolerance_m - _EDGE_M)
    rows = np.flatnonzero(context.selected(check) & (bare | thin))
    return Verdict(rows, value=have[rows] * 1000.0, limit=need.thickness_m[rows] * 1000.0,
                   unit="mm", limit_source=spec_sources(context.rules, need.spec[rows]), facts={
                       "bare": bare[rows], "spec": need.spec[rows], "material": need.material[rows],
                       "process": states["process_temp_K"].to_numpy(float)[rows] - ZERO_CELSIUS,
                       "tolerance_mm": need.tolerance_m[rows] * 1000})


def word(context, check, params, verdict):
    facts = verdict.facts
    required_mm = verdict.limit.tolist()
    # Python floats in the loops, not numpy scalars: tens of thousands of rows.
    spec, material = facts["spec"].tolist(), facts["material"].tolist()
    message = [
        ("no insulation installed" if none else f"{mm:.0f} mm installed")
        + f"; the {s} specification asks for {req:.0f} mm of {m} at {t:.0f} degC "
          f"(tolerance {tol:.0f} mm)"
        for none, mm, s, req, m, t, tol in zip(
            facts["bare"].tolist(), verdict.value.tolist(), spec, required_mm, material,
            facts["process"].tolist(), facts["tolerance_mm"].tolist())]
    remedy = [f"insulate to specification: {req:.0f} mm of {m}"
              for req, m in zip(required_mm, material)]
    return message, remedy


KIND = CheckKind(evaluate=evaluate, word=word, params={}, fixable_by_insulation=True,
                 thermal=False,
                 description="installed insulation thinner than the plant specification for the "
                             "item's service, size and temperature, beyond its tolerance")
