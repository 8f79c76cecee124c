"""Work-order packs: ``workorders/<area>.pdf`` (a bill of quantities, then one page per item to
repair) and ``workorders.csv`` (one row per item, for a maintenance system).

An item to repair is an audited item with at least one finding at or above ``min_severity``
(default ``low``: ``info`` findings, such as a CUI score at the bottom band, do not make a work
order on their own).  Quantities are counted from the register and the remedies, never
computed by physics: metres of pipe run (the item's length, or its damaged share) by size,
material and thickness; square metres of vessels and flat surfaces from ``outer_area [m2]``;
fittings by count.
"""

from __future__ import annotations

import ctypes
import multiprocessing
import os
import re
import signal
import unicodedata
from collections import defaultdict
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from audit import display_units
from audit.heap import give_back
from audit.io.writers import write_csv
from audit.io.writers.place import OutputFolder, temporary_for
from audit.outputs import MAX_WORKORDER_PAGES
from audit.planning import (GUARD, INSULATE, MONEY, PLANNED_FROM, layers_words, plan_order, planning_rules,
                            size_words, text_of)
from audit.report.context import SEVERITY_RANK, conditions_text, fmt, location_columns, worst_first
from audit.report.html import render
from audit.report.pdf import EmbeddedOnlyFetcher, write_pdf
from audit.report.shown import planner_fields, shown_order, shown_quantity, thickness_label
from audit.rules import SEVERITIES

#: Windows device names, refused as file names on every system so a pack copies anywhere.
RESERVED_NAMES = {"CON", "PRN", "AUX", "NUL", *(f"COM{i}" for i in range(1, 10)),
                  *(f"LPT{i}" for i in range(1, 10))}
_UNSAFE = re.compile(r"[^A-Za-z0-9._-]+")
_UNSAFE_LABEL = re.compile(r"[^A-Za-z0-9 ._-]")  # the area in a CSS string of the page header

#: Work orders above which the area packs are rendered in parallel processes.
PARALLEL_FROM = 400

#: Tags of the orders not printed that a pack's first page names, the most severe first; the
#: rest are counted (a large plant has thousands: pages of tags took longer to lay out than
#: the orders themselves, and workorders.csv lists every one).
NOT_PRINTED_NAMED = 100

#: Register rows of one tag printed in detail on its work order, the worst first; the rest
#: are counted there and listed in workorders.csv (a tag repeated a thousand times keeps
#: its pack small).
ROWS_PRINTED = 20

PLANNER_FIELDS = ("work order no.", "planned date", "crew / contractor", "permit no.",
                  "scaffold / access", "asbestos survey ref.", "isolation required",
                  "completed by / date", "surface temperature measured after repair [°C]")


def safe_filename(name: str, taken: set[str], suffix: str = "") -> str:
    """A file name made from register text that stays inside its folder on any system:
    letters, digits, ``.``, ``_`` and ``-`` only; no leading dot; not a reserved device name;
    at most 80 characters; unique (case-insensitively) among ``taken``, which it joins."""
    text = unicodedata.normalize("NFKD", str(name)).encode("ascii", "ignore").decode("ascii")
    text = _UNSAFE.sub("_", text).strip("._-")[:80] or "no-area"
    if text.split(".")[0].upper() in RESERVED_NAMES:
        text = "_" + text
    candidate, n = text, 1
    while (candidate + suffix).lower() in taken:
        n += 1
        candidate = f"{text}-{n}"
    taken.add((candidate + suffix).lower())
    return candidate + suffix


def repair_items(audit, min_severity: str = PLANNED_FROM) -> pd.DataFrame:
    """Findings of the items to repair (rows at or above ``min_severity``), worst first."""
    findings = audit.findings
    if not len(findings):
        return findings
    ranks = findings["severity"].map(SEVERITY_RANK).to_numpy()
    worst_per_row = pd.Series(ranks).groupby(findings["row"].to_numpy()).max()
    rows = worst_per_row.index[worst_per_row.to_numpy() >= SEVERITY_RANK[min_severity]]
    return worst_first(findings.loc[findings["row"].isin(rows)])


