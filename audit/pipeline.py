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
from audit.economics import Economics, EconomicRules, compute_economics
from audit.economics import economic_rules as economic_rules_of
from audit.io.readers import read_register, reader_options
from audit.io.readers.survey import read_survey
from audit.planning import ROW_COLUMNS, PlanningRules, RowPlans, plan_rows, planning_rules
from audit.results import build_results
from audit.rules import Rules, load_rules
from audit.survey import reconcile, result_columns
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
    if readings is not None:
        context.survey = reconcile(readings, table, rules, prepared=context.prepared(),
                                   tables=context.tables(), surface_model=surface_model)
    findings = run_checks(context, params)
    findings = fill_remedies(context, findings, check_kinds(), params)
    states = context.states("")
    repairs = plan_rows(table, states, findings, planning, economic_rules.repair)
    economics = compute_economics(context, findings, rules, economic_rules=economic_rules,
                                  repairs=repairs, fuel_price=fuel_price, hours=hours)
    names, worst = summarise_per_row(findings, len(table))
    extra = pd.concat([economics.per_row, repairs.frame[ROW_COLUMNS]], axis=1)
    if readings is not None:
        findings["basis"] = np.where(findings["kind"] == "survey-deviation", "measured", "register")
        extra = pd.concat([extra.reset_index(drop=True),
                           result_columns(context.survey, table.index)], axis=1)
    cases = dict.fromkeys(c.site for c in rules.checks.values() if c.enabled and c.site)
    results = build_results(table, states, findings=names, severity=worst,
                            extra=extra,
                            judged={case: context.states(case) for case in cases})
    return Audit(rules, table, results, findings, economics, states, survey=context.survey,
                 planning=repairs)
