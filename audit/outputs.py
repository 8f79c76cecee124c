"""The outputs of ``lagaudit run``: one writer per format, each file put in place whole.

:data:`WRITERS` maps a ``--format`` name to its writer; the command line runs the writers of
the formats asked for, in the registry's order, inside one locked
:class:`~audit.io.writers.place.OutputFolder`.  A writer takes ``(audit, folder, meta, asked)``
and returns the paths it wrote (``options``, the run's output settings, come as keywords: a
writer takes those it uses); ``html`` and ``pdf`` share one writer (one render of the report),
which also writes the work-order packs with the PDF (``workorder_pages``: their cap on item pages).
"""

from __future__ import annotations

import sys
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pandas as pd

from audit import display_units
from audit.heap import give_back
from audit.io.writers import summary_sheet, write_csv, write_json, write_xlsx
from audit.io.writers.place import OutputFolder
from audit.io.writers.safety import as_number
from audit.progress import printable
from audit.results import carried_columns, findings_out, significant
from audit.survey import SURVEY_FIGURES, survey_out


def shown(audit, table: pd.DataFrame, units: str = "si") -> pd.DataFrame:
    """One of the audit's tables as written, in the run's unit system (``units``); the
    register's carried-through columns are left as the register wrote them."""
    return display_units.frame(table, units, keep=carried_columns(audit.results))


def _findings(audit, units: str) -> pd.DataFrame:
    """The findings as written (:func:`~audit.results.findings_out`), in ``units`` (the
    converted figures rounded again, as the SI ones are: :func:`audit.display_units.frame`)."""
    return shown(audit, findings_out(audit.findings), units)


def _csv(audit, folder: OutputFolder, meta: dict, asked, *, units: str = "si",
         **options) -> list[Path]:
    jobs = [(shown(audit, audit.results, units), "results.csv"),
            (_findings(audit, units), "findings.csv")]
    survey = _survey(audit, units)
    if survey is not None:
        jobs.append((survey, "survey.csv"))
    # Two threads: much of the writing is numpy formatting and file output, which let go of
    # the interpreter lock, so the two files overlap.
    with ThreadPoolExecutor(2) as pool:
        return list(pool.map(lambda job: placed(folder, job[1], write_csv, job[0]), jobs))


def _json(audit, folder: OutputFolder, meta: dict, asked, *, units: str = "si",
          **options) -> list[Path]:
    survey = _survey(audit, units)
    return [placed(folder, "results.json", write_json, shown(audit, audit.results, units),
                   meta={**meta, "units": units},
                   tables=None if survey is None else {"survey": survey})]


def _survey(audit, units: str) -> pd.DataFrame | None:
    """survey.csv's table in ``units``: every reading once, with its status (None without a
    survey)."""
    if getattr(audit, "survey", None) is None:
        return None
    out = display_units.frame(survey_out(audit.survey), units)
    if units != "si":  # the converted figures rounded again, as the SI ones are
        for column in out.columns[SURVEY_FIGURES:]:
            out[column] = significant(out[column].to_numpy(float))
    return out


def _xlsx(audit, folder: OutputFolder, meta: dict, asked, *, units: str = "si",
          **options) -> list[Path]:
    results, economics = shown(audit, audit.results, units), audit.economics
    rejected = results.loc[results["status"] == "rejected", ["tag", "source", "reason"]]
    sheets = {"results": _register_numbers(results), "findings": _findings(audit, units),
              "rejected": rejected, "summary": summary_sheet(results, audit.findings),
              "by area": shown(audit, economics.by_area, units),
              "by check": shown(audit, economics.by_check, units),
              "best paybacks": shown(audit, economics.top_repairs, units),
              "assumptions": pd.DataFrame(economics.assumptions)}
    survey = _survey(audit, units)
    if survey is not None:
        sheets["survey"] = survey
    notes = []
    written = [placed(folder, "results.xlsx", write_xlsx, sheets, notes=notes)]
    for note in notes:  # a split is news: said even with --quiet
        print(printable(f"lagaudit: note: results.xlsx: {note}; every column and row is also in "
                        "the CSV outputs"), file=sys.stderr)
    return written


def _register_numbers(results: pd.DataFrame) -> pd.DataFrame:
    """``results`` with the numbers of the register's carried-through columns as numbers, so
    that a planner's sorts and sums work in the workbook (the CSV keeps the register's text)."""
    out = results.copy(deep=False)
    for column in carried_columns(results):
        codes, uniques = pd.factorize(out[column].to_numpy(object))
        converted = np.array([as_number(u) for u in uniques] + [""], dtype=object)
        if any(isinstance(v, float) for v in converted):
            out[column] = converted[codes]
    return out


def _reports(audit, folder: OutputFolder, meta: dict, asked, *, workorder_pages: int | None = None,
             units: str = "si", **options) -> list[Path]:
    from audit.report import write_reports  # weasyprint loads in ~0.7 s: only when asked

    reports = [f for f in asked if f in ("html", "pdf")]
    # The work-order packs are PDFs too: they come with the PDF report.
    return write_reports(audit, folder.root, meta=meta, economics=audit.economics,
                         formats=reports + (["workorders"] if "pdf" in reports else []),
                         max_pages=workorder_pages, units=units)


#: Most item pages in the work-order PDF packs, the most severe first (``--workorder-pages``
#: raises or lowers it; every work order is in workorders.csv whatever it is).  A page takes
#: 0.1 to 0.25 s of a core to lay out, so 1,000 pages were most of a large plant's default run.
#: 250 is about a year of working days of one crew at one repair a day: the worst items, on
#: paper for the crews; the planner takes the whole list from workorders.csv into the
#: maintenance system (README, "Limits").
MAX_WORKORDER_PAGES = 250

#: ``--format`` name -> writer, in the order they run.
WRITERS = {"csv": _csv, "json": _json, "xlsx": _xlsx, "html": _reports, "pdf": _reports}
FORMATS = tuple(WRITERS)

#: The files and folders each format writes into ``--out`` (checked before the audit starts).
OUTPUT_NAMES = {"csv": ("results.csv", "findings.csv"), "json": ("results.json",),
                "xlsx": ("results.xlsx",), "html": ("report.html",),
                "pdf": ("report.pdf", "workorders.csv", "workorders/")}


def check_outputs(folder: OutputFolder, formats, extra=()) -> None:
    """Refuse now, before minutes of work, an ``--out`` whose output names (those of
    ``formats``, and the ``extra`` names another step writes) are links."""
    for name in dict.fromkeys([*(n for f in formats for n in OUTPUT_NAMES[f]), *extra]):
        folder.check(name + "probe" if name.endswith("/") else name, create=False)


def write_outputs(audit, folder: OutputFolder, formats, meta: dict, advance=lambda n: None,
                  **options) -> list[Path]:
    """Run the writers of ``formats`` into ``folder``, each given ``options``; the paths
    written.  ``advance(n)`` is called with the number of formats each writer finished (for a
    progress bar)."""
    written = []
    for writer in dict.fromkeys(WRITERS[f] for f in formats):
        written += writer(audit, folder, meta, formats, **options)
        give_back()  # what the writer made and dropped, not kept resident for the next one
        advance(sum(WRITERS[f] is writer for f in formats))
    return written


def placed(folder: OutputFolder, name: str, writer, *args, **kwargs) -> Path:
    """``writer(*args, temporary, **kwargs)`` into ``folder`` under ``name``, put in place whole."""
    with folder.writing(name) as temporary:
        writer(*args, temporary, **kwargs)
    return folder.root / name
