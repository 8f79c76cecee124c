"""Benchmark: a whole audit on generated registers of 1,000, 10,000 and 100,000 items.

For each size, an invented register whose names all exist in the shipped rules is timed
stage by stage: read, resolve names, thermal states (own conditions), checks, remedies,
economics, results table, write CSV, write XLSX, render HTML and PDF; then the peak memory,
and ``lagaudit run --format csv`` end to end as a user runs it.  Targets: the 100,000-item CSV
run in under 10 s, the report in under 20 s, on a 2-core machine.  Not a test: run
``python benchmarks/bench_run.py [--items 1000,10000] [--no-reports] [--no-end-to-end]``.
"""

from __future__ import annotations

import argparse
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


def timed(label, function, *args, **kwargs):
    start = time.perf_counter()
    value = function(*args, **kwargs)
    print(f"  {label:<28} {time.perf_counter() - start:7.2f} s", flush=True)
    return value


def run_size(items: int, folder: Path, *, end_to_end: bool, reports: bool) -> None:
    from audit.checks import check_kinds, run_checks, summarise_per_row, validate_checks
    from audit.checks.base import CheckContext
    from audit.checks.remedy import fill_remedies
    from audit.economics import compute_economics, load_economic_rules
    from audit.io.readers import read_register
    from audit.io.writers import write_csv, write_xlsx
    from audit.pipeline import Audit
    from audit.report import write_reports
    from audit.results import build_results
    from audit.rules import load_rules
    from audit.thermal import resolve_names

    register = folder / f"register-{items}.csv"
    make_register(items).to_csv(register, index=False)
    print(f"register: {items} rows", flush=True)
    rules = timed("load rules", load_rules)
    params = validate_checks(rules)
    table = timed("read register", read_register, register, aliases=rules.aliases)
    table = timed("resolve names", resolve_names, table, rules)
    context = CheckContext(table, rules)
    states = timed("thermal states (own)", context.states, "")
    findings = timed("checks (all scenarios)", run_checks, context, params)
    findings = timed("remedies", fill_remedies, context, findings, check_kinds(), params)
    economics = timed("economics", compute_economics, context, findings, rules,
                      economic_rules=load_economic_rules(()))
    names, worst = summarise_per_row(findings, len(table))
    results = timed("results table", build_results, table, states, findings=names,
                    severity=worst, extra=economics.per_row)
    out = folder / f"out-{items}"
    out.mkdir()
    timed("write results.csv", write_csv, results, out / "results.csv")
    timed("write results.xlsx", write_xlsx, {"results": results,
                                             "findings": findings.drop(columns=["row"])},
          out / "results.xlsx")
    if reports:
        audit = Audit(rules, table, results, findings, economics)
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
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "audit", "run", str(register), "--format", "csv",
                        "--out", str(folder / f"cli-{items}"), "-q"], check=True)
        total = time.perf_counter() - start
        verdict = ("PASS" if total < 10.0 else "MISS") if items == 100_000 else "-"
        print(f"  end to end: lagaudit run --format csv {total:7.2f} s   "
              f"(target < 10 s for 100,000 items: {verdict})", flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", default="1000,10000,100000",
                        help="comma list of register sizes (default: 1000,10000,100000)")
    parser.add_argument("--no-reports", action="store_true", help="skip the HTML and PDF report")
    parser.add_argument("--no-end-to-end", action="store_true", help="skip the command-line run")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as folder:
        for items in (int(x) for x in args.items.split(",")):
            run_size(items, Path(folder), end_to_end=not args.no_end_to_end,
                     reports=not args.no_reports)


if __name__ == "__main__":
    main()
