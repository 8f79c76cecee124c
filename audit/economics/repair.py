"""What a repair is, what it costs and what it saves.

The repaired item is "the same item intact at its specified insulation":

* below specification (the ``below-spec`` requirement, including bare and ``missing`` items the
  specification asks insulation of): one intact layer of the specification's material at its
  thickness;
* otherwise, damaged, wet or missing insulation is restored as installed (its own layers,
  intact and dry), so a repair never thins an item that is above its specification;
* uninsulated valves and flanges on pipes get removable covers (the engine then counts them
  insulated: no bare equivalent length).

An item with none of these has nothing to repair: it saves 0 and has no payback.  The saving
is reckoned with the engine on a modified copy of the item table, for the whole register in
one solve.  Costs come from the rule tables of ``[economics.repair]``: per metre of pipe run
by size and thickness, per m2 of insulated surface for vessels, spheres, flat items and pipes
larger than the table, per removable cover for fittings.  Between listed thicknesses the cost
is interpolated linearly; a thickness or fitting size outside the tables has no cost (NaN,
with a note), never the nearest entry.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from audit.checks.base import has_layers
from audit.checks.below_spec import installed_thickness, requirement
from audit.pipe_sizes import NOMINAL_PIPE_SIZES
from audit.repeats import per_distinct

_OD_OF_NPS = {value: mm / 1000.0 for _, value, _, mm in NOMINAL_PIPE_SIZES}
#: Thickness [m] and size comparisons carry this slack so that the same number written in the
#: register and in a rule file meets at a table edge whatever the unit-conversion rounding.
_EDGE_M = 1e-9
_EDGE_REL = 1e-9


def size_row(repair, od_m) -> np.ndarray:
    """Row of the repair tables for each pipe outside diameter: the first size whose ASME
    B36.10M outside diameter is at least the pipe's; ``len(sizes)`` beyond the last row."""
    bounds = np.array([_OD_OF_NPS[s] for s in repair.sizes]) * (1 + _EDGE_REL)
    with np.errstate(invalid="ignore"):
        return np.searchsorted(bounds, np.asarray(od_m, float), side="left")


def insulation_cost(repair, shape, od_m, length_m, surface_m2, thickness_m) -> np.ndarray:
    """Cost of insulating each whole item at a total thickness, from the repair tables.

    Parameters
    ----------
    repair : Repair
        ``[economics.repair]`` tables.
    shape : array of str
        Item shapes; ``pipe`` uses the per-metre table up to its last size [-]
    od_m : array of float
        Outside diameter of the metal [m]
    length_m : array of float
        Pipe run length [m]
    surface_m2 : array of float
        Insulated outer surface of non-pipe items at this thickness (from the engine) [m2]
    thickness_m : float or array of float
        Total insulation thickness [m]

    Returns
    -------
    numpy.ndarray
        Cost [currency]; NaN where the thickness is outside the table's columns (or inputs
        are NaN).  Pipes beyond the last size row cost per m2 of the insulation's outer
        surface, pi (od + 2 t) L.
    """
    shape = np.asarray(shape, object)
    od = np.asarray(od_m, float)
    t = np.broadcast_to(np.asarray(thickness_m, float), od.shape)
    cols = np.asarray(repair.thicknesses, float)
    with np.errstate(invalid="ignore"):
        inside = (t >= cols[0] - _EDGE_M) & (t <= cols[-1] + _EDGE_M)
    j = np.clip(np.searchsorted(cols, np.where(inside, t, cols[0])), 1, cols.size - 1)
    w = np.clip((t - cols[j - 1]) / (cols[j] - cols[j - 1]), 0.0, 1.0)  # edge slack only
    pipe_table = np.asarray(repair.pipe_per_m, float)
    surface = np.asarray(repair.surface_per_m2, float)
    row = size_row(repair, od)
    in_pipe_table = (shape == "pipe") & (row < len(repair.sizes))
    r = np.minimum(row, len(repair.sizes) - 1)
    per_m = pipe_table[r, j - 1] * (1 - w) + pipe_table[r, j] * w
    per_m2 = surface[j - 1] * (1 - w) + surface[j] * w
    area = np.where(shape == "pipe", np.pi * (od + 2 * t) * np.asarray(length_m, float),
                    np.asarray(surface_m2, float))
    cost = np.where(in_pipe_table, per_m * np.asarray(length_m, float), per_m2 * area)
    return np.where(inside, cost, np.nan)