def build_orders(audit, min_severity: str = PLANNED_FROM) -> list[dict]:
    """One record per tag to repair, grouped by area, worst priority first in each area.

    A tag on several (differing) register rows is audited on each row and gets one work order
    that lists each row (``parts``, worst first): its findings and quantities, summed over the
    rows in ``quantities``.  The order's area, location and description are its worst row's.
    """
    if SEVERITY_RANK[min_severity] < SEVERITY_RANK[PLANNED_FROM]:
        raise ValueError(f"work orders start at {PLANNED_FROM!r} findings (audit.planning."
                         f"PLANNED_FROM): the rows below are not planned, not {min_severity!r}")
    findings = repair_items(audit, min_severity)
    if not len(findings):
        return []
    table, results, rows_planned = audit.table, audit.results, audit.planning
    places = location_columns(table)
    payback = results["payback [yr]"].to_numpy(float)
    columns = [c for c in table.columns if not str(c).startswith("raw:")] + ["raw:temp"] * ("raw:temp" in table)
    by_tag: dict = {}
    words = _Words(findings.columns)
    for row, item, records in _row_records(findings, table, columns):  # in order of worst finding
        rank = max(SEVERITY_RANK[f["severity"]] for f in records)
        part = {
            "row": int(row), "source": item["source"], "rank": rank,
            "description": _description(item),
            "findings": [{"check": f["check"], "severity": f["severity"], "found": words.found(f),
                          "conditions": words.conditions(f), "message": f["message"],
                          "remedy": f["remedy"], "source": item["source"],
                          # with --history: since when the finding has stood
                          "first_reported": f.get("first_reported", "")} for f in records],
            "payback": float(payback[row]),
            # the row's planned work, hours and cost (audit/planning.py), labelled for print
            **rows_planned.part(int(row)),
        }
        part["quantities"] = [_labelled(q) for q in part["quantities"]]
        words.share_part(part)
        order = by_tag.get(item["tag"])
        if order is None:
            by_tag[item["tag"]] = order = {
                "row": int(row), "tag": item["tag"], "source": item["source"],
                "area": str(item["area_code"] or ""), "rank": rank,
                "location": [(c, text_of(item[c])) for c in places if text_of(item[c])],
                "description": part["description"], "parts": []}
        order["parts"].append(part)
        order["rank"] = max(order["rank"], rank)
    orders = []
    planning = planning_rules(audit.rules)
    for order in by_tag.values():
        parts = sorted(order["parts"], key=lambda p: -p["rank"])  # stable: register order within
        order.update(
            parts=parts, priority=SEVERITIES[order["rank"]],
            sources=[p["source"] for p in parts],
            findings=[f for p in parts for f in p["findings"]],
            remedies=_iced(parts) + list(dict.fromkeys(
                f["remedy"] for p in parts for f in p["findings"] if f["remedy"])),
            quantities=_summed([q for p in parts for q in p["quantities"]]),
            payback=min((p["payback"] for p in parts if np.isfinite(p["payback"])), default=np.inf))
        order["planning"] = plan = plan_order(order, parts, planning)
        plan["materials"] = "; ".join(_material_line(q) for q in order["quantities"])
        plan["shown"] = {k: fmt(plan[k]) for k in ("labour_h", "guard_alternative_cost", *MONEY)}
        plan["currency"] = audit.economics.currency
        words.share_order(order)
        orders.append(order)
    # priority: severity, then the shortest payback (none last)
    orders.sort(key=lambda o: (o["area"], -o["rank"], o["payback"], str(o["tag"])))
    return orders


class _Words:
    """The texts of a plant's work orders, each distinct one kept once: orders repeat their
    words (sizes, build-ups, scenarios, limits, planning figures), and 90,000 orders holding
    their own copies were hundreds of MiB.  Texts worded from numbers are worded once per
    distinct value."""

    def __init__(self, finding_columns):
        self._kept: dict = {}
        self._air = next(c for c in finding_columns if str(c).startswith("air_temp ["))
        self._wind = next(c for c in finding_columns if str(c).startswith("wind ["))

    def one(self, value):
        """The one kept object equal to ``value`` (a text, or a tuple of texts)."""
        return self._kept.setdefault(value, value)

    def found(self, f: dict) -> str:
        """A finding's value against its limit, in words."""
        key = ("found", _key(f["value"]), _key(f["limit"]), f["unit"])
        if key not in self._kept:
            self._kept[key] = self.one(f"{fmt(f['value'])} {f['unit']} against a limit of "
                                       f"{fmt(f['limit'])} {f['unit']}")
        return self._kept[key]

    def conditions(self, f: dict) -> str:
        """:func:`conditions_text` of a finding: the plant's few scenarios, worded once each."""
        key = ("conditions", f["site"], _key(f[self._air]), _key(f[self._wind]), _key(f["rh [%]"]))
        if key not in self._kept:
            self._kept[key] = self.one(conditions_text(f))
        return self._kept[key]

    def share_part(self, part: dict) -> None:
        """``part``'s description pairs and quantity texts replaced, in place, by kept ones."""
        part["description"] = [self.one(pair) for pair in part["description"]]
        for f in part["findings"]:
            f["message"], f["remedy"] = self.one(f["message"]), self.one(f["remedy"])
        part["quantities"] = [{k: self.one(v) if isinstance(v, str) else v for k, v in q.items()}
                              for q in part["quantities"]]

    def share_order(self, order: dict) -> None:
        """``order``'s location pairs and planning texts replaced, in place, by kept ones (its
        description, findings and quantities are its parts')."""
        order["location"] = [self.one(pair) for pair in order["location"]]
        plan = order["planning"]
        plan.update({k: self.one(v) for k, v in plan.items() if isinstance(v, str)})
        plan["shown"] = {k: self.one(v) for k, v in plan["shown"].items()}


