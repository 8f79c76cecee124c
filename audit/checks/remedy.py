"""Remedies that fix the cause, and never thin the insulation.

For each finding that insulation can fix (``fixable_by_insulation``), the remedy is found in
this order, for the whole register at once, one check at a time:

1. **Bare parts.**  An insulated item with uninsulated fittings (pipes), a damaged share, wet
   insulation or insulation missing is tried as installed, made good: its own listed layers,
   intact and dry, its fittings covered (``PreparedItems.repaired``).  When the check passes
   on that trial, the bare parts are the cause, and the remedy names them: removable covers
   on the fittings (vapour-sealed on cold service), the damaged share reinstated to the
   installed build-up, wet insulation replaced like for like, missing insulation reinstated.
   No thickness is ordered.
2. **The build-up itself fails** (or the item has none): the insulation is brought to the
   smallest standard thickness of the remedy material that clears *that* check (and the
   checks every remedy must pass, ``CheckKind.remedy_must_pass``: ``layer-overheat``), never
   thinner than the installed total nor than the governing specification accepts (the
   ``below-spec`` rule: its requirement less its tolerance).  Each check is searched on its
   own, so a check that no standard thickness clears ("engineer a solution") does not spill
   into the remedy of another check on the same item.  The search bisects the standard list
   from that floor: about log2(n) rounds, then one round at the thickest standard thickness
   for the items that end there.  (Below the critical radius heat loss can rise with
   thickness; the heat-loss remedy is then the smallest thickness at which bisection saw it
   pass.)

Where a check's rule sets ``guard_allowed``, a personnel guard is offered beside the remedy.

Each fixable finding gets ``remedy_action``, the ``;``-joined actions its remedy takes
(:data:`ACTIONS`); the findings of ``condition`` checks get the actions of their flags too.
The work-order quantities are counted from these actions (audit/report/workorders.py).

The remedy material is the governing specification's material (see ``below-spec``), else the
outermost installed material; an item with neither gets a named action without a thickness.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.checks.base import CheckContext, cold_service
from audit.checks.below_spec import requirement
from audit.repeats import map_values, per_distinct
from audit.thermal import has_layers

#: Actions a remedy takes, as ``remedy_action`` names them.
ACTIONS = {
    "covers": "removable insulation covers on the uninsulated fittings",
    "reinstate-damaged": "the damaged share reinstated to the installed build-up",
    "replace-wet": "wet insulation replaced with the installed build-up",
    "reinstate-missing": "missing insulation reinstated to the installed build-up",
    "insulate": "insulation brought to remedy_thickness of remedy_material over the whole item",
    "engineer": "no standard thickness clears the check: a solution to be engineered",
    "guard": "a personnel guard, offered beside the insulation remedy (burn risk)",
}
#: Slack on the thickness floor [m]: 65 mm written in a register and in a rule file meet.
_EDGE_M = 1e-9


def fill_remedies(context: CheckContext, findings: pd.DataFrame, kinds: dict, params: dict) -> pd.DataFrame:
    """``findings`` with ``remedy``, ``remedy_action``, ``remedy_thickness [mm]`` and
    ``remedy_material`` completed for the findings that insulation can fix, and
    ``remedy_action`` for the ``condition`` findings."""
    if not len(findings):
        return findings
    out = findings.copy()
    facts = _Facts(context, kinds)
    action = out["remedy_action"].to_numpy(object).copy()
    kind_of = out["kind"].to_numpy(object)
    rows_of = out["row"].to_numpy(int)
    for name in np.unique(out["check"].to_numpy(object)[kind_of == "condition"]):
        at = np.flatnonzero(out["check"].to_numpy(object) == name)
        action[at] = facts.condition_actions(rows_of[at], params.get(name, {}).get("flags", ()))
    out["remedy_action"] = action
    fixable = out["fixable_by_insulation"].astype(bool).to_numpy()
    if not fixable.any():
        return out
    at = np.flatnonzero(fixable)
    checks = out["check"].to_numpy(object)[at]
    rows = rows_of[at]
    # 1. Bare parts: does the installed build-up, made good, clear the check?
    cause_bare = np.zeros(at.size, bool)
    for name in np.unique(checks):
        mine = np.flatnonzero((checks == name) & facts.bare_parts[rows])
        if mine.size:
            check = context.rules.checks[name]
            trial = context.trial(context.prepared().take(rows[mine]).repaired(
                np.ones(mine.size, bool), np.zeros(mine.size, bool), np.full(mine.size, ""),
                np.full(mine.size, np.nan), np.ones(mine.size, bool)))
            verdict = kinds[check.kind].evaluate(trial, check, params[name])
            ok = trial.states(check.site)["computed"].to_numpy(bool).copy()
            ok[verdict.rows] = False
            cause_bare[mine] = ok
    # 2. The build-up fails: the smallest standard thickness clearing that check.
    search = np.flatnonzero(~cause_bare)
    thickness = np.full(at.size, np.nan)
    if search.size and context.rules.thicknesses:
        thickness[search] = _search(context, kinds, params, rows[search], checks[search],
                                    facts)
    guard = np.array([bool(params.get(c, {}).get("guard_allowed", False)) for c in checks]) \
        if at.size else np.zeros(0, bool)

    remedy = out["remedy"].to_numpy(object).copy()
    mm = thickness * 1000.0
    biggest = max(context.rules.thicknesses, default=np.nan) * 1000.0
    remedy[at], action[at] = _words(facts, rows, checks, cause_bare, mm, guard, biggest)
    out["remedy"] = remedy
    out["remedy_action"] = action
    thick = out["remedy_thickness [mm]"].to_numpy(float).copy()
    thick[at] = mm
    out["remedy_thickness [mm]"] = thick
    mats = out["remedy_material"].to_numpy(object).copy()
    mats[at] = np.where(np.isfinite(mm), facts.material[rows], "")
    out["remedy_material"] = mats
    return out


class _Facts:
    """What the remedies read of each row of the item table (arrays aligned with its rows)."""

    def __init__(self, context: CheckContext, kinds: dict):
        table, rules = context.table, context.rules
        self.table = table
        self.insulated = context.once(has_layers)
        condition = table["condition"].fillna("").to_numpy(object)
        self.damaged_pct = np.nan_to_num(table["damaged_pct"].to_numpy(float))
        self.damaged = self.insulated & (condition == "damaged") & (self.damaged_pct > 0)
        self.wet = self.insulated & (condition == "wet")
        self.missing = self.insulated & (condition == "missing")
        pipe = (table["shape"] == "pipe").to_numpy()
        self.valves = np.nan_to_num(pd.to_numeric(table["valves"], errors="coerce").to_numpy(float))
        self.flanges = np.nan_to_num(pd.to_numeric(table["flanges"], errors="coerce").to_numpy(float))
        self.pipe_fittings = pipe & (self.valves + self.flanges > 0)
        self.fittings = self.insulated & self.pipe_fittings
        self.bare_parts = (self.fittings | self.damaged | self.wet | self.missing) & \
            (table["status"] == "ok").to_numpy()
        self.listed_m = per_distinct(lambda x: float(sum(x)) if isinstance(x, tuple) else 0.0,
                                     table["layer_thicknesses_m"].to_numpy(object)).astype(float)
        self.build_up = per_distinct(
            lambda m, t: " + ".join(f"{a} {b * 1000:.0f} mm" for a, b in zip(m, t))
            if isinstance(m, tuple) and m else "", table["layer_materials"].to_numpy(object),
            table["layer_thicknesses_m"].to_numpy(object))
        # The specification as below-spec judges it (under its site).
        spec_check = next((c for c in rules.checks.values() if c.enabled and c.kind == "below-spec"),
                          None)
        states = context.states(spec_check.site if spec_check is not None else "")
        self.need = requirement(table, rules, states["process_temp_K"].to_numpy(float),
                                states["air_temp_K"].to_numpy(float))
        self.cold = cold_service(context)
        self.material = np.asarray(self.need.material, dtype=object).copy()
        outermost = per_distinct(lambda x: x[-1] if isinstance(x, tuple) and x else "",
                                 table["layer_materials"].to_numpy(object))
        self.material[self.material == ""] = outermost[self.material == ""]
        # Never thinner than installed, nor than the specification accepts.
        self.floor_m = np.maximum(np.where(self.insulated, self.listed_m, 0.0),
                                  np.where(self.need.thickness_m > 0,
                                           self.need.thickness_m - self.need.tolerance_m, 0.0))

    def condition_actions(self, rows: np.ndarray, flags) -> np.ndarray:
        """Actions of a ``condition`` check's findings on ``rows``, for the ``flags`` it checks."""
        flags = set(flags)
        parts = [(self.missing, "missing", "reinstate-missing"),
                 (self.damaged, "damaged", "reinstate-damaged"),
                 (self.wet, "wet", "replace-wet"), (self.fittings, "fittings", "covers")]
        words = [np.where(mask[rows], name, "") for mask, flag, name in parts if flag in flags]
        return _joined(words, rows.size)

    def fittings_words(self, row: int) -> str:
        pieces = [f"{n:g} {w}{'' if n == 1 else 's'}" for n, w in
                  ((self.valves[row], "valve"), (self.flanges[row], "flange")) if n > 0]
        return " and ".join(pieces)


