"""Rows that repeat: a row equal to an earlier one in every recognised cell is rejected (it
would be audited, ordered and counted twice); a tag on several differing rows is audited on
each row and warned."""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.problems import Problem, append_texts, records, words


def flag(table: pd.DataFrame) -> pd.DataFrame:
    """Flag repeated rows and tags in ``table`` (its ``status``, ``reason``, ``warnings``) and
    return the problem records (``row`` = index label)."""
    tags = table["tag"]
    candidates = (tags != "") & tags.duplicated(keep=False)
    if not candidates.any():
        return _NONE
    raw = [c for c in table.columns if c.startswith("raw:")]
    part = table.loc[candidates, ["tag", "source", *raw]]
    keys = part[raw].astype(str)
    repeat = keys.duplicated(keep="first").to_numpy()
    first = part.groupby([keys[c] for c in raw], sort=False)["source"].transform("first")
    rows = part.index.to_numpy()
    found = []
    if repeat.any():
        problems = np.array([Problem("duplicate-row", f"is a duplicate of row {f} (every "
                                     "recognised cell equal)", "one row per item")
                             for f in first.to_numpy()[repeat]], dtype=object)
        found.append(_record(table, "reject", rows[repeat], part["tag"].to_numpy()[repeat],
                             problems))
    kept = part.loc[~repeat]
    tag_rows = kept["tag"].duplicated(keep=False).to_numpy()
    if tag_rows.any():
        groups = kept.loc[tag_rows].groupby("tag", sort=False)["source"]
        count, where = groups.transform("size").to_numpy(), groups.transform("first").to_numpy()
        problems = np.array([Problem("duplicate-tag", f"is duplicated ({c} rows; first at {f})")
                             for c, f in zip(count, where)], dtype=object)
        found.append(_record(table, "warning", kept.index.to_numpy()[tag_rows],
                             kept["tag"].to_numpy()[tag_rows], problems))
    return pd.concat(found, ignore_index=True) if found else _NONE


_NONE = records(np.zeros(0, np.int64), "", "", "", "", "reject", "")


def _record(table: pd.DataFrame, severity: str, rows: np.ndarray, tags: np.ndarray,
            problems: np.ndarray) -> pd.DataFrame:
    texts = np.array([words("tag", t, p) for t, p in zip(tags, problems)], dtype=object)
    column = "reason" if severity == "reject" else "warnings"
    positions = table.index.get_indexer(rows)
    target = table[column].to_numpy(dtype=object, copy=True)
    append_texts(target, positions, texts)
    table[column] = pd.Series(target, index=table.index, dtype="str")
    if severity == "reject":
        table.loc[rows, "status"] = "rejected"
    return records(rows, "tag", np.array([p.code for p in problems], dtype=object), tags,
                   np.array([p.expected for p in problems], dtype=object), severity, texts)
