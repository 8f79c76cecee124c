"""Remedies of the findings that insulation can fix: fix the cause first, never thin the insulation.

For every item with such a finding, in this order:

1. **The repair** (:func:`audit.checks.repairs.plan_repairs`, the same work the repair costs
   price): bare valves and flanges get removable covers (vapour-sealed on cold service), a
   damaged share is reinstated to the installed build-up, wet or missing insulation is put back
   as listed, and an item below its specification is insulated to it.  The checks the item
   failed are taken again on the repaired item (a trial, ``PreparedItems.repaired``); if they
   all pass, the repair is the remedy.
2. **More insulation**, only where the repair does not clear them: the insulation is replaced,
   in a trial (``PreparedItems.reinsulated``), by one intact layer of the remedy material with
   the fittings covered, and the smallest standard thickness that passes is found by bisection
   over the standard list, starting at the thickest of what is installed and what the
   specification asks: a remedy is never thinner than either.  Thicker insulation only helps
   the fixable checks, so bisection holds (below the critical radius of insulation, heat loss
   can rise with thickness; on such small lines the heat-loss check is the one exception, and
   the remedy found is the smallest thickness at which bisection saw it pass).  Each round
   re-evaluates only the checks each item failed, plus the checks every remedy must pass
   (``CheckKind.remedy_must_pass``: the remedy material must stand the temperature).
3. Where no standard thickness clears all of an item's failed checks together, each of them is
   searched on its own, so one check's impossibility does not spill into the remedy of another
   that a standard thickness clears; a check no standard thickness clears says "engineer a
   solution".

The remedy material is the material of the specification the item is held to (see
``below-spec``), else its outermost installed material; an item with neither gets a named
action without a thickness.  Where the check's rule allows a guard (``guard_allowed``), a
personnel guard is offered beside insulation.

Each remedy also says what it does as data, in ``remedy_action`` (``;``-joined
:data:`ACTIONS`), and so do the findings of ``condition`` checks: the work-order quantities
are counted from it (audit/report/workorders.py).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.checks.base import CheckContext
from audit.checks.below_spec import _EDGE_M, installed_thickness, requirement
from audit.checks.repairs import plan_repairs
from audit.repeats import map_values, per_distinct
from audit.thermal import fittings_of

GUARD = "; or fit a personnel guard over the hot surface instead"
#: What a remedy does, as ``remedy_action`` names it.
ACTIONS = {
    "covers": "removable covers on the uninsulated fittings (vapour-sealed on cold service)",
    "reinstate-damaged": "the damaged share reinstated to the installed build-up",
    "replace-wet": "wet insulation replaced like for like",
    "reinstate-missing": "missing insulation reinstated as listed",
    "replace-degraded": "insulation a field survey found degraded replaced like for like",
    "insulate": "the whole item insulated to remedy_thickness of remedy_material",
    "engineer": "no standard thickness clears the check: a solution to be engineered",
    "guard": "a personnel guard, offered beside the insulation (burn risk)",
}


def fill_remedies(context: CheckContext, findings: pd.DataFrame, kinds: dict, params: dict) -> pd.DataFrame:
    """``findings`` with ``remedy_thickness [mm]``, ``remedy_material`` and the remedy text
    completed for the findings that insulation can fix, and ``remedy_action`` for those and
    the ``condition`` findings."""
    findings = _condition_actions(context.table, findings, kinds, params)
    findings = _survey_actions(context, findings)
    if not len(findings) or not findings["fixable_by_insulation"].any() or not context.rules.thicknesses:
        return findings
    rules, table = context.rules, context.table
    fixable_findings = findings[findings["fixable_by_insulation"].astype(bool)]
    rows = np.unique(fixable_findings["row"].astype(int))
    recheck = [c for c in rules.checks.values() if c.enabled and
               (kinds[c.kind].fixable_by_insulation or kinds[c.kind].remedy_must_pass)]
    must_pass = {c.name for c in recheck if kinds[c.kind].remedy_must_pass}
    # Per check, which of the rows failed it (only those are re-checked), or all of them for
    # the checks every remedy must pass.
    failed = {c.name: np.ones(rows.size, bool) if c.name in must_pass else
              np.isin(rows, fixable_findings.loc[fixable_findings["check"] == c.name, "row"])
              for c in recheck}
    search = _Search(context, kinds, params, rows, recheck)

    spec_check = rules.checks.get("below-spec")
    spec_states = context.states(spec_check.site if spec_check else "")
    plan = plan_repairs(table, rules, spec_states, context.measured_repair)
    need = requirement(table, rules, spec_states["process_temp_K"].to_numpy(float),
                       spec_states["air_temp_K"].to_numpy(float))

    # 1. The repair, where there is one to make.
    repairable = np.flatnonzero(plan.needed[rows])
    repaired = np.zeros(rows.size, bool)
    if repairable.size:
        def repaired_trial(sub):
            items = rows[repairable[sub]]
            return context.prepared().take(items).repaired(
                plan.insulate[items], plan.to_spec[items], plan.spec_material[items],
                plan.thickness_m[items], plan.covers[items] > 0)
        repaired[repairable] = search.passes(repairable, failed, repaired_trial)

    # 2. More insulation, never thinner than installed or specified.
    material = _remedy_material(table, need.material, rows)
    material_index = map_values(material, context.tables()[1], -1, dtype=int)
    floor = np.maximum(installed_thickness(table)[rows], need.thickness_m[rows])
    standard = np.asarray(rules.thicknesses, float)
    start = np.searchsorted(standard, floor - _EDGE_M, side="left")
    insulate = np.flatnonzero(~repaired & (material != ""))
    thickness = np.full(rows.size, np.nan)
    thickness[insulate] = search.smallest(insulate, failed, start, material_index)

    # 3. Each failed check on its own where none clears them together.
    own = {}
    stuck = insulate[np.isnan(thickness[insulate])]
    for check in recheck:
        if check.name in must_pass:
            continue
        alone = stuck[failed[check.name][stuck]]
        if alone.size:
            only = {c.name: failed[c.name] if c.name in must_pass or c.name == check.name
                    else np.zeros(rows.size, bool) for c in recheck}
            own[check.name] = dict(zip(alone.tolist(), search.smallest(
                alone, only, start, material_index).tolist()))

    out = findings.copy()
    fixable = out["fixable_by_insulation"].astype(bool).to_numpy()
    at = np.flatnonzero(fixable)
    i = np.searchsorted(rows, out["row"].to_numpy(int)[at])
    checks = out["check"].to_numpy(object)[at]
    mm = thickness[i] * 1000.0
    for k, (item, check) in enumerate(zip(i.tolist(), checks.tolist())):
        if item in own.get(check, {}):
            mm[k] = own[check][item] * 1000.0
    installed_mm = installed_thickness(table)[rows][i] * 1000.0
    words_of_repair = _repair_words(table, plan, spec_states, rows[i])
    biggest = standard[-1] * 1000.0
    remedy = out["remedy"].to_numpy(object).copy()

    def text(base, mat, fixed_by_repair, repair_words, value, have, guard):
        # The check's own remedy (``base``) already offers a guard where its rule allows one.
        if fixed_by_repair:
            said = repair_words
        elif not mat:
            return (f"{base}; no remedy material known (no specification for the service and "
                    "no insulation installed): insulate per the plant specification")
        elif np.isnan(value):
            return (f"{base}; no standard thickness of {mat} from {have:.0f} mm (what is "
                    f"installed or specified) up to {biggest:.0f} mm clears this check: engineer "
                    "a solution")
        elif have > 0:
            said = (f"replace the insulation with {value:.3g} mm of {mat} (installed: "
                    f"{have:.3g} mm)")
        else:
            said = f"insulate with {value:.3g} mm of {mat}"
        return said + (GUARD if guard else "")

    guard = np.array([bool(params.get(c, {}).get("guard_allowed", False)) for c in checks])
    floor_mm = floor[i] * 1000.0
    remedy[at] = per_distinct(text, remedy[at], material[i], repaired[i], words_of_repair, mm,
                              np.where(np.isnan(mm), floor_mm, installed_mm), guard)
    out["remedy"] = remedy
    thick = out["remedy_thickness [mm]"].to_numpy(float).copy()
    thick[at] = np.where(repaired[i], _repair_thickness_mm(plan, rows[i]), mm)
    out["remedy_thickness [mm]"] = thick
    mats = out["remedy_material"].to_numpy(object).copy()
    mats[at] = np.where(repaired[i], np.where(plan.to_spec[rows[i]], plan.spec_material[rows[i]],
                                              ""),
                        np.where(np.isfinite(mm), material[i], ""))
    out["remedy_material"] = mats
    action = out["remedy_action"].to_numpy(object).copy()
    action[at] = per_distinct(_actions, *_repair_facts(table, plan, rows[i]), repaired[i],
                              material[i], np.isfinite(mm), guard)
    out["remedy_action"] = action
    return out


def _repair_facts(table: pd.DataFrame, plan, rows: np.ndarray) -> list[np.ndarray]:
    """Per row of ``rows``: (insulate, to_spec, share, condition, covers) of its repair."""
    return [plan.insulate[rows], plan.to_spec[rows], plan.share[rows],
            plan.condition(table)[rows], plan.covers[rows] > 0]


def _actions(insulate, to_spec, share, condition, covers, by_repair, material, thickness,
             guard) -> str:
    """``remedy_action`` of one fixable finding."""
    done = []
    if by_repair:
        if insulate and to_spec:
            done.append("insulate")
        elif insulate:
            done.append("replace-wet" if condition == "wet" else
                        "replace-degraded" if condition == "degraded" else
                        "reinstate-damaged" if share < 1 else "reinstate-missing")
        if covers:
            done.append("covers")
    else:
        done.append("insulate" if material and thickness else "engineer")
    return ";".join(done + ["guard"] * bool(guard))


def _survey_actions(context: CheckContext, findings: pd.DataFrame) -> pd.DataFrame:
    """``findings`` with ``remedy_action`` ``replace-degraded`` on the survey-deviation
    findings of the items the repair restores as installed (``CheckContext.measured_repair``):
    the work order then counts the whole item, the most that opening it up can find."""
    if context.measured_repair is None or not len(findings):
        return findings
    at = (findings["kind"].to_numpy(object) == "survey-deviation") & \
        context.measured_repair[findings["row"].to_numpy(int)]
    if not at.any():
        return findings
    out = findings.copy()
    out.loc[at, "remedy_action"] = "replace-degraded"
    return out


def _condition_actions(table: pd.DataFrame, findings: pd.DataFrame, kinds: dict,
                       params: dict) -> pd.DataFrame:
    """``findings`` with ``remedy_action`` of each finding of a kind remedied by repair (the
    ``condition`` check): the repairs its flags name that its row needs."""
    by_repair = [name for name, kind in kinds.items() if kind.remedied_by_repair]
    at = np.flatnonzero(np.isin(findings["kind"].to_numpy(object), by_repair)) \
        if len(findings) else []
    if not len(at):
        return findings
    rows = findings["row"].to_numpy(int)[at]
    condition = table["condition"].fillna("").to_numpy(object)[rows]
    share = np.nan_to_num(table["damaged_pct"].to_numpy(float))[rows]
    count = fittings_of(table, "valves") + fittings_of(table, "flanges")
    fittings = (table["shape"] == "pipe").to_numpy()[rows] & (count[rows] > 0)
    flags = [frozenset(params.get(c, {}).get("flags", ())) for c in findings["check"].to_numpy(object)[at]]
    out = findings.copy()
    action = out["remedy_action"].to_numpy(object).copy()
    action[at] = [";".join(name for name, hit, flag in (
        ("reinstate-missing", c == "missing", "missing"),
        ("reinstate-damaged", c == "damaged" and d > 0, "damaged"),
        ("replace-wet", c == "wet", "wet"), ("covers", f and c != "missing", "fittings"))
        if hit and flag in fl) for c, d, f, fl in zip(condition.tolist(), share.tolist(),
                                                      fittings.tolist(), flags)]
    out["remedy_action"] = action
    return out


class _Search:
    """Re-evaluating the failed checks of ``rows`` on trial items."""

    def __init__(self, context, kinds, params, rows, recheck):
        self.context, self.kinds, self.params = context, kinds, params
        self.rows, self.recheck = rows, recheck

    def passes(self, at: np.ndarray, failed: dict, trial_of) -> np.ndarray:
        """Whether rows[at] pass every check they failed (``failed``) on their trial items
        (``trial_of(sub)``: the trial of rows[at[sub]])."""
        ok = np.ones(at.size, bool)
        for check in self.recheck:
            sub = np.flatnonzero(failed[check.name][at])
            if sub.size == 0:
                continue
            trial_context = self.context.trial(trial_of(sub))
            verdict = self.kinds[check.kind].evaluate(trial_context, check, self.params[check.name])
            ok[sub[verdict.rows]] = False
            ok[sub[~trial_context.states(check.site)["computed"].to_numpy(bool)]] = False
        return ok

    def smallest(self, items: np.ndarray, failed: dict, start: np.ndarray,
                 material_index: np.ndarray) -> np.ndarray:
        """The smallest standard thickness [m], from ``start`` (an index into the standard
        list) up, at which each of ``items`` (positions in ``rows``) passes; NaN for none."""
        standard = np.asarray(self.context.rules.thicknesses, float)

        def passes_at(at, index):
            return self.passes(at, failed, lambda sub: self.context.prepared().take(
                self.rows[at[sub]]).reinsulated(material_index[at[sub]], standard[index[sub]]))

        low = start[items].copy()
        high = np.full(items.size, standard.size - 1)
        out = np.full(items.size, np.nan)
        searchable = low <= high  # an item thicker than every standard one has none
        candidates, low, high = items[searchable], low[searchable], high[searchable]
        while candidates.size and (low < high).any():
            open_ = low < high
            mid = (low + high) // 2
            ok = passes_at(candidates[open_], mid[open_])
            high[np.flatnonzero(open_)[ok]] = mid[open_][ok]
            low[np.flatnonzero(open_)[~ok]] = mid[open_][~ok] + 1
        # The thickest standard thickness is never tried by the bisection (mid < high): the
        # items that end there are tried at it last, and have no remedy if they fail it.
        top = np.flatnonzero(high == standard.size - 1)
        solvable = np.ones(candidates.size, bool)
        solvable[top] = passes_at(candidates[top], high[top])
        found = np.full(candidates.size, np.nan)
        found[solvable] = standard[high[solvable]]
        out[np.flatnonzero(searchable)] = found
        return out


def _remedy_material(table: pd.DataFrame, spec_material: np.ndarray, rows: np.ndarray) -> np.ndarray:
    """The governing specification's material (below-spec's choice of spec, so an item with no
    declared service gets the spec it would be held to), else the outermost installed one."""
    layers = table["layer_materials"].to_numpy(object)[rows]
    out = np.asarray(spec_material, dtype=object)[rows].copy()
    for i, installed in enumerate(layers):
        if not out[i] and isinstance(installed, tuple) and installed:
            out[i] = installed[-1]
    return out


def _repair_thickness_mm(plan, rows: np.ndarray) -> np.ndarray:
    """The thickness a repair orders [mm]: the specification's where it insulates to it; NaN
    for a repair that puts back what is installed (no new thickness)."""
    return np.where(plan.to_spec[rows], plan.thickness_m[rows] * 1000.0, np.nan)


def _repair_words(table: pd.DataFrame, plan, states: pd.DataFrame, rows: np.ndarray) -> np.ndarray:
    """The repair of each row in words, for a crew."""
    cold = (states["process_temp_K"].to_numpy(float) < states["air_temp_K"].to_numpy(float))[rows]
    valves, flanges = fittings_of(table, "valves")[rows], fittings_of(table, "flanges")[rows]
    condition = plan.condition(table)[rows]
    return per_distinct(
        _one_repair, plan.insulate[rows], plan.to_spec[rows], plan.share[rows],
        np.round(plan.thickness_m[rows] * 1000.0, 6), plan.spec_material[rows],
        table["layer_materials"].to_numpy(object)[rows],
        table["layer_thicknesses_m"].to_numpy(object)[rows], condition,
        (plan.covers[rows] > 0), valves, flanges, cold)


def _one_repair(insulate, to_spec, share, thickness_mm, spec_material, materials, thicknesses,
                condition, covers, valves, flanges, cold) -> str:
    parts = []
    if insulate and to_spec:
        parts.append(f"insulate to the specification: {thickness_mm:.3g} mm of {spec_material}")
    elif insulate:
        build_up = " + ".join(f"{m} {t * 1000:.3g} mm" for m, t in zip(materials, thicknesses))
        if condition == "wet":
            parts.append(f"replace the wet insulation like for like ({build_up}) and stop the "
                         "water getting in")
        elif condition == "degraded":
            parts.append(f"open up where the survey read hot; dry out or replace the insulation "
                         f"like for like ({build_up}) and make the jacket watertight")
        elif share < 1:
            parts.append(f"reinstate the damaged {share * 100:.3g} % of the length to the "
                         f"installed build-up ({build_up})")
        else:
            parts.append(f"reinstate the missing insulation as listed ({build_up})")
    if covers:
        fittings = " and ".join(f"{n:g} {what}{'s' if n != 1 else ''}" for n, what in
                                ((valves, "valve"), (flanges, "flange")) if n > 0)
        kind = "vapour-sealed insulated covers" if cold else "removable insulated covers"
        parts.append(f"fit {kind} to the bare fittings ({fittings})")
    return "; ".join(parts)
