"""Benchmark: what a field survey adds to an audit.

For an invented register (``bench_run.make_register``) and an invented survey of some of its
items (readings 0 to 30 K beyond the prediction as registered, so that many items are audited
at a measured condition), times: the audit without the survey, the reconciliation alone, and
the audit with the survey (reconciliation, the measured contexts, checks and economics).
Not a test: run ``PYTHONPATH=. python benchmarks/bench_survey.py [--items 20000]
[--readings 2000]``; the machine's load is printed beside the times.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_run import item_table, make_register, timed  # noqa: E402

from audit.pipeline import audit_table  # noqa: E402
from audit.rules import load_rules  # noqa: E402
from audit.survey import reconcile  # noqa: E402


def readings_for(table: pd.DataFrame, rules, count: int, seed: int = 3) -> pd.DataFrame:
    """``count`` invented readings of accepted items: 12 degC air, 2 m/s, 70 %, emissivity
    0.95, each 0 to 30 K hotter than the item's prediction at those conditions."""
    rng = np.random.default_rng(seed)
    tags = rng.choice(table.loc[table["status"] == "ok", "tag"].to_numpy(object), count)
    frame = pd.DataFrame({
        "source": [f"bench_survey.csv::{i + 2}" for i in range(count)], "tag": tags,
        "surface_temp_K": 300.0, "ambient_K": 285.15, "wind_m_s": 2.0, "rh_pct": 70.0,
        "emissivity": 0.95, "date": "2026-10-14", "note": "", "position": "", "status": "ok",
        "reason": "", "warnings": ""})
    predicted = reconcile(frame, table, rules)["predicted_temp_K"].to_numpy(float)
    frame["surface_temp_K"] = predicted + rng.uniform(0.0, 30.0, count)
    return frame


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", type=int, default=20000)
    parser.add_argument("--readings", type=int, default=2000)
    args = parser.parse_args()
    rules = load_rules()
    table = item_table(make_register(args.items), rules)
    readings = readings_for(table, rules, args.readings)
    print(f"{args.items} items, {args.readings} readings; load average "
          f"{os.getloadavg()[0]:.1f} on {os.cpu_count()} CPUs")
    timed("audit without the survey", lambda: audit_table(table, rules))
    timed("reconciliation alone", lambda: reconcile(readings, table, rules))
    audit = timed("audit with the survey", lambda: audit_table(table, rules, readings=readings))
    print(f"items audited at a measured condition: {(audit.results['basis'] == 'measured').sum()}")


if __name__ == "__main__":
    main()
