"""Benchmark: the cold-weather columns of a generated register (tracing need, outlet
temperature, time to freeze) and their three checks.

Uses the invented register of ``bench_run.py`` (default 100,000 rows) with invented
cold-weather cells added: a fifth of the rows traced (electric or steam) with a maintain
temperature, a fifth flowing fuel oil or water, a tenth stagnant water at 8 degC.  Times each
column's solves on a fresh context, then the three checks with their remedies as the pipeline
runs them.  Not a test: run ``python benchmarks/bench_coldweather.py [--items N]``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_run import item_table, make_register, timed  # noqa: E402


CHECKS = ("tracing-shortfall", "freeze-risk", "temperature-drop")


def cold_weather_register(rows: int):
    """``make_register(rows)`` with tracing, maintain, flow and fluid cells (invented)."""
    frame = make_register(rows)
    rng = np.random.default_rng(20)
    role = rng.choice(["traced", "flowing", "stagnant", "other", "other"], rows,
                      p=[0.2, 0.2, 0.1, 0.25, 0.25])
    pipe = (frame["shape"] == "pipe").to_numpy()
    traced, flowing = pipe & (role == "traced"), pipe & (role == "flowing")
    stagnant = pipe & (role == "stagnant")
    frame["tracing"] = np.where(traced, rng.choice(["electric 30 W/m", "electric 2x20 W/m",
                                                    "steam 1/2in"], rows), "")
    frame["maintain"] = np.where(traced, "40", np.where(flowing, "5", ""))
    frame["flow"] = np.where(flowing, rng.choice(["0.5", "2", "8"], rows), "")
    frame["fluid"] = np.where(flowing, rng.choice(["fuel-oil", "water"], rows),
                              np.where(stagnant, "water", ""))
    frame.loc[stagnant, "temp"] = "8"
    frame.loc[flowing | traced, "temp"] = "90"
    frame.loc[stagnant | flowing | traced, "layers"] = "mineral-wool 50mm"
    return frame


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", type=int, default=100_000)
    args = parser.parse_args()

    from audit.checks import check_kinds, validate_checks
    from audit.checks.base import CheckContext
    from audit.checks.remedy import fill_remedies
    from audit.coldweather import freeze_times, outlet_temperatures, tracing_needed
    from audit.rules import load_rules

    rules = load_rules()
    params = validate_checks(rules)
    table = item_table(cold_weather_register(args.items), rules)
    print(f"register: {args.items} rows, {int((table['status'] == 'ok').sum())} accepted")
    context = CheckContext(table, rules)
    timed("cold-design-day states", context.states, "cold-design-day")
    need = timed("tracing_needed", tracing_needed, context, "cold-design-day", 1.2)
    outlet = timed("outlet_temp", outlet_temperatures, context, "cold-design-day")
    freeze = timed("time_to_freeze", freeze_times, context, "cold-design-day", 0.25)
    print(f"  lines: traced {int(np.isfinite(need).sum())}, flowing "
          f"{int(np.isfinite(outlet).sum())}, stagnant water {int(np.isfinite(freeze).sum() + np.isinf(freeze).sum())}")
    kinds = check_kinds()
    fresh = CheckContext(table, rules)
    frames = [timed(f"check {name}", kinds[name].findings, fresh, rules.checks[name],
                    params[name])
              for name in CHECKS]
    found = pd.concat(frames, ignore_index=True)
    print(f"  findings {len(found)}")
    timed("their remedies", fill_remedies, fresh, found, kinds, params)


if __name__ == "__main__":
    main()