def cover_cost(repair, od_m, count) -> np.ndarray:
    """Cost of ``count`` removable fitting covers per pipe [currency]; 0 for no fitting, NaN
    for a pipe beyond the table's last size."""
    count = np.asarray(count, float)
    row = size_row(repair, od_m)
    covers = np.asarray(repair.cover_per_fitting, float)
    each = np.where(row < covers.size, covers[np.minimum(row, covers.size - 1)], np.nan)
    return np.where(count > 0, count * each, 0.0)


@dataclass
class RepairPlan:
    """What would be repaired on each row of an item table (arrays aligned with its rows)."""

    insulate: np.ndarray         #: insulation work (bool)
    share: np.ndarray            #: share of the item's insulation re-done, 0 to 1
    to_spec: np.ndarray          #: insulated to the specification (bool); else restored as installed
    thickness_m: np.ndarray      #: total thickness after the repair [m]
    covers: np.ndarray           #: removable fitting covers to fit (pipes)
    spec_material: np.ndarray    #: the governing specification's material ("" if none)
    installed_m: np.ndarray      #: installed thickness [m] (0 bare or missing)

    @property
    def needed(self) -> np.ndarray:
        return self.insulate | (self.covers > 0)

    def scope(self) -> np.ndarray:
        """A few words per row: what the repair is."""
        insulation = np.where(self.to_spec, "insulate to specification",
                              np.where(self.share < 1, "repair damaged share",
                                       "restore insulation as installed"))
        words = np.where(self.insulate, insulation, "")
        fit = np.where(self.covers > 0, "fit removable covers", "")
        both = self.insulate & (self.covers > 0)
        return np.where(both, np.char.add(np.char.add(words.astype(str), "; "), fit.astype(str)),
                        np.where(self.insulate, words, fit)).astype(object)


def plan_repairs(table: pd.DataFrame, rules, spec_states: pd.DataFrame) -> RepairPlan:
    """The repair of each row; ``spec_states`` are the states the specification is judged
    under (the ``below-spec`` check's site), which give its process and air temperatures."""
    need = requirement(table, rules, spec_states["process_temp_K"].to_numpy(float),
                       spec_states["air_temp_K"].to_numpy(float))
    have = installed_thickness(table)
    asked = need.thickness_m > 0
    below = asked & ((have <= 0) | (have < need.thickness_m - need.tolerance_m - _EDGE_M))
    condition = table["condition"].fillna("").to_numpy(object)
    damaged = np.nan_to_num(table["damaged_pct"].to_numpy(float)) / 100.0
    listed = per_distinct(lambda x: float(sum(x)) if isinstance(x, tuple) else 0.0,
                          table["layer_thicknesses_m"].to_numpy(object)).astype(float)
    whole = (condition == "missing") | (condition == "wet")
    broken = whole | ((condition == "damaged") & (damaged > 0))
    insulate = below | (broken & has_layers(table))
    share = np.where(below | whole, 1.0, np.where(insulate, damaged, 0.0))
    thickness = np.where(below, need.thickness_m, np.where(insulate, listed, have))
    pipe = (table["shape"] == "pipe").to_numpy()
    fittings = (np.nan_to_num(pd.to_numeric(table["valves"], errors="coerce").to_numpy(float))
                + np.nan_to_num(pd.to_numeric(table["flanges"], errors="coerce").to_numpy(float)))
    ok = (table["status"] == "ok").to_numpy()
    return RepairPlan(insulate=insulate & ok, share=np.where(ok, share, 0.0), to_spec=below & ok,
                      thickness_m=thickness, covers=np.where(pipe & ok, fittings, 0.0),
                      spec_material=need.material, installed_m=have)


def repair_cost(repair, table: pd.DataFrame, plan: RepairPlan, repaired_states: pd.DataFrame) -> np.ndarray:
    """Cost of each row's repair [currency]; 0 where nothing is to be repaired."""
    insulation = insulation_cost(repair, table["shape"].to_numpy(object), table["od_m"].to_numpy(float),
                                 table["length_m"].to_numpy(float),
                                 repaired_states["outer_area_m2"].to_numpy(float), plan.thickness_m)
    covers = cover_cost(repair, table["od_m"].to_numpy(float), plan.covers)
    return np.where(plan.insulate, plan.share * insulation, 0.0) + covers


def payback_years(cost, yearly_saving, needed) -> np.ndarray:
    """Simple payback [yr] = repair cost [currency] / money saved per year [currency/yr].

    NaN where nothing is to be repaired, or the repair saves no money (a repair that does
    not pay back has no payback time rather than a negative one).
    """
    cost = np.asarray(cost, float)
    saving = np.asarray(yearly_saving, float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(np.asarray(needed, bool) & (saving > 0), cost / saving, np.nan)