def _joined(words: list, n: int) -> np.ndarray:
    """Per position, the non-empty ``words`` joined by ';'."""
    out = np.full(n, "", dtype=object)
    for w in words:
        w = np.asarray(w, dtype=object)
        out = np.where(w == "", out, np.where(out == "", w, out + ";" + w))
    return out


def _search(context, kinds, params, rows, checks, facts) -> np.ndarray:
    """Smallest standard thickness [m] of the row's remedy material, at or above its floor,
    that clears each (row, check) pair and every must-pass check; NaN where none does."""
    rules = context.rules
    standard = np.asarray(rules.thicknesses, float)
    material_index = map_values(facts.material[rows], context.tables()[1], -1, dtype=int)
    must_pass = [c for c in rules.checks.values() if c.enabled and kinds[c.kind].remedy_must_pass]

    def passes(at: np.ndarray, index: np.ndarray) -> np.ndarray:
        """Whether pairs[at] pass their own check and the must-pass ones at standard[index]."""
        ok = np.ones(at.size, bool)
        for name in np.unique(checks[at]):
            sub = np.flatnonzero(checks[at] == name)
            ok[sub] &= _clears(context, kinds, params, rules.checks[name], rows[at[sub]],
                               material_index[at[sub]], standard[index[sub]])
        if must_pass and at.size:
            # Once per distinct (row, thickness): several checks of a row share the trial.
            keys = np.stack([rows[at], index])
            (unique_rows, unique_index), back = np.unique(keys, axis=1, return_inverse=True)
            first = np.zeros(unique_rows.size, int)
            first[back.ravel()] = np.arange(at.size)
            for check in must_pass:
                good = _clears(context, kinds, params, check, unique_rows,
                               material_index[at[first]], standard[unique_index])
                ok &= good[back.ravel()]
        return ok

    n = rows.size
    low = np.searchsorted(standard, facts.floor_m[rows] - _EDGE_M, side="left")
    known = (facts.material[rows] != "") & (low < standard.size)
    candidates = np.flatnonzero(known)
    low = low[candidates]
    high = np.full(candidates.size, standard.size - 1)
    while (low < high).any():
        open_ = low < high
        mid = (low + high) // 2
        ok = passes(candidates[open_], mid[open_])
        high[np.flatnonzero(open_)[ok]] = mid[open_][ok]
        low[np.flatnonzero(open_)[~ok]] = mid[open_][~ok] + 1
    # The thickest standard thickness is never tried by the bisection (mid < high): the
    # pairs that end there are tried at it last, and have no remedy if they fail it.
    top = np.flatnonzero(high == standard.size - 1)
    solvable = np.ones(candidates.size, bool)
    solvable[top] = passes(candidates[top], high[top])
    out = np.full(n, np.nan)
    out[candidates[solvable]] = standard[high[solvable]]
    return out


