"""Benchmark: the economics of a generated register (energy, repairs, economic thickness).

Uses the invented register of ``bench_run.py`` (default 100,000 rows), runs the checks as the
pipeline does, then times ``compute_economics`` on the same context (the energy site's states
are then already solved, as in a real run) and its parts.  Not a test: run
``python benchmarks/bench_economics.py [--items N]``.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_run import item_table, make_register, timed  # noqa: E402


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", type=int, default=100_000)
    args = parser.parse_args()

    from audit.checks import check_kinds, run_checks, validate_checks
    from audit.checks.remedy import fill_remedies
    from audit.checks.base import CheckContext
    from audit.economics import compute_economics, load_economic_rules
    from audit.planning import plan_rows, planning_rules
    from audit.rules import load_rules

    print(f"register: {args.items} rows")
    rules = load_rules()
    econ = timed("load economic rules", load_economic_rules)
    table = item_table(make_register(args.items), rules)
    context = CheckContext(table, rules)
    params = validate_checks(rules)
    findings = timed("checks (all scenarios)", run_checks, context, params)
    findings = timed("remedies", fill_remedies, context, findings, check_kinds(), params)
    repairs = timed("plan_rows", plan_rows, table, context.states(""), findings,
                    planning_rules(rules), econ.repair)
    got = timed("compute_economics", compute_economics, context, findings, rules,
                economic_rules=econ, repairs=repairs)
    fresh = CheckContext(table, rules)
    start = time.perf_counter()
    compute_economics(fresh, findings, rules, economic_rules=econ, repairs=repairs)
    print(f"  {'compute_economics (no cache)':<28} {time.perf_counter() - start:7.2f} s")
    row = got.per_row
    print(f"  items with energy {int(row['annual_energy [MWh]'].notna().sum())}, "
          f"repairs {int((row['repair'] != '').sum())}, "
          f"economic thickness {int(row['economic_thickness [mm]'].notna().sum())}; "
          f"{len(rules.thicknesses)} candidate thicknesses")


if __name__ == "__main__":
    main()
