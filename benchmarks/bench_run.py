"""Benchmark: a whole audit on generated registers of 1,000, 10,000 and 100,000 items.

For each size, an invented register whose names all exist in the shipped rules is timed
stage by stage: read, resolve names, thermal states (own conditions), checks, remedies,
economics, results table, write CSV, JSON and XLSX, render HTML and PDF; then the peak memory,
and the command end to end as a user runs it: ``lagaudit run --format csv`` and the default
``lagaudit run`` (every format), each with its wall time and peak memory (the largest resident
set of the command's process or of any worker it waited for).  Targets (issue 16, 2-core
machine, 100,000 items): CSV-only under 5 s, the default run within 4 times the CSV-only run,
peak memory of the default run at most 1.5 GB.  ``--items 1000000 --csv-only`` runs the
million-item CSV run alone.  Not a test: run
``python benchmarks/bench_run.py [--items 1000,10000] [--no-reports] [--no-end-to-end] [--csv-only]``.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd


def make_register(rows: int, seed: int = 2) -> pd.DataFrame:
    """``rows`` invented items, mostly pipes, some vessels, with names from the shipped rules."""
    rng = np.random.default_rng(seed)

    def pick(options):
        return rng.choice(np.array(options, dtype=object), rows)

    shape = pick(["pipe"] * 18 + ["vertical-vessel", "horizontal-vessel"])
    vessel = shape != "pipe"
    return pd.DataFrame({
        "tag": [f"BX-{i:06d}" for i in range(rows)],
        "shape": shape,
        "nps": np.where(vessel, "", pick(["1/2", "1", "1-1/2", "2", "3", "4", "6", "8", "10",
                                          "12", "16", "24", "DN50", "DN150"])),
        "od": np.where(vessel, pick(["1200 mm", "1800 mm", "2.4 m", "3 m"]), ""),
        "length": pick([f"{x:.1f}" for x in np.arange(1, 60, 0.5)]),
        "temp": pick([str(t) for t in range(-40, 420, 5)] + ["AMB", "300 F"]),
        "layers": pick(["mineral-wool 50mm", "mineral-wool 2in", "calcium-silicate 50mm + mineral-wool 50mm",
                        "cellular-glass 40mm", "mineral-wool 80mm", "none"]),
        "jacket": pick(["aluminium-oxidised", "stainless-steel", "galvanised-steel-weathered"]),
        "location": pick(["outdoor-annual-mean", "indoor"]),
        "accessible": pick(["yes", "no"]),
        "condition": pick(["intact"] * 17 + ["wet", "missing", "damaged"]),
        "damaged": "20",
        "material": pick(["carbon-steel", "stainless-steel"]),
        "service": pick(["heat-conservation", "personnel", ""]),
        "valves": pick(["0", "0", "1", "2"]),
        "flanges": pick(["0", "2", "4"]),
        "area_code": pick([f"U-{u}" for u in range(100, 140)]),
    })


def item_table(frame: pd.DataFrame, rules):
    """``frame`` read as ``lagaudit run`` reads a register file: written to CSV, read with the
    rules' reader options, names resolved."""
    from audit.io.readers import read_register, reader_options
    from audit.thermal import resolve_names

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "register.csv"
        frame.to_csv(path, index=False)
        return resolve_names(read_register(path, **reader_options(rules)), rules)


def timed(label, function, *args, **kwargs):
    start = time.perf_counter()
    value = function(*args, **kwargs)
    print(f"  {label:<28} {time.perf_counter() - start:7.2f} s", flush=True)
    return value