def _key(number):
    """A number as a dictionary key: NaN (never equal to itself) as None."""
    return None if number != number else number


#: Register rows whose findings and item are turned into Python records at a time: records of
#: every row at once (a dict per finding and per item, 300 MiB at 100,000 items) were the peak
#: of the default run; a chunk's are let go before the next is made.
RECORDS_CHUNK = 4096


def _row_records(findings: pd.DataFrame, table: pd.DataFrame, columns: list[str]):
    """(row, item record, the row's finding records) for each row of ``findings``, the rows in
    order of their first finding, the findings in their order within it; made
    :data:`RECORDS_CHUNK` rows at a time."""
    finding_rows = findings["row"].to_numpy(int)
    distinct, first = np.unique(finding_rows, return_index=True)
    rows = distinct[np.argsort(first, kind="stable")]
    for start in range(0, rows.size, RECORDS_CHUNK):
        chunk = rows[start:start + RECORDS_CHUNK]
        by_row = {int(row): [] for row in chunk}
        for finding in findings[np.isin(finding_rows, chunk)].to_dict(orient="records"):
            by_row[finding["row"]].append(finding)
        items = table.iloc[chunk][columns].to_dict(orient="records")
        for row, item in zip(chunk, items):
            yield row, item, by_row[int(row)]
        del by_row, items
        give_back()  # the chunk's records, freed among the orders kept


#: The precaution a work order leads with when a finding says the surface grows ice.
DE_ICE = "ice: de-ice before work"


def _iced(parts: list[dict]) -> list[str]:
    """``[DE_ICE]`` when a condensation finding of the order says its surface grows ice."""
    return [DE_ICE] if any(p["iced"] for p in parts) else []


@dataclass
class PackPlan:
    """Which work orders the PDF packs print: at most ``cap`` item pages, the most severe first.

    ``orders``: every work order (all go to workorders.csv); ``printed``: those on paper, by
    area; ``beyond``: those left off the paper, by area (area -> orders, worst first).
    """

    orders: list
    cap: int
    printed: dict = field(default_factory=dict)
    beyond: dict = field(default_factory=dict)

    @property
    def capped(self) -> bool:
        return bool(self.beyond)

    def summary(self) -> dict:
        """What the report's cover and each pack say about the cap."""
        return {"orders": len(self.orders), "cap": self.cap,
                "printed": sum(map(len, self.printed.values())),
                "beyond": sum(map(len, self.beyond.values())),
                "beyond_by_area": [(area or "(no area)", len(o)) for area, o in sorted(self.beyond.items())]}


def plan_packs(orders: list[dict], max_pages: int | None = None) -> PackPlan:
    """Split ``orders`` (as :func:`build_orders` sorts them) into those the packs print, the
    ``max_pages`` (default :data:`MAX_WORKORDER_PAGES`) most severe, the areas taking turns
    within a severity, and the rest, by area."""
    cap = MAX_WORKORDER_PAGES if max_pages is None else max_pages
    if cap < 0:
        raise ValueError(f"max_pages must be 0 or more, not {cap!r}")
    # Most severe first; within a severity the areas take turns (each area's own order kept),
    # so a cap shared by many areas prints some of each, and the packs stay small and even.
    turn, seen = [], defaultdict(int)
    for order in orders:
        key = (order["area"], order["rank"])
        turn.append(seen[key])
        seen[key] += 1
    ranked = sorted(range(len(orders)), key=lambda i: (-orders[i]["rank"], turn[i], orders[i]["area"]))
    kept = np.zeros(len(orders), bool)
    kept[ranked[:cap]] = True
    plan = PackPlan(orders, cap)
    for order, on_paper in zip(orders, kept):
        (plan.printed if on_paper else plan.beyond).setdefault(order["area"], []).append(order)
    return plan


