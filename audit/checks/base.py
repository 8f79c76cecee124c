"""What every check shares: the context it reads, the verdict it returns, the findings the
framework builds from it, its parameters.

A check decides, then words.  Its ``evaluate(context, check, params)`` is a pure function of
the item table, the thermal states of the scenario it declares and the rules, and returns a
:class:`Verdict`: which rows fail, with the value, limit and unit compared (data, no text).
Its ``word(context, check, params, verdict)`` writes each failing row's one-line message and
remedy.  :meth:`CheckKind.findings` builds the findings table from the two; the remedy search
asks only for verdicts.  A check never opens a file.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from audit.errors import Problem, RuleError
from audit.repeats import per_distinct
from audit.rules import Check, Rules
from audit.rules.loader import CHECK_KEYS
from audit.rules.keys import convert_keys
from audit.thermal import (ZERO_CELSIUS, PreparedItems, conductivity_tables, has_layers,
                           prepare_items, thermal_states)

#: Columns of a findings table, in order (``row`` indexes the item table).
FINDING_COLUMNS = ["row", "tag", "source", "check", "kind", "severity", "value", "limit", "unit",
                   "site", "conditions_from", "air_temp [degC]", "wind [m/s]", "rh [%]", "surroundings_temp [degC]",
                   "limit_source", "message",
                   "remedy", "remedy_action", "fixable_by_insulation", "remedy_thickness [mm]",
                   "remedy_material"]


@dataclass
class Verdict:
    """What a check decided, as data: the failing rows (positions in the item table) and,
    aligned with them or one for all, the value compared, the limit and its unit."""

    rows: np.ndarray
    value: object = np.nan
    limit: object = np.nan
    unit: object = ""
    severity: object = None     #: per row where it differs from the check's, else None
    facts: dict = field(default_factory=dict)  #: what the wording reads, aligned with rows
    #: per row where another rule table than the check's governed the limit (a plant
    #: specification, a material's maximum temperature), else None: see :func:`rule_source`
    limit_source: object = None
    #: the conditions judged under, aligned with rows, where they are not the check's site's
    #: (a field reading's own): ``conditions_from``, ``air_temp_K``, ``wind_m_s``,
    #: ``rh_pct``, ``surroundings_temp_K``; else None
    conditions: dict | None = None
    #: per row, False where insulation cannot fix that row although it can fix the kind's
    #: others (a tracer whose output the rules do not know); else None
    fixable: object = None


@dataclass
class CheckKind:
    """A kind of check: how it decides, how it words, its own parameters and whether
    insulation can fix it."""

    evaluate: Callable                 #: (CheckContext, Check, params) -> Verdict
    word: Callable                     #: (CheckContext, Check, params, Verdict) -> (message, remedy)
    params: dict                       #: key -> (converter, required); see audit.rules.converters
    fixable_by_insulation: bool        #: the remedy search may add insulation for it
    description: str
    #: (check, params) -> None; raises RuleError for rules across keys that the per-key
    #: schema cannot express (e.g. "at least one of"), so they fail at load, not mid-run
    validate: Callable | None = None
    #: the remedy's insulation must pass it too: the remedy search evaluates it on every
    #: trial, not only on the items that failed it (e.g. a layer's maximum temperature)
    remedy_must_pass: bool = False
    #: its findings are remedied by the repair plan's actions (reinstate, replace, covers)
    #: that its ``flags`` parameter names, not by a thickness (the ``condition`` kind)
    remedied_by_repair: bool = False
    #: it judges the whole item (its heat loss), not one spot of it: where a field survey
    #: measured the item, it reads the survey's whole-item condition
    #: (:meth:`CheckContext.for_whole_item`)
    whole_item: bool = False
    #: its verdict reads the item's thermal state (surface, layer or heat): a condition a
    #: field survey measured changes it (finding ``basis`` = ``measured``); False for checks
    #: of the register's facts alone (thickness, condition words, process temperature)
    thermal: bool = True

    def findings(self, context: CheckContext, check: Check, params: dict) -> pd.DataFrame:
        """The findings table of ``check`` on ``context``: its verdict, worded."""
        verdict = self.evaluate(context, check, params)
        message, remedy = self.word(context, check, params, verdict)
        return findings(context, check, verdict.rows, value=verdict.value, limit=verdict.limit,
                        unit=verdict.unit, message=message, remedy=remedy,
                        fixable=self.fixable_by_insulation if verdict.fixable is None else
                        self.fixable_by_insulation & np.asarray(verdict.fixable, bool),
                        severity=verdict.severity,
                        limit_source=verdict.limit_source, conditions=verdict.conditions)


@dataclass
class CheckContext:
    """The item table, the rules, and the thermal states per scenario, solved once each."""

    table: pd.DataFrame
    rules: Rules
    surface_model: str = "correlations"
    survey: pd.DataFrame | None = None  #: reconciled field readings (audit.survey), if any
    #: with a survey: the items at the survey's whole-item condition (their heat loss, energy
    #: and money), beside this context's items at its spot condition (audit.survey.item_factors)
    whole_item: CheckContext | None = None
    #: with a survey: per row, whether the survey found more heat through the insulation than
    #: the register allows (a survey-deviation finding): the repair restores it as installed
    measured_repair: np.ndarray | None = None
    #: with a survey: per row, the condition factor [-] this context's items carry (NaN:
    #: none, as registered), and the items as registered
    measured_factor: np.ndarray | None = None
    registered: PreparedItems | None = None
    _states: dict = field(default_factory=dict)
    _tables: tuple | None = None
    _prepared: PreparedItems | None = None
    _once: dict = field(default_factory=dict)

    def once(self, function: Callable, *, rules: bool = False):
        """``function(self.table)`` (with ``rules``: ``function(self.table, self.rules)``),
        computed once for this context: several checks ask for the same facts of the table
        (its bare parts, which rows have layers)."""
        if function not in self._once:
            self._once[function] = function(self.table, self.rules) if rules else function(self.table)
        return self._once[function]

    def memo(self, key, make: Callable):
        """``make()``, computed once for this context per ``key`` (a hashable naming what
        and under which case and parameters): a check and the results share its solves."""
        if key not in self._once:
            self._once[key] = make()
        return self._once[key]

    def trial(self, items: PreparedItems) -> CheckContext:
        """A context of the trial ``items`` (derived from :meth:`prepared`): its table, the
        same rules, surface model and conductivity tables."""
        return CheckContext(items.table(), self.rules, surface_model=self.surface_model,
                            _tables=self.tables(), _prepared=items)

    def for_whole_item(self) -> CheckContext:
        """The context whose items are at the survey's whole-item condition (this one where
        no survey measured any)."""
        return self if self.whole_item is None else self.whole_item

    def tables(self) -> tuple:
        """:func:`audit.thermal.conductivity_tables` of the rules, built once."""
        if self._tables is None:
            self._tables = conductivity_tables(self.rules)
        return self._tables

    def prepared(self) -> PreparedItems:
        """:func:`audit.thermal.prepare_items` of the table, looked up once."""
        if self._prepared is None:
            self._prepared = prepare_items(self.table, self.rules, self.tables()[1])
        return self._prepared

    def states(self, site: str = "") -> pd.DataFrame:
        """Thermal states of every row under ``site`` ("" = each item's own conditions)."""
        if site not in self._states:
            self._states[site] = thermal_states(self.table, self.rules, site=site or None,
                                                surface_model=self.surface_model,
                                                tables=self.tables(), prepared=self.prepared())
        return self._states[site]

    def selected(self, check: Check, site: str | None = None) -> np.ndarray:
        """Rows the check applies to: computed under its site, and chosen by its selector."""
        states = self.states(check.site if site is None else site)
        mask = states["computed"].to_numpy(bool).copy()
        if check.applies_to is not None:
            mask &= check.applies_to.mask(self.table)
        return mask


def rule_source(origin: str, table: str, source: str) -> str:
    """Where a limit came from: the rule file (its folder and name, so a plant's own file
    reads apart from the shipped one), the table in it, and that table's ``source``."""
    path = Path(origin) if origin else None
    where = f"{path.parent.name}/{path.name}" if path is not None else "(rules given in code)"
    return f"{where} [{table}]: {source}"


def check_source(check: Check) -> str:
    """:func:`rule_source` of a check's own table."""
    return rule_source(check.origin, f"check.{check.name}", check.source)


def findings(context: CheckContext, check: Check, rows: np.ndarray, *, value, limit, unit,
             message, remedy, fixable=False, severity=None, limit_source=None,
             conditions=None) -> pd.DataFrame:
    """A findings table for ``rows`` (positions in the item table) of one check.

    ``value``, ``limit``, ``unit``, ``message``, ``remedy``, ``severity`` and
    ``limit_source`` are arrays aligned with ``rows`` or scalars; ``severity`` defaults to the
    check's, ``limit_source`` to the check's own table (:func:`check_source`); the conditions
    come from the check's scenario, unless given (``conditions``: see :class:`Verdict`).
    """
    rows = np.asarray(rows, int)
    n = rows.size
    if conditions is None:
        states = context.states(check.site)
        conditions = {name: states[name].to_numpy()[rows] for name in (
            "conditions_from", "air_temp_K", "wind_m_s", "rh_pct", "surroundings_temp_K")}
    table = context.table

    def spread(x, dtype=object):
        return np.full(n, x, dtype=dtype) if np.isscalar(x) or x is None else np.asarray(x, dtype=dtype)

    if unit is None or isinstance(unit, str):
        unit = str(unit or "")
    else:
        unit = spread(unit)

    return pd.DataFrame({
        "row": rows,
        "tag": table["tag"].to_numpy(object)[rows],
        "source": table["source"].to_numpy(object)[rows],
        "check": check.name,
        "kind": check.kind,
        "severity": spread(check.severity if severity is None else severity),
        "value": spread(value, float),
        "limit": spread(limit, float),
        "unit": unit,
        "site": check.site or "own conditions",
        "conditions_from": np.asarray(conditions["conditions_from"], dtype=object),
        "air_temp [degC]": np.asarray(conditions["air_temp_K"], float) - ZERO_CELSIUS,
        "wind [m/s]": np.asarray(conditions["wind_m_s"], float),
        "rh [%]": np.asarray(conditions["rh_pct"], float),
        "surroundings_temp [degC]": np.asarray(conditions["surroundings_temp_K"], float)
        - ZERO_CELSIUS,
        "limit_source": spread(check_source(check) if limit_source is None else limit_source),
        "message": spread(message),
        "remedy": spread(remedy),
        "remedy_action": "",
        "fixable_by_insulation": spread(fixable, bool),
        "remedy_thickness [mm]": np.nan,
        "remedy_material": "",
    }, columns=FINDING_COLUMNS)


def empty_findings() -> pd.DataFrame:
    return pd.DataFrame({c: pd.Series(dtype=object) for c in FINDING_COLUMNS})


def validated_params(check: Check, kind: CheckKind) -> dict:
    """The check's own parameters converted by its kind's schema; RuleError naming file and key."""
    problems: list[Problem] = []
    values = convert_keys(check.params, kind.params, where=f"check.{check.name}",
                          origin=check.origin, problems=problems, known=CHECK_KEYS,
                          unknown_note=f" for a check of kind {check.kind!r}")
    if problems:
        raise RuleError(f"{len(problems)} problem(s) in check {check.name!r}", file=check.origin,
                        problems=problems)
    if kind.validate is not None:
        kind.validate(check, values)
    return values


def cold_service(context: CheckContext) -> np.ndarray:
    """Per row: in cold service (declared ``cold``, or its process below the air at its own
    conditions), where a cover or a layer needs a vapour seal."""
    states = context.states("")
    with np.errstate(invalid="ignore"):
        return ((states["process_temp_K"].to_numpy(float) < states["air_temp_K"].to_numpy(float))
                | (context.table["service"].fillna("").to_numpy(object) == "cold"))


def bare_parts(table: pd.DataFrame) -> np.ndarray:
    """Per row of the item table: its bare metal parts in words ("" where it has none; which
    rows have some is :func:`audit.thermal.table_surfaces`' rule, and these words follow it)."""
    return per_distinct(
        _bare_words, has_layers(table), table["condition"].fillna("").to_numpy(object),
        np.nan_to_num(table["damaged_pct"].to_numpy(float), nan=-1.0),
        (table["shape"] == "pipe").to_numpy(), np.nan_to_num(table["valves"].to_numpy(float)),
        np.nan_to_num(table["flanges"].to_numpy(float)))


def _bare_words(insulated, condition, damaged, pipe, valves, flanges) -> str:
    parts = []
    if not insulated:
        parts.append("bare metal")
    elif condition == "missing":
        parts.append("bare metal (insulation missing)")
    elif condition == "damaged" and damaged > 0:
        parts.append(f"the bare share of damaged insulation ({damaged:g} %)")
    fittings = [f"{n:g} {what}" for n, what in ((valves, "valves"), (flanges, "flanges")) if n > 0]
    if pipe and fittings:
        parts.append(f"uninsulated fittings ({', '.join(fittings)})")
    return " and ".join(parts)
