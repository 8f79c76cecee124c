"""Checks: each module of this package that defines ``KIND`` (a CheckKind) and ``NAME`` is a
kind of check, evaluated for every enabled ``[check.X]`` of the rules whose ``kind`` is NAME.

:func:`run_checks` evaluates them all and returns one findings table; the results table takes
from it the ``findings`` and ``severity`` columns of each row.
"""

from __future__ import annotations

import importlib
import pkgutil

import numpy as np
import pandas as pd

from audit.checks.base import (FINDING_COLUMNS, CheckContext, CheckKind, empty_findings,
                               validated_params)
from audit.errors import RuleError
from audit.rules import SEVERITIES, Rules

_HELPERS = {"base", "remedy", "repairs", "layer_limits"}


def check_kinds() -> dict[str, CheckKind]:
    """Every kind of check, by name, found among this package's modules."""
    kinds = {}
    for info in pkgutil.iter_modules(__path__):
        if info.name in _HELPERS:
            continue
        module = importlib.import_module(f"{__name__}.{info.name}")
        if hasattr(module, "KIND") and hasattr(module, "NAME"):
            kinds[module.NAME] = module.KIND
    return kinds


def validate_checks(rules: Rules) -> dict[str, dict]:
    """Every enabled check's parameters, validated; raises RuleError naming file and key."""
    kinds = check_kinds()
    params = {}
    for check in rules.checks.values():
        if check.kind not in kinds:
            raise RuleError(f"check {check.name!r} is of unknown kind {check.kind!r}",
                            file=check.origin, column=f"check.{check.name}.kind", value=check.kind,
                            expected="one of " + ", ".join(sorted(kinds)))
        params[check.name] = validated_params(check, kinds[check.kind])
    return params


def run_checks(context: CheckContext, params: dict | None = None, *,
               done: dict | None = None) -> pd.DataFrame:
    """Findings of every enabled check, sorted by row, then most severe first.

    ``params`` are the checks' validated parameters (:func:`validate_checks`), computed here
    when not given; ``done`` (check name -> findings table), the findings of checks already
    evaluated, taken as they are.  A check of a kind that judges the whole item reads
    :meth:`CheckContext.for_whole_item`.
    """
    kinds = check_kinds()
    params = validate_checks(context.rules) if params is None else params
    done = done or {}
    frames = []
    for check in context.rules.checks.values():
        if not check.enabled:
            continue
        kind = kinds[check.kind]
        found = done[check.name] if check.name in done else kind.findings(
            context.for_whole_item() if kind.whole_item else context, check, params[check.name])
        if len(found):
            frames.append(found)
    if not frames:
        return empty_findings()
    out = pd.concat(frames, ignore_index=True)[FINDING_COLUMNS]
    rank = out["severity"].map({s: i for i, s in enumerate(SEVERITIES)})
    order = np.lexsort((-rank.to_numpy(), out["row"].to_numpy(int)))
    return out.iloc[order].reset_index(drop=True)


def summarise_per_row(findings: pd.DataFrame, n: int) -> tuple[np.ndarray, np.ndarray]:
    """Per item-table row: the ';'-joined names of its failed checks, and its worst severity."""
    names = np.full(n, "", dtype=object)
    worst = np.full(n, "", dtype=object)
    if not len(findings):
        return names, worst
    findings = findings.sort_values("row", kind="stable")
    unique = findings.drop_duplicates(["row", "check"])  # one name per (row, check), in order
    rows = unique["row"].to_numpy(int)
    starts = np.flatnonzero(np.r_[True, rows[1:] != rows[:-1]])
    first = np.zeros(rows.size, bool)
    first[starts] = True
    pieces = np.where(first, unique["check"].to_numpy(object), ";" + unique["check"].to_numpy(object))
    names[rows[starts]] = np.add.reduceat(pieces.astype(object), starts)
    rank = findings["severity"].map({s: i for i, s in enumerate(SEVERITIES)}).to_numpy(int)
    all_rows = findings["row"].to_numpy(int)
    all_starts = np.flatnonzero(np.r_[True, all_rows[1:] != all_rows[:-1]])
    worst[all_rows[all_starts]] = np.asarray(SEVERITIES, dtype=object)[
        np.maximum.reduceat(rank, all_starts)]
    return names, worst