def write_workorders(audit, out_dir, *, caution: str, meta: dict,
                     min_severity: str = PLANNED_FROM, pdf: bool = True, jobs: int | None = None,
                     max_pages: int | None = None, plan: PackPlan | None = None,
                     units: str = "si") -> list[Path]:
    """``workorders.csv`` and, with ``pdf``, ``workorders/<area>.pdf``; the paths written.

    ``workorders.csv`` lists every work order.  The PDF packs hold at most ``max_pages``
    (default :data:`MAX_WORKORDER_PAGES`) item pages, the most severe first: a page takes
    about 0.1 s to render, so a register with tens of thousands of repairs gets its worst
    items on paper and the rest in the CSV; each pack's first page states the cap and lists
    the orders left off by area (their ``work_order_file`` in the CSV is empty).  ``plan``
    (from :func:`plan_packs`) is used as given when the caller already made one.  The area
    packs are rendered by ``jobs`` processes (default: one per CPU) when there are more than
    :data:`PARALLEL_FROM` pages; the HTML is built here, so the output is the same.  Every
    file is written to a temporary name and renamed into place
    (:class:`~audit.io.writers.place.OutputFolder`).  ``units``: the unit system of the
    packs and the CSV (orders are built in SI and converted when printed).
    """
    with writing_workorders(audit, out_dir, caution=caution, meta=meta, min_severity=min_severity,
                            pdf=pdf, jobs=jobs, max_pages=max_pages, plan=plan,
                            units=units) as written:
        pass
    return written


@contextmanager
def writing_workorders(audit, out_dir, *, caution: str, meta: dict, min_severity: str = PLANNED_FROM,
                       pdf: bool = True, jobs: int | None = None, max_pages: int | None = None,
                       plan: PackPlan | None = None, units: str = "si"):
    """:func:`write_workorders` (same arguments) with the packs rendered by the worker processes
    while the ``with`` block runs: the caller lays out its own PDF meanwhile, on a core that
    would otherwise wait.  Yields the list of paths written, filled when the block ends (the
    packs awaited and placed, then ``workorders.csv``).  When the block raises, the workers
    are stopped and nothing of the packs is left in ``out_dir``."""
    folder = OutputFolder(out_dir)
    folder.prepare()
    if plan is None:
        plan = plan_packs(build_orders(audit, min_severity), max_pages)
    taken: set[str] = set()
    files = {area: safe_filename(area or "no-area", taken, ".pdf") for area in sorted(plan.printed)}
    tasks, workers = [], 1
    if pdf and plan.printed:
        summary = plan.summary()
        for area, area_orders in sorted(plan.printed.items()):
            name = "workorders/" + files[area]
            target = folder.check(name)
            tasks.append((render("workorders.html", {
                "area": area or "(no area)", "area_label": _UNSAFE_LABEL.sub("_", area or "none"),
                "orders": [shown_order(o, units) for o in area_orders], "caution": caution,
                "meta": meta, "bill": [shown_quantity(b, units) for b in _bill(area_orders)],
                "thickness_unit": thickness_label(units),
                "planner_fields": planner_fields(PLANNER_FIELDS, units),
                "min_severity": min_severity, "cap": summary,
                "not_printed_here": [o["tag"] for o in plan.beyond.get(area, [])[:NOT_PRINTED_NAMED]],
                "not_printed_count": len(plan.beyond.get(area, [])),
                "rows_printed": ROWS_PRINTED}),
                temporary_for(target), name))
        jobs = (os.cpu_count() or 1) if jobs is None else jobs
        workers = min(jobs, len(tasks)) if len(plan.orders) > PARALLEL_FROM else 1
    written = []
    with packs_rendered(folder, tasks, workers) as packs:
        yield written
    written += packs
    tasks.clear()  # the packs' HTML, laid out and written: not held while the CSV is made
    give_back()
    printed = {id(o) for area_orders in plan.printed.values() for o in area_orders}
    places = location_columns(audit.table)
    csv_rows = _csv(plan.orders, files, places, printed)
    with folder.writing("workorders.csv") as temporary:
        write_csv(display_units.frame(csv_rows, units, keep=places), temporary)
    written.append(folder.root / "workorders.csv")


