"""One audit, start to finish, without files written: what ``lagaudit run`` does.

read -> resolve names against the rules -> thermal states (own conditions) -> checks ->
remedies -> results table.  Writers and the command line take it from here.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from audit.checks import check_kinds, run_checks, summarise_per_row, validate_checks
from audit.checks.base import CheckContext
from audit.checks.remedy import fill_remedies
from audit.coldweather import result_columns as cold_weather_columns
from audit.economics import Economics, EconomicRules, compute_economics
from audit.economics import economic_rules as economic_rules_of
from audit.heap import give_back
from audit.io.readers import read_register, reader_options
from audit.io.readers.survey import read_survey
from audit.planning import ROW_COLUMNS, PlanningRules, RowPlans, plan_rows, planning_rules
from audit.results import build_results
from audit.rules import Rules, load_rules
from audit.survey import item_factors, more_heat_than_predicted, reconcile, result_columns
from audit.thermal import resolve_names


@dataclass
class Audit:
    """Everything one audit produced."""

    rules: Rules
    table: pd.DataFrame      #: the item table, names resolved
    results: pd.DataFrame    #: one row per input row (contract columns first)
    findings: pd.DataFrame   #: one row per finding
    economics: Economics     #: energy, money, CO2, repairs, economic thickness, totals
    states: pd.DataFrame     #: thermal states at each item's own conditions (index of table)
    history: object = None   #: with --history: this audit beside the last (audit.history.SinceLast)
    survey: pd.DataFrame | None = None  #: with --survey: every reading, reconciled (audit.survey)
    planning: RowPlans | None = None  #: each row's planned work, hours and cost (audit.planning)


def measured_context(context: CheckContext, deviations: dict) -> CheckContext:
    """Measured beats assumed: the audit's context (its ``survey`` reconciled) with every
    item the survey-deviation checks flagged (``deviations``: their findings) at the
    condition its readings measured (:func:`audit.survey.item_factors`): the spot condition
    (the largest factor, where above 1) for the checks of one spot, and beside it
    (``whole_item``) the whole-item condition (the mean factor) for the heat loss, the energy
    and the money; ``registered`` keeps the items as registered.  An item whose readings all
    lie within the margin stays as registered: the readings confirm it, and a factor read
    from a few kelvin (near the air, a kelvin moves the factor several-fold) would be noise.
    Where the survey found more heat through the insulation, the repair restores it as
    installed (``measured_repair``)."""
    table, registered, survey = context.table, context.prepared(), context.survey
    flagged = np.zeros(len(table), bool)
    for found in deviations.values():
        flagged[found["row"].to_numpy(int)] = True
    local, whole = (np.where(flagged, f, np.nan) for f in item_factors(survey, table.index))
    repair = flagged & more_heat_than_predicted(survey, table.index)

    def at(factor):
        return CheckContext(table, context.rules, surface_model=context.surface_model,
                            survey=survey, _tables=context.tables(),
                            _prepared=registered.measured(factor), measured_factor=factor,
                            registered=registered, measured_repair=repair)

    out = at(local)
    # One context (one solve per case) where both conditions agree, as without readings.
    same = np.array_equal(local, whole, equal_nan=True)
    out.whole_item = out if same else at(whole)
    return out


def finding_basis(findings: pd.DataFrame, context: CheckContext) -> tuple[np.ndarray, np.ndarray]:
    """Per finding: ``measured`` where a field reading decided it (a survey-deviation finding,
    or a check of the thermal state on an item carrying a measured condition), else
    ``register``; and the condition factor [-] the check judged the item at (NaN: none, and
    for the survey-deviation findings, which say their own)."""
    kinds = check_kinds()
    rows = findings["row"].to_numpy(int)
    kind = findings["kind"].to_numpy(object)
    whole = np.array([kinds[k].whole_item for k in kind], dtype=bool)
    thermal = np.array([kinds[k].thermal for k in kind], dtype=bool)
    factor = np.where(whole, context.whole_item.measured_factor[rows],
                      context.measured_factor[rows]) if rows.size else np.empty(0)
    factor = np.where(thermal & (kind != "survey-deviation"), factor, np.nan)
    return np.where((kind == "survey-deviation") | np.isfinite(factor), "measured",
                    "register"), factor


def audit_register(registers, *, rules_dirs=(), sheets=None, surface_model="correlations",
                   rules: Rules | None = None, fuel_price=None, hours=None,
                   survey=None) -> Audit:
    """Run the whole audit on register files.

    ``fuel_price`` and ``hours`` override the economic rules' fuel price and default operating
    hours for this run.  ``survey``: survey files of field readings
    (:func:`audit.io.readers.survey.read_survey`).  Every rule file is read and validated
    before any register is.
    """
    rules = load_rules(rules_dirs) if rules is None else rules
    params = validate_checks(rules)
    economics = economic_rules_of(rules)
    planning = planning_rules(rules)
    table = resolve_names(read_register(registers, sheets=sheets, **reader_options(rules)), rules)
    readings = read_survey(survey) if survey else None
    return audit_table(table, rules, surface_model=surface_model, params=params,
                       economic_rules=economics, planning=planning, fuel_price=fuel_price,
                       hours=hours, readings=readings)


def audit_table(table: pd.DataFrame, rules: Rules, *, surface_model="correlations",
                params=None, economic_rules: EconomicRules | None = None,
                planning: PlanningRules | None = None, fuel_price=None,
                hours=None, readings: pd.DataFrame | None = None) -> Audit:
    """Run the audit on an item table whose names are already resolved; the economic and
    planning rules are those the rules carry unless given; ``readings`` (field readings, as
    :func:`audit.io.readers.survey.read_survey` returns them) are reconciled with the items,
    and findings then say their ``basis`` (``measured`` where a reading drove them)."""
    params = validate_checks(rules) if params is None else params
    economic_rules = economic_rules_of(rules) if economic_rules is None else economic_rules
    planning = planning_rules(rules) if planning is None else planning
    # pandas deep-copies ``attrs`` (the reader's summary) into every table an operation makes;
    # the audit does not read it, and thousands of copies add up.
    table = table.copy(deep=False)
    table.attrs = {}
    context = CheckContext(table, rules, surface_model=surface_model)
    done = {}
    if readings is not None:
        context.survey = reconcile(readings, table, rules, prepared=context.prepared(),
                                   tables=context.tables(), surface_model=surface_model)
        kinds = check_kinds()
        done = {check.name: kinds[check.kind].findings(context, check, params[check.name])
                for check in rules.checks.values()
                if check.enabled and check.kind == "survey-deviation"}
        context = measured_context(context, done)
    findings = run_checks(context, params, done=done)
    findings = fill_remedies(context, findings, check_kinds(), params)
    states = context.states("")
    repairs = plan_rows(table, states, findings, planning, economic_rules.repair)
    economics = compute_economics(context, findings, rules, economic_rules=economic_rules,
                                  repairs=repairs, fuel_price=fuel_price, hours=hours)
    names, worst = summarise_per_row(findings, len(table))
    extra = pd.concat([economics.per_row.reset_index(drop=True),
                       repairs.frame[ROW_COLUMNS].reset_index(drop=True),
                       cold_weather_columns(context, params)], axis=1)
    if readings is not None:
        findings["basis"], factor = finding_basis(findings, context)
        said = findings["basis"].eq("measured").to_numpy() & np.isfinite(factor)
        findings.loc[said, "message"] = [
            f"{message} (as measured: the field survey's condition factor {f:.2g} on the "
            "insulation's conductivity)" for message, f in zip(findings.loc[said, "message"],
                                                              factor[said])]
        basis = np.isfinite(context.measured_factor) | np.isfinite(
            context.whole_item.measured_factor)
        extra = pd.concat([extra.reset_index(drop=True),
                           result_columns(context.survey, table.index),
                           pd.DataFrame({"basis": np.where(
                               basis, "measured", np.where(table["status"] == "ok", "register",
                                                           ""))})],
                          axis=1)
    cases = dict.fromkeys(c.site for c in rules.checks.values() if c.enabled and c.site)
    results = build_results(table, states, findings=names, severity=worst,
                            extra=extra,
                            judged={case: context.states(case) for case in cases})
    audit = Audit(rules, table, results, findings, economics, states, survey=context.survey,
                  planning=repairs)
    del context  # the trial states and tables of the checks and remedies
    give_back()
    return audit
