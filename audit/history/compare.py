"""This audit's findings against the last audit of the same plant: pure table work, no database.

A finding is known by its item's tag (after :func:`tag_key`) and its check; a tag entered twice
in a register pairs its findings with the last audit's in register order.  What a finding is
since the last audit (``since_last``):

- ``new``: not in the last audit (or there is no last audit);
- ``recurring``: in the last audit, about as bad;
- ``worsened``: a higher severity, or the same severity with the value further past its limit
  by more than :data:`MARGIN` of how far it was past before;
- ``improved``: the reverse of ``worsened`` (still a finding, but less bad).

Findings of the last audit that are gone go to ``closed.csv`` with ``why``: ``cleared`` (the
item was audited and no longer fails the check), ``item-not-in-register`` (no row carries its
tag any more) or ``item-rejected`` (its rows were rejected this time, so nothing is known).
"""

from __future__ import annotations

import math
import re
import unicodedata

import numpy as np
import pandas as pd

from audit.rules import SEVERITIES

SINCE_LAST = ("new", "recurring", "worsened", "improved")
CLOSED_WHY = ("cleared", "item-not-in-register", "item-rejected")

#: Share of the old distance past the limit that a value must move before it is called
#: worsened or improved: keeps a recomputation's last digits from flipping the word (our choice).
MARGIN = 0.05

_RANK = {name: rank for rank, name in enumerate(SEVERITIES)}
_SPACE = re.compile(r"\s+")

CLOSED_COLUMNS = ["tag", "check", "severity", "value", "limit", "unit", "why", "first_reported",
                  "last_reported", "message"]


def tag_key(tag) -> str:
    """A tag as compared between audits: Unicode-normalised (NFKC), case folded, every run of
    white space removed.  ``"QP-10 cr-4005"`` and ``"qp-10CR-4005 "`` are the same item; a tag
    renamed between audits is a different item."""
    return _SPACE.sub("", unicodedata.normalize("NFKC", str(tag)).casefold())


def tag_keys(tags) -> np.ndarray:
    """:func:`tag_key` of each tag, worked out once per distinct tag."""
    tags = pd.Series(tags, dtype=object).astype(str)
    codes, uniques = pd.factorize(tags)
    keys = np.array([tag_key(t) for t in uniques], dtype=object)
    return keys[codes] if len(tags) else np.array([], dtype=object)


def compare(findings: pd.DataFrame, items: pd.DataFrame, previous: pd.DataFrame | None, *,
            today: str, last_date: str = "") -> tuple[pd.DataFrame, pd.DataFrame]:
    """``findings`` with ``since_last``, ``first_reported`` and ``change_since_last`` added, and
    the last audit's findings that are gone (the rows of ``closed.csv``).

    Parameters
    ----------
    findings : DataFrame
        This audit's findings (``tag``, ``check``, ``severity``, ``value``, ``limit``, ``unit``).
    items : DataFrame
        This audit's register rows (``tag``, ``status``: ``audited`` or ``rejected``).
    previous : DataFrame or None
        The last audit's findings as recorded (the columns above plus ``first_reported``,
        ``message``), or None when this is the plant's first recorded audit.
    today : str
        This audit's date, ``YYYY-MM-DD``: the first-reported date of new findings.
    last_date : str
        The last audit's date, for ``closed.csv``'s ``last_reported``.
    """
    out = findings.copy()
    out["since_last"] = "new"
    out["first_reported"] = today
    out["change_since_last"] = ""
    closed = pd.DataFrame(columns=CLOSED_COLUMNS)
    if previous is None or not len(previous):
        return out, closed
    now = _keyed(out)
    before = _keyed(previous.reset_index(drop=True))
    pairs = now.reset_index().merge(before.reset_index(), on=["tag_key", "check", "nth"],
                                    how="outer", suffixes=("", "_before"), indicator=True)
    both = pairs[pairs["_merge"] == "both"]
    if len(both):
        rows = both["index"].to_numpy(int)
        words, changes = _judge(both)
        out.iloc[rows, out.columns.get_loc("since_last")] = words
        out.iloc[rows, out.columns.get_loc("first_reported")] = both["first_reported_before"].astype(str).to_numpy()
        out.iloc[rows, out.columns.get_loc("change_since_last")] = changes
    gone = previous.iloc[pairs.loc[pairs["_merge"] == "right_only", "index_before"].to_numpy(int)]
    if len(gone):
        closed = gone.assign(why=_why(gone, items), last_reported=last_date)[CLOSED_COLUMNS]
        closed = closed.reset_index(drop=True)
    return out, closed


def _keyed(findings: pd.DataFrame) -> pd.DataFrame:
    keyed = pd.DataFrame({"tag_key": tag_keys(findings["tag"]), "check": findings["check"].astype(str),
                          "severity": findings["severity"].astype(str),
                          "value": pd.to_numeric(findings["value"], errors="coerce"),
                          "limit": pd.to_numeric(findings["limit"], errors="coerce"),
                          "unit": findings["unit"].astype(str)}, index=findings.index)
    if "first_reported" in findings:
        keyed["first_reported"] = findings["first_reported"].astype(str)
    keyed["nth"] = keyed.groupby(["tag_key", "check"]).cumcount()
    return keyed


def _judge(both: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """``since_last`` and the change in words for findings present in both audits."""
    rank_now = both["severity"].map(_RANK).to_numpy(float)
    rank_before = both["severity_before"].map(_RANK).to_numpy(float)
    past_now = np.abs(both["value"].to_numpy(float) - both["limit"].to_numpy(float))
    past_before = np.abs(both["value_before"].to_numpy(float) - both["limit_before"].to_numpy(float))
    same_unit = (both["unit"] == both["unit_before"]).to_numpy()
    margin = MARGIN * past_before + 1e-9  # the floor keeps equal values equal at zero distance
    with np.errstate(invalid="ignore"):
        further = same_unit & (past_now > past_before + margin)
        nearer = same_unit & (past_now < past_before - margin)
    words = np.where(rank_now > rank_before, "worsened",
                     np.where(rank_now < rank_before, "improved",
                              np.where(further, "worsened", np.where(nearer, "improved", "recurring"))))
    columns = [both[c].tolist() for c in ("severity_before", "severity", "value_before", "value",
                                           "limit", "unit")]
    changes = [_change(*row) for row in zip(*columns)]
    return words.astype(object), np.array(changes, dtype=object)


def _change(severity_before, severity, value_before, value, limit, unit) -> str:
    unit = f" {unit}" if unit else ""
    text = f"value {_num(value_before)} -> {_num(value)}{unit} (limit {_num(limit)}{unit})"
    return text if severity == severity_before else f"severity {severity_before} -> {severity}; {text}"


def _num(x) -> str:
    return "-" if x is None or not math.isfinite(x) else f"{x:.4g}"


def _why(gone: pd.DataFrame, items: pd.DataFrame) -> np.ndarray:
    keys = tag_keys(items["tag"])
    audited = set(keys[(items["status"] == "audited").to_numpy()])
    present = set(keys)
    return np.array(["cleared" if k in audited else "item-rejected" if k in present
                     else "item-not-in-register" for k in tag_keys(gone["tag"])], dtype=object)