def _clears(context, kinds, params, check, rows, material_index, thickness) -> np.ndarray:
    """Whether ``check`` passes on ``rows`` re-insulated with one intact layer each (fittings
    covered) and computed under its site."""
    trial = context.trial(context.prepared().take(rows).reinsulated(material_index, thickness))
    verdict = kinds[check.kind].evaluate(trial, check, params[check.name])
    ok = trial.states(check.site)["computed"].to_numpy(bool).copy()
    ok[verdict.rows] = False
    return ok


def _words(facts, rows, checks, cause_bare, mm, guard, biggest) -> tuple[np.ndarray, np.ndarray]:
    """(remedy text, remedy_action) of each fixable finding."""
    texts, actions = [], []
    need_mm = facts.need.thickness_m * 1000.0
    for row, check, bare, t, offer in zip(rows.tolist(), checks.tolist(), cause_bare.tolist(),
                                          mm.tolist(), guard.tolist()):
        build = facts.build_up[row]
        cold = bool(facts.cold[row])
        done, did = [], []
        if bare:
            if facts.fittings[row]:
                done.append(f"fit removable {'vapour-sealed ' if cold else ''}insulation covers "
                            f"on the {facts.fittings_words(row)}")
                did.append("covers")
            if facts.missing[row]:
                done.append(f"reinstate the missing insulation to the installed build-up ({build})")
                did.append("reinstate-missing")
            if facts.damaged[row]:
                done.append(f"reinstate the damaged share ({facts.damaged_pct[row]:g} %) to the "
                            f"installed build-up ({build})")
                did.append("reinstate-damaged")
            if facts.wet[row]:
                done.append(f"replace the wet insulation with the installed build-up ({build}) "
                            "and stop the water entry")
                did.append("replace-wet")
            text = "; ".join(done) + f" (the installed build-up then clears {check})"
            if offer:
                text += "; or fit a personnel guard over the bare parts"
        else:
            material = facts.material[row]
            installed = (f"installed {facts.listed_m[row] * 1000:.0f} mm" if facts.insulated[row]
                         else "none installed")
            spec = (f", {facts.need.spec[row]} specification {need_mm[row]:.0f} mm"
                    if need_mm[row] > 0 else "")
            if not material:
                text = ("no remedy material known (no specification for the service and no "
                        f"insulation installed): insulate per the plant specification to clear {check}")
                did.append("engineer")
            elif np.isnan(t):
                floor = facts.floor_m[row] * 1000.0
                text = (f"no standard thickness of {material} from {floor:.0f} mm ({installed}{spec}) "
                        f"up to {biggest:.0f} mm clears {check}: engineer a solution")
                did.append("engineer")
            else:
                text = (f"bring the insulation to {t:.3g} mm of {material} over the whole item "
                        f"({installed}{spec})" + (", with a sealed vapour retarder" if cold else "")
                        + (f", and cover the {facts.fittings_words(row)}" if facts.pipe_fittings[row]
                           else "") + f" to clear {check}")
                did.append("insulate")
            if offer:
                text += "; or fit a personnel guard over the hot surface"
        if offer:
            did.append("guard")
        texts.append(text)
        actions.append(";".join(did))
    return np.array(texts, dtype=object), np.array(actions, dtype=object)
