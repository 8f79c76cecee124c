"""Energy and money: what each item's heat costs a year, what its repair saves, how fast it
pays back, and the economic insulation thickness.

``compute_economics`` runs after the checks on the audit's :class:`CheckContext`; the economic
inputs come from ``economic_rules(rules)`` (``rules/economics/economics.toml`` layered with the
``[economics]`` tables of each ``--rules`` folder by the main loader, see
:mod:`audit.economics.rules`).

Conditions: the heat is the engine's under the energy site, which is the site of the check
named by ``energy_check`` in the economic rules (``heat-loss-limit`` in the shipped file) when
the rules define it, else ``energy_site``.  Operating hours: the row's ``hours``, else the
economic rules' default (``--hours`` replaces that default for one run).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from audit.economics import totals
from audit.economics.energy import (BOIL_OFF, REFRIGERATION, UNPAID, HeatGainPayers,
                                    boil_off_kg_h, yearly)
from audit.checks.repairs import plan_repairs
from audit.economics.repair import payback_years
from audit.economics.rules import EconomicRules, economic_rules, load_economic_rules
from audit.economics.thickness import annuity_factor, economic_thickness
from audit.errors import RuleError
from audit.repeats import map_values, per_distinct
from audit.thermal import fluid_column, prepared_states

__all__ = ["Economics", "EconomicRules", "compute_economics", "economic_rules", "energy_site",
           "load_economic_rules"]

#: Per-row columns, in order (the first six are the contract's energy columns):
#: ``annual_energy [MWh]`` heat lost (or, cold service, gained) in a year of ``hours [h]``;
#: ``annual_fuel [MWh]`` the energy bought for it (``energy_bought``: fuel over the heater's
#: efficiency, or electricity over the refrigeration COP; 0 for a heat gain paid by boil-off
#: or not at all); ``annual_cost`` and ``annual_co2 [t]`` of that energy, or of the product
#: boiled off (``energy_bought``: fuel, electricity, boil-off or none); ``saving_if_repaired [MWh]`` energy bought as is minus repaired (0 when
#: nothing is to be repaired); ``payback [yr]`` = ``repair_cost`` / ``annual_saving`` (money
#: per year), empty when nothing is to be repaired or the repair saves nothing; ``repair`` what
#: the repair is; ``repair_cost`` the row's work as its work order prices it
#: (:mod:`audit.planning`); ``installed_thickness [mm]``; ``economic_thickness [mm]`` of
#: ``economic_material``; ``economics_note`` why a value is empty; ``annual_boil_off [t]`` the
#: liquid a boiling liquid's heat gain boils off in the year; ``boil_off [kg/h]`` the same at
#: the item's own conditions (those of ``heat_loss [W]``), as the contract's columns are.  NaN for rows without a result.
COLUMNS = ["annual_energy [MWh]", "annual_fuel [MWh]", "annual_cost", "annual_co2 [t]",
           "saving_if_repaired [MWh]", "payback [yr]", "energy_bought", "hours [h]",
           "repair", "repair_cost", "annual_saving", "installed_thickness [mm]",
           "economic_thickness [mm]", "economic_material", "economics_note",
           "boil_off [kg/h]", "annual_boil_off [t]"]


@dataclass
class Economics:
    """Everything the economics produced, for the results table and the reports."""

    per_row: pd.DataFrame      #: aligned with the item table's rows; columns COLUMNS
    currency: str
    by_area: pd.DataFrame      #: sums per area code
    by_check: pd.DataFrame     #: sums over the items each check flags (overlapping)
    plant: dict                #: the plant's sums
    top_repairs: pd.DataFrame  #: the 20 repairs with the shortest payback
    assumptions: list          #: [{"what", "value", "source"}] for the report's cover
    site: str                  #: the site condition the energy is reckoned under
    warnings: list = field(default_factory=list)  #: for the report's cover (currencies)

    @property
    def totals(self) -> dict:
        return {"by_area": self.by_area, "by_check": self.by_check, "plant": self.plant}


def energy_site(rules, economic_rules: EconomicRules) -> str:
    """The site the energy is reckoned under ("" = each item's own conditions)."""
    check = rules.checks.get(economic_rules.energy_check) if economic_rules.energy_check else None
    site = check.site if check is not None else economic_rules.energy_site
    if site and site not in rules.sites:
        raise RuleError(f"economics energy_site {site!r} is not a site condition in the rules",
                        file=economic_rules.files[-1] if economic_rules.files else None,
                        column="economics.energy_site", value=site,
                        expected="one of " + ", ".join(sorted(rules.sites)))
    return site


def compute_economics(context, findings, rules, *, economic_rules: EconomicRules,
                      repairs, fuel_price=None, hours=None) -> Economics:
    """Energy, cost, CO2, repair savings and payback, and economic thickness of every row.

    Parameters
    ----------
    context : CheckContext
        The audit's context (item table, rules, states per site, solved once each).
    findings : pandas.DataFrame
        The findings table (``row``, ``check``), for the totals by check.
    rules : Rules
        The audit's rules (sites, checks, specifications, standard thicknesses).
    economic_rules : EconomicRules
        From :func:`load_economic_rules`.
    repairs : audit.planning.RowPlans
        The planned work of each row (:func:`audit.planning.plan_rows`): its ``repair_cost``
        (installed cost, guards, scaffold [currency], NaN where nothing is planned) is the one
        number of the results, the payback and the work orders; ``planned`` says which rows.
    fuel_price : float, optional
        This run's fuel price, currency per the ``price_per`` unit of ``[economics.heat]``.
    hours : float, optional
        This run's default operating hours for rows without hours [h/yr].
    """
    econ = economic_rules.with_overrides(fuel_price=fuel_price, hours=hours)
    # Energy is the whole item's: where a survey measured it, at the survey's whole-item
    # condition (audit.survey.item_factors).
    context = context.for_whole_item()
    table = context.table
    site = energy_site(rules, econ)
    states = context.states(site)
    row_hours = table["hours_h"].to_numpy(float)
    hours_h = np.where(np.isfinite(row_hours), row_hours, econ.hours)
    payers = heat_gain_payers(table, rules)
    own = context.states("")
    now = yearly(states["heat_loss_W"].to_numpy(float), hours_h, econ, payers)

    spec_check = rules.checks.get("below-spec")
    plan = plan_repairs(table, rules, context.states(spec_check.site if spec_check else ""),
                        context.measured_repair)
    repaired = prepared_states(
        context.prepared().repaired(plan.insulate, plan.to_spec, plan.spec_material,
                                    plan.thickness_m, plan.covers > 0),
        rules, site=site or None, surface_model=context.surface_model, tables=context.tables(),
        index=table.index)
    after = yearly(repaired["heat_loss_W"].to_numpy(float), hours_h, econ, payers)
    fixed = repaired["computed"].to_numpy(bool)
    saving_mwh = np.where(plan.needed, np.where(fixed, now["bought [MWh]"] - after["bought [MWh]"], np.nan),
                          0.0)
    saving_money = np.where(plan.needed, np.where(fixed, now["cost"] - after["cost"], np.nan), 0.0)
    cost, planned = repairs.repair_cost, repairs.planned
    computed = states["computed"].to_numpy(bool)

    material = np.where(plan.spec_material != "", plan.spec_material, _outermost(table)).astype(object)
    economic, at_edge = economic_thickness(context, econ, site=site, hours_h=hours_h, payers=payers,
                                           material=material, edge=True)

    def known(values):
        return np.where(computed, values, np.nan)

    per_row = pd.DataFrame({
        "annual_energy [MWh]": known(now["heat [MWh]"]),
        "annual_fuel [MWh]": known(now["bought [MWh]"]),
        "annual_cost": known(now["cost"]),
        "annual_co2 [t]": known(now["co2 [t]"]),
        "saving_if_repaired [MWh]": known(saving_mwh),
        "payback [yr]": known(payback_years(cost, saving_money, plan.needed & (cost > 0))),
        "energy_bought": np.where(computed, _carrier(now["mode"]), "").astype(object),
        "hours [h]": np.where(computed, hours_h, np.nan),
        "repair": np.where(computed, plan.scope(), "").astype(object),
        "repair_cost": known(cost),
        "annual_saving": known(saving_money),
        "installed_thickness [mm]": np.where(table["status"] == "ok", plan.installed_m * 1000.0, np.nan),
        "economic_thickness [mm]": economic * 1000.0,
        "economic_material": np.where(np.isfinite(economic), material, "").astype(object),
        "boil_off [kg/h]": boil_off_kg_h(own["heat_loss_W"].to_numpy(float), payers.latent_heat),
        "annual_boil_off [t]": known(now["boil_off [t]"]),
        "economics_note": _notes(computed, [
            (plan.needed & ~fixed, "the repaired item could not be computed by the engine"),
            (plan.needed & ~planned, "no repair cost: no work order for a finding of this row"),
            (planned & ~plan.needed & (cost > 0),
             "no payback: the planned work (repair_cost: an inspection, a guard, insulation "
             "beyond the specification) saves nothing against the item as specified"),
            (plan.needed & fixed & planned & ~np.isfinite(cost),
             "no repair cost: thickness or fitting size outside the [economics.repair] or "
             "[planning.labour] tables"),
            (plan.needed & fixed & (saving_money <= 0), "the repair saves no money: no payback"),
            (material == "", "no economic thickness: no specification or installed material"),
            ((material != "") & ~np.isfinite(economic),
             "no economic thickness: item at ambient, or no standard thickness could be costed"),
            (at_edge & (economic >= max(rules.thicknesses, default=np.inf)),
             "economic thickness is the thickest standard one: the optimum may lie beyond"),
            (at_edge & (economic < max(rules.thicknesses, default=np.inf)),
             "economic thickness is the thickest one the [economics.repair] cost table prices: "
             "the optimum may lie beyond")]),
    }, index=table.index, columns=COLUMNS)
    if context.registered is not None:
        per_row = per_row.join(_missed(now, site, hours_h, econ, payers, context, computed))

    return Economics(
        per_row=per_row, currency=econ.currency,
        by_area=totals.by_area(per_row, table["area_code"]),
        by_check=totals.by_check(per_row, findings),
        plant=totals.plant(per_row),
        top_repairs=totals.top_repairs(per_row, table),
        assumptions=econ.assumptions() + [
            {"what": "energy conditions", "value": site or "each item's own conditions",
             "source": f"the site of check {econ.energy_check!r}" if econ.energy_check in rules.checks
             else "economics energy_site"},
            {"what": "annuity factor", "value": f"{float(annuity_factor(econ.interest, econ.life)):.5f} /yr",
             "source": "i(1+i)^n/((1+i)^n-1) of the interest rate and service life (VDI 2055)"}],
        site=site, warnings=econ.currency_warnings())


#: With a survey: per row, what the register-only audit missed of the year's heat and its
#: cost (the item at its measured whole-item condition minus the same item as registered);
#: NaN for items without a measured condition.
MISSED_COLUMNS = ["missed_energy [MWh]", "missed_cost"]


def _missed(now: dict, site, hours_h, econ, payers, context, computed) -> pd.DataFrame:
    """:data:`MISSED_COLUMNS`: ``now`` (the year at the measured condition) against the same
    items as registered (``context.registered``, solved here under the energy ``site``)."""
    table = context.table
    as_registered = prepared_states(context.registered, context.rules, site=site or None,
                                    surface_model=context.surface_model, tables=context.tables(),
                                    index=table.index)
    then = yearly(as_registered["heat_loss_W"].to_numpy(float), hours_h, econ, payers)
    measured = np.isfinite(context.measured_factor) & computed
    return pd.DataFrame({
        "missed_energy [MWh]": np.where(measured, now["heat [MWh]"] - then["heat [MWh]"], np.nan),
        "missed_cost": np.where(measured, now["cost"] - then["cost"], np.nan)},
        index=table.index)


def heat_gain_payers(table: pd.DataFrame, rules) -> HeatGainPayers:
    """Per row, who pays for a heat gain: its fluid's ``heat_gain`` (refrigeration for a row
    without a fluid, as for a fluid the rules lack: such a row is rejected anyway)."""
    fluid = fluid_column(table)
    fluids = rules.fluids
    codes = {"refrigeration": REFRIGERATION, "boil-off": BOIL_OFF, "none": UNPAID}
    return HeatGainPayers(
        mode=map_values(fluid, {n: codes[f.heat_gain] for n, f in fluids.items()},
                        REFRIGERATION, dtype=int),
        latent_heat=map_values(fluid, {n: f.latent_heat for n, f in fluids.items()}),
        price=map_values(fluid, {n: f.price for n, f in fluids.items()}),
        co2=map_values(fluid, {n: f.co2 for n, f in fluids.items()}))


def _carrier(mode: np.ndarray) -> np.ndarray:
    """What pays for each row's heat: fuel (a loss), electricity, boil-off or nothing."""
    words = np.array(["fuel", "electricity", "boil-off", "none"], dtype=object)
    return words[np.asarray(mode, int) + 1]


def _outermost(table: pd.DataFrame) -> np.ndarray:
    """The outermost installed material of each row ("" if none)."""
    return per_distinct(lambda x: x[-1] if isinstance(x, tuple) and x else "",
                        table["layer_materials"].to_numpy(object))


def _notes(computed, reasons) -> np.ndarray:
    """"; "-joined reasons per row, for rows with a result (empty elsewhere)."""
    out = pd.Series("", index=range(len(computed)), dtype=object)
    for mask, text in reasons:
        hit = pd.Series(np.asarray(mask, bool) & computed)
        out[hit] = np.where(out[hit] == "", text, out[hit] + "; " + text)
    return out.to_numpy(object)
