"""The data-quality summary printed by ``lagaudit validate``."""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from audit.problems import CODES, problems_of


@dataclass
class Summary:
    """Counts behind the summary text."""

    rows: int
    ok: int
    rejected: int
    warned: int
    sheets: list[dict]
    skipped: list[str]
    #: ``"column: code"`` -> (problems, example sources), most frequent first
    reasons: dict[str, tuple[int, list[str]]] = field(default_factory=dict)
    warnings: dict[str, tuple[int, list[str]]] = field(default_factory=dict)


def _group(found: pd.DataFrame, sources: pd.Series, examples: int):
    """Problems counted by column and code, with the first rows of each as examples."""
    if not len(found):
        return {}
    found = found.sort_values("row", kind="stable")  # examples, and ties, in register order
    label = (found["column"].where(found["column"] == "", found["column"] + ": ")
             + found["code"])
    groups = found.assign(label=label, source=sources.loc[found["row"]].to_numpy()) \
        .groupby("label", sort=False)["source"]
    counts = groups.size().sort_values(ascending=False, kind="stable")
    first = groups.agg(lambda s: list(s.iloc[:examples]))
    return {k: (int(c), first[k]) for k, c in counts.items()}


def summary(table: pd.DataFrame, examples: int = 3) -> Summary:
    """Count rows, and the problems by column and code (:mod:`audit.problems`)."""
    register = table.attrs.get("register", {"sheets": [], "skipped": []})
    found = problems_of(table).frame
    rejected = table["status"] == "rejected"
    warned = table["warnings"] != ""
    return Summary(
        rows=len(table), ok=int((~rejected).sum()), rejected=int(rejected.sum()),
        warned=int(warned.sum()), sheets=register["sheets"], skipped=register["skipped"],
        reasons=_group(found[found["severity"] == "reject"], table["source"], examples),
        warnings=_group(found[found["severity"] == "warning"], table["source"], examples))


def summarise(table: pd.DataFrame, examples: int = 3) -> str:
    """The data-quality summary of an item table from :func:`audit.io.readers.read_register`.

    Rows read per file and sheet, the rows' problems grouped by column and code (with what
    the code means and example rows), rejections and warnings apart, columns recognised and
    carried through unused, units assumed by default.
    """
    s = summary(table, examples)
    lines = [f"Rows read: {s.rows} ({s.ok} ok, {s.rejected} rejected, {s.warned} with warnings)",
             "", "Files and sheets:"]
    for sheet in s.sheets:
        where = f"{sheet['file']}:{sheet['sheet']}" if sheet["sheet"] else sheet["file"]
        lines.append(f"  {where}: {sheet['rows']} rows below the header in row "
                     f"{sheet['header_row']}" + "".join(f"; {n}" for n in sheet["notes"]))
    lines += [f"  {note}" for note in s.skipped]
    lines += ["", "Columns recognised (column <- header):"]
    for sheet in s.sheets:
        where = f"{sheet['file']}:{sheet['sheet']}" if sheet["sheet"] else sheet["file"]
        pairs = ", ".join(f"{c} <- {h!r}" for c, h in sheet["recognised"].items())
        lines.append(f"  {where}: {pairs}")
        if sheet["ignored"]:
            lines.append(f"    carried through, not used: {', '.join(sheet['ignored'])}")
        for header, column in sheet["shadowed"]:
            lines.append(f"    {header!r} also names {column}; "
                         f"{sheet['recognised'].get(column, '')!r} was used")
        for decision in sheet.get("decisions", ()):
            lines.append(f"    {decision}")
        for column, (unit, count) in sheet["units_assumed"].items():
            lines.append(f"    units assumed by default: {column} in {unit} "
                         f"({count} cell{'s' if count != 1 else ''} without a unit)")
    lines += plant_words(s.sheets)
    for title, groups in (("Rejected rows by reason (column: code):", s.reasons),
                          ("Warnings (column: code):", s.warnings)):
        lines += ["", title]
        if not groups:
            lines.append("  none")
        for label, (count, where) in groups.items():
            meaning = CODES[label.rpartition(" ")[2]]
            lines.append(f"  {count:6d}  {label}: {meaning}  (e.g. {', '.join(where)})")
    return "\n".join(lines)


def plant_words(sheets: list[dict]) -> list[str]:
    """The summary's lines on a plant's words: every word mapped to a rules' name, and every
    name that is neither defined nor a word, with the closest defined names (a hint only)."""
    merged: dict = {}
    more: dict = {}
    for sheet in sheets:
        for column, kinds in sheet.get("words", {}).items():
            for kind, entries in kinds.items():
                if kind == "more":
                    more[column] = [a + b for a, b in zip(more.get(column, [0, 0]), entries)]
                    continue
                for text, (detail, rows) in entries.items():
                    entry = merged.setdefault((column, kind), {}).setdefault(text, [detail, 0])
                    entry[1] += rows
    if not merged:
        return []
    lines = ["", "Plant words mapped ([words] of the rules):"]
    mapped = sorted((c, t, d, r) for (c, k), e in merged.items() if k == "mapped"
                    for t, (d, r) in e.items())
    lines += [f"  {c}: {t!r} -> {d} ({_rows(r)})" for c, t, d, r in mapped] or ["  none"]
    lines += ["", "Names neither defined nor a plant word (add a [words] entry or a definition "
                  "to a rule file;",
              "the closest defined names and words are a hint only, never applied):"]
    unknown = sorted((c, t, d, r) for (c, k), e in merged.items() if k == "unknown"
                     for t, (d, r) in e.items())
    lines += [f"  {c}: {t!r} ({_rows(r)}); closest: {', '.join(d) or 'none'}"
              for c, t, d, r in unknown] or ["  none"]
    lines += [f"  {c}: {n} more names not listed ({_rows(r)})" for c, (n, r) in sorted(more.items())]
    return lines


def _rows(count: int) -> str:
    return f"{count} row{'s' if count != 1 else ''}"


#: Readings listed per status by :func:`summarise_survey` (survey.csv of a run lists every one).
SURVEY_LISTED = 50


def summarise_survey(survey: pd.DataFrame, listed: int = SURVEY_LISTED) -> str:
    """What ``lagaudit validate --survey`` prints of the readings reconciled with the register
    (:func:`audit.survey.reconcile`): the readings by status, then each reading not used and
    each warned, by its file and row (``source``), with the column and the problem (its
    ``reason`` and ``warnings`` name the column first)."""
    counts = survey["status"].value_counts()
    warned = survey["warnings"].fillna("") != ""
    lines = [f"survey: {len(survey)} reading(s): {int(counts.get('matched', 0))} matched, "
             f"{int(counts.get('rejected', 0))} rejected, "
             f"{int(counts.get('unknown tag', 0))} with an unknown tag; {int(warned.sum())} "
             "with warnings"]
    for title, rows, column in (("not used", survey["status"] != "matched", "reason"),
                                ("warnings", warned, "warnings")):
        picked = survey[rows]
        if not len(picked):
            continue
        lines.append(f"  {title}:")
        for r in picked.head(listed).to_dict(orient="records"):
            lines.append(f"    {r['source']} (tag {r['tag'] or '(empty)'}): {r[column]}")
        if len(picked) > listed:
            lines.append(f"    ... and {len(picked) - listed} more (a run's survey.csv lists "
                         "every reading)")
    return "\n".join(lines)