def run_size(items: int, folder: Path, *, end_to_end: bool, reports: bool) -> None:
    from audit.checks import check_kinds, run_checks, summarise_per_row, validate_checks
    from audit.checks.base import CheckContext
    from audit.checks.remedy import fill_remedies
    from audit.economics import compute_economics, economic_rules
    from audit.io.readers import read_register, reader_options
    from audit.io.writers import write_csv, write_json, write_xlsx
    from audit.pipeline import Audit
    from audit.planning import ROW_COLUMNS, plan_rows, planning_rules
    from audit.report import write_reports
    from audit.results import build_results
    from audit.rules import load_rules
    from audit.thermal import resolve_names

    register = folder / f"register-{items}.csv"
    make_register(items).to_csv(register, index=False)
    print(f"register: {items} rows", flush=True)
    rules = timed("load rules", load_rules)
    params = validate_checks(rules)
    table = timed("read register", read_register, register, **reader_options(rules))
    table = timed("resolve names", resolve_names, table, rules)
    context = CheckContext(table, rules)
    states = timed("thermal states (own)", context.states, "")
    findings = timed("checks (all scenarios)", run_checks, context, params)
    findings = timed("remedies", fill_remedies, context, findings, check_kinds(), params)
    econ = economic_rules(rules)
    repairs = timed("planning (work per row)", plan_rows, table, states, findings,
                    planning_rules(rules), econ.repair)
    economics = timed("economics", compute_economics, context, findings, rules,
                      economic_rules=econ, repairs=repairs)
    names, worst = summarise_per_row(findings, len(table))
    extra = pd.concat([economics.per_row, repairs.frame[ROW_COLUMNS]], axis=1)
    results = timed("results table", build_results, table, states, findings=names,
                    severity=worst, extra=extra)
    out = folder / f"out-{items}"
    out.mkdir()
    timed("write results.csv", write_csv, results, out / "results.csv")
    timed("write results.json", write_json, results, out / "results.json", meta={})
    timed("write results.xlsx", write_xlsx, {"results": results,
                                             "findings": findings.drop(columns=["row"])},
          out / "results.xlsx")
    if reports:
        audit = Audit(rules, table, results, findings, economics, states, planning=repairs)
        meta = {"tool": "lagaudit benchmark", "run_at": "", "registers": [], "surface_model": ""}
        timed("render report.html", write_reports, audit, out, meta=meta, formats=["html"],
              economics=economics)
        timed("render report.pdf", write_reports, audit, out, meta=meta, formats=["pdf"],
              economics=economics)
    audited = int((results["status"] == "audited").sum())
    print(f"  audited {audited}, rejected {len(results) - audited}, findings {len(findings)}; "
          f"peak memory (process max RSS so far) "
          f"{resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MiB", flush=True)
    if end_to_end:
        end_to_end_runs(register, folder, items, csv_only=False)


def command(register: Path, out: Path, *options) -> tuple[float, float]:
    """``lagaudit run REGISTER --out OUT -q OPTIONS`` as a user runs it: (wall s, peak MiB)."""
    start = time.perf_counter()
    child = subprocess.Popen([sys.executable, "-m", "audit", "run", str(register),
                              "--out", str(out), "-q", *options])
    _, status, usage = os.wait4(child.pid, 0)  # the child's own rusage, its waited workers too
    child.returncode = os.waitstatus_to_exitcode(status)
    if child.returncode not in (0, 1):
        raise SystemExit(f"lagaudit run exited {child.returncode}")
    return time.perf_counter() - start, usage.ru_maxrss / 1024


def end_to_end_runs(register: Path, folder: Path, items: int, *, csv_only: bool) -> None:
    load = os.getloadavg()[0]
    seconds, peak = command(register, folder / f"cli-csv-{items}", "--format", "csv")
    print(f"  end to end: lagaudit run --format csv {seconds:7.2f} s  peak {peak:6.0f} MiB  "
          f"({peak * 1024 ** 2 / items / 1024:.1f} KiB/item; load {load:.1f})   target < 5 s at "
          f"100,000: {_verdict(items, seconds < 5.0)}", flush=True)
    if csv_only:
        return
    load = os.getloadavg()[0]
    total, peak_all = command(register, folder / f"cli-all-{items}")
    print(f"  end to end: lagaudit run (all formats) {total:7.2f} s  peak {peak_all:6.0f} MiB  "
          f"(load {load:.1f})\n"
          f"    {total / seconds:.1f} x the CSV-only run   target <= 4 x: "
          f"{_verdict(items, total <= 4 * seconds)}\n"
          f"    peak memory                          target <= 1.5 GB at 100,000: "
          f"{_verdict(items, peak_all <= 1536)}", flush=True)


def _verdict(items: int, met: bool) -> str:
    return ("PASS" if met else "MISS") if items == 100_000 else "-"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", default="1000,10000,100000",
                        help="comma list of register sizes (default: 1000,10000,100000)")
    parser.add_argument("--no-reports", action="store_true", help="skip the HTML and PDF report")
    parser.add_argument("--no-end-to-end", action="store_true", help="skip the command-line run")
    parser.add_argument("--csv-only", action="store_true",
                        help="only the CSV-only command end to end (for 1,000,000 items)")
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs", flush=True)
    with tempfile.TemporaryDirectory() as folder:
        for items in (int(x) for x in args.items.split(",")):
            if args.csv_only:
                register = Path(folder) / f"register-{items}.csv"
                make_register(items).to_csv(register, index=False)
                end_to_end_runs(register, Path(folder), items, csv_only=True)
                continue
            run_size(items, Path(folder), end_to_end=not args.no_end_to_end,
                     reports=not args.no_reports)


if __name__ == "__main__":
    main()
