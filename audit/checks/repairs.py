"""What a repair is: the work that makes an item good again, shared by the findings' remedies
(:mod:`audit.checks.remedy`) and the economics' repair costs and savings.

The repaired item is "the same item intact at its specified insulation":

* below specification (the ``below-spec`` requirement, including bare and ``missing`` items the
  specification asks insulation of): one intact layer of the specification's material at its
  thickness;
* otherwise, damaged, wet or missing insulation is restored as installed (its own layers,
  intact and dry), so a repair never thins an item that is above its specification;
* uninsulated valves and flanges on pipes get removable covers (the engine then counts them
  insulated: no bare equivalent length);
* insulation a field survey measured letting more heat through than registered (a
  ``survey-deviation`` finding; ``measured``) is restored as installed, intact and dry: the
  register's own build-up at its specified conductivity.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from audit.checks.base import has_layers
from audit.checks.below_spec import _EDGE_M, installed_thickness, requirement
from audit.repeats import per_distinct
from audit.thermal import fittings_of


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
    measured: np.ndarray | None = None  #: restored because a field survey found it degraded

    def condition(self, table: pd.DataFrame) -> np.ndarray:
        """Per row, the condition the repair mends: the register's, or ``degraded`` where
        only a field survey found the (registered intact) insulation letting heat through."""
        condition = table["condition"].fillna("").to_numpy(object)
        if self.measured is None:
            return condition
        return np.where(self.measured & self.insulate & (condition == "intact"), "degraded",
                        condition)

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


def plan_repairs(table: pd.DataFrame, rules, spec_states: pd.DataFrame,
                 measured: np.ndarray | None = None) -> RepairPlan:
    """The repair of each row; ``spec_states`` are the states the specification is judged
    under (the ``below-spec`` check's site), which give its process and air temperatures;
    ``measured`` (bool per row, optional) the rows a field survey found degraded
    (:attr:`audit.checks.base.CheckContext.measured_repair`)."""
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
    if measured is not None:
        whole = whole | np.asarray(measured, bool)
    broken = whole | ((condition == "damaged") & (damaged > 0))
    insulate = below | (broken & has_layers(table))
    share = np.where(below | whole, 1.0, np.where(insulate, damaged, 0.0))
    thickness = np.where(below, need.thickness_m, np.where(insulate, listed, have))
    pipe = (table["shape"] == "pipe").to_numpy()
    fittings = fittings_of(table, "valves") + fittings_of(table, "flanges")
    ok = (table["status"] == "ok").to_numpy()
    return RepairPlan(insulate=insulate & ok, share=np.where(ok, share, 0.0), to_spec=below & ok,
                      thickness_m=thickness, covers=np.where(pipe & ok, fittings, 0.0),
                      spec_material=need.material, installed_m=have,
                      measured=None if measured is None else np.asarray(measured, bool) & ok)