def render_packs(folder: OutputFolder, tasks: list, workers: int) -> list[Path]:
    """Render each (html, temporary, name) to its temporary file, in ``workers`` processes, and
    rename each into place here, in the parent (:func:`packs_rendered` with nothing to do
    meanwhile)."""
    with packs_rendered(folder, tasks, workers) as written:
        pass
    return written


@contextmanager
def packs_rendered(folder: OutputFolder, tasks: list, workers: int):
    """Render each (html, temporary, name) to its temporary file and rename each into place
    here, in the parent; yields the list of paths placed, filled when the ``with`` block ends.

    With ``workers`` > 1 the packs are rendered by that many processes, started before the
    block runs; with one, here after it.  The workers die with the parent (Linux: a
    parent-death signal), and the pool is terminated when the parent stops for any reason
    (Ctrl-C, SIGTERM turned into an exception, an error in the block), so no worker writes
    into the folder after the run is over; temporaries left are removed.
    """
    written = []
    try:
        if workers > 1:
            with multiprocessing.get_context("fork").Pool(workers, initializer=_die_with_parent) as pool:
                rendered = pool.imap(_render_pack, tasks)  # imap keeps the order; starts at once
                yield written
                for task, _ in zip(tasks, rendered):
                    written.append(_place(folder, task))
        else:
            yield written
            for task in tasks:
                _render_pack(task)
                written.append(_place(folder, task))
    except BaseException:
        for _, temporary, _ in tasks:
            temporary.unlink(missing_ok=True)
        raise


def _render_pack(task) -> None:
    html, temporary, _ = task
    write_pdf(html, temporary, fetcher=EmbeddedOnlyFetcher())


def _place(folder: OutputFolder, task) -> Path:
    _, temporary, name = task
    target = folder.check(name)
    os.replace(temporary, target)
    return target


def _die_with_parent() -> None:
    """In a worker: be sent SIGTERM when the parent process dies (Linux ``prctl``), and let
    SIGINT to the whole group be the parent's to handle.  SIGTERM gets its default action back:
    a forked worker inherits the command line's handler, which would raise in the worker (and
    print its traceback) when the pool is terminated at its end."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGTERM)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # not Linux: the parent's terminate() still stops us
        pass
    if os.getppid() == 1:  # the parent died before the signal was set
        os._exit(1)


def _description(item) -> list[tuple[str, str]]:
    shape = text_of(item["shape"])
    rows = [("shape", shape), ("size", size_words(item) if shape != "flat" else "flat")]
    if shape == "flat":
        rows.append(("area", f"{fmt(item['area_m2'])} m²"))
    else:
        rows.append(("length", f"{fmt(item['length_m'])} m"))
    temp = float(item["temp_K"])
    raw = text_of(item.get("raw:temp", ""))
    shown = f"{fmt(temp - 273.15)} °C" if np.isfinite(temp) else (raw or "–")
    rows += [("operating temperature", shown + (f" (register: {raw})" if raw and np.isfinite(temp) else "")),
             ("installed insulation", layers_words(item)), ("jacket", text_of(item["jacket"]) or "–"),
             ("condition", text_of(item["condition"]) + (f", {fmt(item['damaged_pct'])} % bare"
                                                      if item["condition"] == "damaged" else "")),
             ("accessible", "yes" if bool(item["accessible"]) else "no"),
             ("register row", text_of(item["source"]))]
    return rows


#: workorders.csv quantity columns
QUANTITY_COLUMNS = ["insulate [m]", "insulate [m2]", "reinstate [m]", "reinstate [m2]",
                    "guard [m]", "guard [m2]", "guard [pcs]"]
#: workorders.csv planning columns -> key of the order's planning (audit/planning.py)
PLANNING_COLUMNS = {"scaffold": "scaffold", "asbestos_survey": "asbestos_survey",
                    "labour [h]": "labour_h", "installed_cost": "installed_cost",
                    "guard_cost": "guard_cost", "scaffold_cost": "scaffold_cost",
                    "repair_cost": "repair_cost", "guard_alternative_cost": "guard_alternative_cost",
                    "planning_note": "planning_note",
                    "materials": "materials"}


def _labelled(q: dict) -> dict:
    """A row's quantity with its printed thickness and quantity text."""
    mm = q["thickness_mm"]
    return {**q, "thickness": fmt(mm) if np.isfinite(mm) else "",
            "text": fmt(q["quantity"]) if q["unit"] != "pcs" else str(int(q["quantity"]))}


