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

_HELPERS = {"base", "remedy"}


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


def run_checks(context: CheckContext, params: dict | None = None) -> pd.DataFrame:
    """Findings of every enabled check, sorted by row, then most severe first.

    ``params`` are the checks' validated parameters (:func:`validate_checks`), computed here
    when not given.
    """
    kinds = check_kinds()
    params = validate_checks(context.rules) if params is None else params
    frames = []
    for check in context.rules.checks.values():
        if not check.enabled:
            continue
        found = kinds[check.kind].evaluate(context, check, params[check.name])
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
    if len(findings):
        rank = {s: i for i, s in enumerate(SEVERITIES)}
        for row, group in findings.groupby("row", sort=False):
            names[row] = ";".join(dict.fromkeys(group["check"]))
            worst[row] = max(group["severity"], key=rank.__getitem__)
    return names, worst
