"""``heat-loss-limit``: an item losing (in cold service: gaining) more heat than the rules allow.

Parameters (at least one is required):

``per_m``
    W per metre of pipe run (pipes only): the item's whole heat loss, fittings and damage
    included, over its run length.
``per_m2``
    W per m2 of outer surface (any item): the item's whole heat loss over its whole outer
    surface.
``multiple_of_spec``
    A factor (>= 1): the item's heat loss against the same item insulated to its plant
    specification, i.e. the specification's thickness of the specification's material, intact
    and dry (see :mod:`audit.checks.below_spec` for which specification governs an item).  The
    reference is computed with the engine on the item re-insulated, under the same site,
    keeping the item's jacket, emissivity and uninsulated fittings (bare valves and flanges
    are the ``condition`` check's concern, and added thickness cannot fix them).
    Items for which the specification asks for nothing are not compared, nor items whose
    reference the engine cannot compute (e.g. a bare item with no jacket to assume).

Heat gains (cold service) compare by magnitude.  Evaluated under the check's site: the shipped
rules use the annual-mean condition, the one heat-loss energy is reckoned at.  An item over
several limits gets one finding, for the limit it exceeds by the largest ratio; its message
names every limit exceeded.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.checks.base import CheckKind, Verdict, check_source
from audit.checks.below_spec import requirement, spec_sources
from audit.repeats import per_distinct
from audit.errors import RuleError
from audit.rules.converters import quantity
from audit.thermal import prepared_states

NAME = "heat-loss-limit"

_LIMITS = ("per_m", "per_m2", "multiple_of_spec")
_UNITS = {"per_m": "W/m", "per_m2": "W/m2", "multiple_of_spec": "times spec"}
_REMEDY = "add insulation to bring the heat loss within the limit"


def reference_heat_loss(context, check) -> tuple[np.ndarray, object]:
    """Heat loss [W] of every row insulated to its specification (NaN where not computed)."""
    states = context.states(check.site)
    need = requirement(context.table, context.rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    q_ref = np.full(len(context.table), np.nan)
    prepared = context.prepared()
    rows = np.flatnonzero((need.thickness_m > 0) & prepared.accepted)
    if not rows.size:
        return q_ref, need
    # The item as it is but for its insulation: jacket, emissivity and bare fittings kept.
    specified = prepared.take(rows).reinsulated(need.material[rows], need.thickness_m[rows],
                                                cover_fittings=False)
    ref = prepared_states(specified, context.rules, site=check.site or None,
                          surface_model=context.surface_model, tables=context.tables())
    computed = ref["computed"].to_numpy(bool)
    q_ref[rows[computed]] = ref["heat_loss_W"].to_numpy(float)[computed]
    return q_ref, need


def _validate(check, params):
    if not any(key in params for key in _LIMITS):
        raise RuleError(f"check {check.name!r} sets no limit", file=check.origin,
                        column=f"check.{check.name}",
                        expected="at least one of per_m = W/m, per_m2 = W/m2, "
                                 "multiple_of_spec = factor")


def evaluate(context, check, params):
    table = context.table
    states = context.states(check.site)
    selected = context.selected(check)
    heat = states["heat_loss_W"].to_numpy(float)
    n = len(table)
    values, limits, need = {}, {}, None
    with np.errstate(invalid="ignore", divide="ignore"):
        if "per_m" in params:
            pipe = (table["shape"] == "pipe").to_numpy()
            values["per_m"] = np.where(pipe, np.abs(states["heat_loss_W_per_m"].to_numpy(float)),
                                       np.nan)
        if "per_m2" in params:
            values["per_m2"] = np.abs(heat) / states["outer_area_m2"].to_numpy(float)
        if "multiple_of_spec" in params:
            q_ref, need = reference_heat_loss(context, check)
            values["multiple_of_spec"] = np.where(q_ref != 0, np.abs(heat) / np.abs(q_ref), np.nan)
        ratios = np.full((n, len(values)), -np.inf)
        for k, key in enumerate(values):
            limits[key] = params[key]
            ratio = values[key] / limits[key]
            ratios[:, k] = np.where(selected & (values[key] > limits[key]), ratio, -np.inf)
    worst = np.argmax(ratios, axis=1)
    rows = np.flatnonzero(np.isfinite(ratios.max(axis=1)))
    keys = list(values)
    which = worst[rows]
    value = np.column_stack([values[key] for key in keys])[rows, which] if keys else np.empty(0)
    sources = None
    if need is not None:
        by_spec = np.asarray([k == "multiple_of_spec" for k in keys], bool)[which]
        own = check_source(check)
        # One text per distinct reference spec, shared by its rows (a new string per finding
        # cost about 100 MiB at 100,000 items).
        sources = per_distinct(lambda spec, referred: own + "; reference: " + spec_sources(
            context.rules, [spec])[0] if referred else own, need.spec[rows], by_spec)
    return Verdict(rows, value=value, limit=np.array([limits[key] for key in keys])[which],
                   unit=np.array([_UNITS[key] for key in keys], dtype=object)[which],
                   limit_source=sources,
                   facts={"keys": keys, "values": values, "limits": limits, "ratios": ratios,
                          "heat": heat, "need": need})


def word(context, check, params, verdict):
    f = verdict.facts
    return _messages(verdict.rows, f["keys"], f["values"], f["limits"], f["ratios"], f["heat"],
                     f["need"]), _REMEDY


def _messages(rows, keys, values, limits, ratios, heat, need) -> list[str]:
    """One message per row of ``rows``, naming every limit it exceeds (Python floats, not
    numpy scalars, in the loops: a register has tens of thousands of such rows)."""
    pieces = []
    for k, key in enumerate(keys):
        shown = np.isfinite(ratios[rows, k]).tolist()
        value = values[key][rows].tolist()
        if key == "multiple_of_spec":
            texts = [f"{x:.2f} times that of the item insulated to the {spec} specification "
                     f"({mm:.0f} mm of {material}), above the limit of {limits[key]:g} times"
                     if show else None
                     for x, spec, mm, material, show in zip(
                         value, need.spec[rows], (need.thickness_m[rows] * 1000).tolist(),
                         need.material[rows], shown)]
        else:
            texts = [f"{x:.1f} {_UNITS[key]}, above the limit of {limits[key]:g} {_UNITS[key]}"
                     if show else None for x, show in zip(value, shown)]
        pieces.append(texts)
    what = np.where(heat[rows] < 0, "heat gain", "heat loss").tolist()
    return [f"{w} " + "; ".join(p for p in parts if p is not None)
            for w, *parts in zip(what, *pieces)]


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={"per_m": (quantity("W/m", "W/m", low=0.0, low_open=True), False),
            "per_m2": (quantity("W/m**2", "W/m**2", low=0.0, low_open=True), False),
            "multiple_of_spec": (quantity("dimensionless", "dimensionless", low=1.0), False)},
    fixable_by_insulation=True, whole_item=True,
    description="heat loss (or gain) above a limit per metre, per m2, or as a multiple of the "
                "same item insulated to specification",
    validate=_validate)
