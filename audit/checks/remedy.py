"""Remedy thickness: the smallest standard thickness that passes all of an item's checks.

For every item with a finding that insulation can fix, the insulation is replaced, in a trial
(``PreparedItems.reinsulated``), by one layer of the remedy material (intact, fittings
covered), and the checks' verdicts are taken again on the trials, for the whole register at
once.  Thicker insulation only helps the fixable checks (a cooler hot surface, a warmer cold
one, less heat, more thickness against the specification), so the smallest passing standard
thickness is found by bisection over the standard list: about log2(n) rounds instead of n,
then one more round for the items that need the thickest (to tell them from those that no
standard thickness fixes).  Each round re-evaluates only the checks each item failed, plus
the checks every remedy must pass (``CheckKind.remedy_must_pass``: ``layer-overheat``, the
remedy material must stand the temperature).  (Below the critical radius of insulation, heat
loss can rise with thickness; on such small lines the heat-loss check is the one exception,
and the remedy found is then the smallest thickness at which bisection saw it pass.)

The remedy material is the material of the specification the item is held to (see
``below-spec``), else its outermost installed material; an item with neither gets a named
action without a thickness.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.checks.base import CheckContext
from audit.checks.below_spec import requirement
from audit.repeats import map_values, per_distinct


def fill_remedies(context: CheckContext, findings: pd.DataFrame, kinds: dict, params: dict) -> pd.DataFrame:
    """``findings`` with ``remedy_thickness [mm]``, ``remedy_material`` and the remedy text
    completed for the findings that insulation can fix."""
    if not len(findings) or not findings["fixable_by_insulation"].any() or not context.rules.thicknesses:
        return findings
    rules = context.rules
    fixable_findings = findings[findings["fixable_by_insulation"].astype(bool)]
    rows = np.unique(fixable_findings["row"].astype(int))
    material = _remedy_material(context, rows)
    searchable = material != ""
    material_index = map_values(material, context.tables()[1], -1, dtype=int)
    recheck = [c for c in rules.checks.values() if c.enabled and
               (kinds[c.kind].fixable_by_insulation or kinds[c.kind].remedy_must_pass)]
    # Per check, which of the rows failed it (only those are re-checked), or all of them for
    # the checks every remedy must pass.
    failed = {c.name: np.ones(rows.size, bool) if kinds[c.kind].remedy_must_pass else
              np.isin(rows, fixable_findings.loc[fixable_findings["check"] == c.name, "row"])
              for c in recheck}
    standard = np.asarray(rules.thicknesses, float)

    def passes(at: np.ndarray, index: np.ndarray) -> np.ndarray:
        """Whether rows[at] pass every re-checked check at standard[index]."""
        ok = np.ones(at.size, bool)
        for check in recheck:
            sub = np.flatnonzero(failed[check.name][at])
            if sub.size == 0:
                continue
            trial = context.prepared().take(rows[at[sub]]).reinsulated(
                material_index[at[sub]], standard[index[sub]])
            trial_context = context.trial(trial)
            verdict = kinds[check.kind].evaluate(trial_context, check, params[check.name])
            ok[sub[verdict.rows]] = False
            ok[sub[~trial_context.states(check.site)["computed"].to_numpy(bool)]] = False
        return ok

    candidates = np.flatnonzero(searchable)
    low = np.zeros(candidates.size, int)
    high = np.full(candidates.size, standard.size - 1)
    while candidates.size and (low < high).any():
        open_ = low < high
        mid = (low + high) // 2
        ok = passes(candidates[open_], mid[open_])
        high[np.flatnonzero(open_)[ok]] = mid[open_][ok]
        low[np.flatnonzero(open_)[~ok]] = mid[open_][~ok] + 1
    # The thickest standard thickness is never tried by the bisection (mid < high): the
    # items that end there are tried at it last, and have no remedy if they fail it.
    top = np.flatnonzero(high == standard.size - 1)
    solvable = np.ones(candidates.size, bool)
    solvable[top] = passes(candidates[top], high[top])
    thickness = np.full(rows.size, np.nan)
    thickness[candidates[solvable]] = standard[high[solvable]]
    has_material = searchable

    out = findings.copy()
    fixable = out["fixable_by_insulation"].astype(bool).to_numpy()
    at = np.flatnonzero(fixable)
    i = np.searchsorted(rows, out["row"].to_numpy(int)[at])
    remedy = out["remedy"].to_numpy(object).copy()
    mm = thickness[i] * 1000.0
    biggest = standard[-1] * 1000.0
    def text(base, mat, known, value):
        if not known:
            return (f"{base}; no remedy material known (no specification for the service and "
                    "no insulation installed): insulate per the plant specification")
        if np.isnan(value):
            return (f"{base}; no standard thickness of {mat} up to {biggest:.0f} mm clears "
                    "every check: engineer a solution")
        return f"insulate with {value:.3g} mm of {mat} (replacing what is there)"

    remedy[at] = per_distinct(text, remedy[at], material[i], has_material[i], mm)
    out["remedy"] = remedy
    thick = out["remedy_thickness [mm]"].to_numpy(float).copy()
    thick[at] = mm
    out["remedy_thickness [mm]"] = thick
    mats = out["remedy_material"].to_numpy(object).copy()
    mats[at] = np.where(np.isfinite(mm), material[i], "")
    out["remedy_material"] = mats
    return out


def _remedy_material(context: CheckContext, rows: np.ndarray) -> np.ndarray:
    """The governing specification's material (below-spec's choice of spec, so an item with no
    declared service gets the spec it would be held to), else the outermost installed one."""
    states = context.states("")
    spec = requirement(context.table, context.rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    layers = context.table["layer_materials"].to_numpy(object)[rows]
    out = np.asarray(spec.material, dtype=object)[rows].copy()
    for i, installed in enumerate(layers):
        if not out[i] and isinstance(installed, tuple) and installed:
            out[i] = installed[-1]
    return out