def _material_line(q: dict) -> str:
    """One line of an order's materials list: work, size, material and thickness, quantity."""
    what = " ".join(x for x in (q["material"], f"{q['thickness']} mm" if q["thickness"] else "")
                    if x)
    return f"{q['work']} {q['size']}" + (f" {what}" if what else "") + f": {q['text']} {q['unit']}"


def _summed(quantities: list[dict]) -> list[dict]:
    """Quantities with the same work, size, material, thickness and unit added up.  A row
    that nothing was added to is the row given (not a copy) where its text already reads as
    the total's would: most orders' rows are their one register row's."""
    totals: dict = {}
    for q in quantities:
        key = (q["work"], q["od_m"], q["size"], q["material"], np.nan_to_num(q["thickness_mm"]),
               q["thickness"], q["unit"])
        if key in totals:
            totals[key] = dict(totals[key], quantity=totals[key]["quantity"] + q["quantity"])
        else:
            totals[key] = q
    out = []
    for q in (totals[k] for k in sorted(totals)):
        text = fmt(q["quantity"]) if q["unit"] != "pcs" else str(int(q["quantity"]))
        out.append(q if q.get("text") == text else dict(q, text=text))
    return out


def _bill(orders: list[dict]) -> list[dict]:
    """The area's quantities summed by work, size, material, thickness and unit; sizes in
    order of diameter, thicknesses in order of thickness."""
    return _summed([q for order in orders for q in order["quantities"]
                    if np.isfinite(q["quantity"])])


def _csv(orders: list[dict], files: dict, places: list[str], printed: set) -> pd.DataFrame:
    """One row per work order (per tag; ``rows`` counts its register rows, ``source`` lists
    them); ``work_order_file`` is empty for one left off the packs."""
    columns = ["work_order_key", "tag", "area_code", "priority", "checks", "remedy", "remedy_material",
               "remedy_thickness [mm]", *QUANTITY_COLUMNS[:4], "valve_covers", "flange_covers",
               *QUANTITY_COLUMNS[4:], *PLANNING_COLUMNS, "sequence", "rows", "first_reported",
               "source", "work_order_file",
               *[c for c in places if c != "area_code"]]
    rows = []  # a tuple per order in column order (a dict each would hold every key again)
    for o in orders:
        q = defaultdict(float)
        for item in o["quantities"]:
            work, unit = item["work"], item["unit"].replace("²", "2")
            if work.startswith(GUARD):
                q[f"guard [{unit}]"] += item["quantity"]
            elif unit == "pcs":
                q["valve" if work.endswith("valve") else "flange"] += item["quantity"]
            elif work == INSULATE:
                q[f"insulate [{unit}]"] += item["quantity"]
            else:
                q[f"reinstate [{unit}]"] += item["quantity"]
        insulation = [x for x in o["quantities"] if x["work"] == INSULATE]
        thickest = max(insulation, key=lambda x: x["thickness_mm"], default=None)
        location = dict(o["location"])
        plan = {**o["planning"], "planning_note": "; ".join(o["planning"]["notes"])}
        row = {
            "work_order_key": plan["key"],
            "tag": o["tag"], "area_code": o["area"], "priority": o["priority"],
            "checks": ";".join(dict.fromkeys(f["check"] for f in o["findings"])),
            "remedy": "; ".join(o["remedies"]),
            "remedy_material": thickest["material"] if thickest else "",
            "remedy_thickness [mm]": thickest["thickness_mm"] if thickest else np.nan,
            **{c: q.get(c, np.nan) for c in QUANTITY_COLUMNS},
            "valve_covers": int(q.get("valve", 0)), "flange_covers": int(q.get("flange", 0)),
            **{c: plan[k] for c, k in PLANNING_COLUMNS.items()},
            "sequence": " -> ".join(plan["sequence"]),
            "rows": len(o["parts"]), "source": "; ".join(o["sources"]),
            "work_order_file": "workorders/" + files[o["area"]] if id(o) in printed else "",
            "first_reported": min((f["first_reported"] for f in o["findings"]), default=""),
            **{c: location.get(c, "") for c in places if c != "area_code"},
        }
        rows.append(tuple(row[c] for c in columns))
    frame = pd.DataFrame.from_records(rows, columns=columns)
    if not frame["first_reported"].astype(bool).any():  # only with --history
        frame = frame.drop(columns="first_reported")
    return frame

