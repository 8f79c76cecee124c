"""Benchmark: writing results.csv and findings.csv, pandas' ``to_csv`` against ``write_csv``.

Builds a results-like table (100,000 rows: 60 float columns with NaNs, 10 text columns drawn
from a few hundred distinct strings, some formula-looking, 2 bool columns) and a findings-like
table (220,000 rows x 19 columns), both invented, and prints the best of ``--runs`` wall-clock
seconds for:

- the former path, ``neutralise_frame(t).to_csv(path, index=False, encoding="utf-8",
  lineterminator="\\r\\n")`` with the former cell-by-cell ``neutralise_frame`` (kept here as the
  reference it replaced);
- ``audit.io.writers.write_csv`` (neutralise + the fast writer);
- ``neutralise_frame`` alone, former and current.

It also checks that both paths wrote the same bytes (exit status 1 if not: a speed ratio between
different files means nothing).  Targets: both files together well under 1.5 s, neutralise_frame
under 0.2 s for 100,000 rows (2-core machine).  Not a test: run
``PYTHONPATH=. python benchmarks/bench_csv.py`` from the repository root.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

from audit.io.writers import write_csv
from audit.io.writers.safety import _TRIGGERS, neutralise_frame, neutralise_text


def neutralise_frame_former(frame: pd.DataFrame) -> pd.DataFrame:
    """The cell-by-cell ``neutralise_frame`` this benchmark compares against."""
    out = frame.copy()
    out.columns = [neutralise_text(str(c)) for c in out.columns]
    for column in out.columns:
        series = out[column]
        if series.dtype == object or pd.api.types.is_string_dtype(series):
            is_text = series.map(type).eq(str).to_numpy() if series.dtype == object else \
                series.notna().to_numpy()
            starts = series.astype(str).str.startswith(_TRIGGERS).to_numpy(bool) & is_text
            if starts.any():
                values = series.to_numpy(object).copy()
                values[starts] = ["'" + v for v in values[starts]]
                out[column] = values
    return out


def _texts(rng, rows: int, options: list[str], missing: float = 0.0) -> pd.Series:
    values = rng.choice(np.array(options, dtype=object), rows)
    values[rng.random(rows) < missing] = None
    return pd.Series(values, dtype="str")


def make_results(rows: int, seed: int = 1) -> pd.DataFrame:
    """Results-like: 10 text columns, 60 float columns (full precision, 10 % NaN), 2 bool."""
    rng = np.random.default_rng(seed)
    columns = {
        "tag": pd.Series([f"HX-{i:06d}" for i in range(rows)], dtype="str"),
        "source": pd.Series([f"line_list.csv::{i + 2}" for i in range(rows)], dtype="str"),
        "status": _texts(rng, rows, ["audited"] * 9 + ["rejected"]),
        "reason": _texts(rng, rows, ["", "temp: 'TBA' is not a temperature (expected degC)",
                                     "nps: '=1+1' is not a pipe size, e.g. 4 or DN100"]),
        "findings": _texts(rng, rows, ["", "touch-temperature", "condensation;below-spec",
                                       "heat-loss-limit;condition", "cui-window"]),
        "severity": _texts(rng, rows, ["", "low", "medium", "high"]),
        "area_code": _texts(rng, rows, [f"U-{u}" for u in range(100, 140)]),
        "layers": _texts(rng, rows, ["mineral-wool 50mm", "calcium-silicate 40mm + mineral-wool 2in",
                                     "cellular-glass 80mm", "none"]),
        "remarks": _texts(rng, rows, ["", "see P&ID 12, sheet 3", '"hot" line', "=HYPERLINK(1)",
                                      "-5 spare", "two\r\nlines", "Prüfung nötig"], missing=0.2),
        "jacket": _texts(rng, rows, ["aluminium", "stainless steel", "galvanised steel", ""]),
    }
    for k in range(60):
        values = rng.lognormal(3.0, 2.0, rows) * rng.choice([-1.0, 1.0], rows, p=[0.1, 0.9])
        values[rng.random(rows) < 0.1] = np.nan
        columns[f"value_{k} [W]"] = values
    columns["accessible"] = rng.random(rows) < 0.3
    columns["temp_is_ambient"] = rng.random(rows) < 0.05
    return pd.DataFrame(columns)


def make_findings(rows: int, seed: int = 2) -> pd.DataFrame:
    """Findings-like: 19 columns, text repeated heavily, some floats, one bool."""
    rng = np.random.default_rng(seed)
    columns = {
        "tag": pd.Series([f"HX-{i // 2:06d}" for i in range(rows)], dtype="str"),
        "source": pd.Series([f"line_list.csv::{i // 2 + 2}" for i in range(rows)], dtype="str"),
        "check": _texts(rng, rows, ["touch-temperature", "condensation", "layer-overheat",
                                    "heat-loss-limit", "below-spec", "cui-window", "condition"]),
        "severity": _texts(rng, rows, ["low", "medium", "high"]),
        "site": _texts(rng, rows, ["outdoor", "indoor", "design-hot-day", "humid"]),
        "message": _texts(rng, rows, [f"surface {t} degC above the {L} degC limit"
                                      for t in range(60, 90) for L in (55, 60)]),
        "remedy": _texts(rng, rows, ["", "add 50 mm mineral-wool", "replace jacket"]),
        "area_code": _texts(rng, rows, [f"U-{u}" for u in range(100, 140)]),
        "limit_kind": _texts(rng, rows, ["max", "min"]),
        "unit": _texts(rng, rows, ["degC", "W/m", "W/m2", "mm"]),
        "rule_file": _texts(rng, rows, ["checks-touch.toml", "checks-condensation.toml"]),
    }
    for k in range(7):
        values = rng.normal(50.0, 30.0, rows)
        values[rng.random(rows) < 0.2] = np.nan
        columns[f"value_{k}"] = values
    columns["fixable"] = rng.random(rows) < 0.7
    return pd.DataFrame(columns)


def best(runs: int, function, *args) -> float:
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        function(*args)
        times.append(time.perf_counter() - start)
    return min(times)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--results-rows", type=int, default=100_000)
    parser.add_argument("--findings-rows", type=int, default=220_000)
    parser.add_argument("--runs", type=int, default=3)
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.2f}; pandas {pd.__version__}, numpy {np.__version__}")
    tables = {"results": make_results(args.results_rows), "findings": make_findings(args.findings_rows)}
    same = True
    total_old = total_new = 0.0
    with tempfile.TemporaryDirectory() as folder:
        for name, table in tables.items():
            old, new = Path(folder) / f"{name}-pandas.csv", Path(folder) / f"{name}-fast.csv"
            t_old = best(args.runs, lambda: neutralise_frame_former(table).to_csv(
                old, index=False, encoding="utf-8", lineterminator="\r\n"))
            t_new = best(args.runs, write_csv, table, new)
            total_old, total_new = total_old + t_old, total_new + t_new
            equal = old.read_bytes() == new.read_bytes()
            same &= equal
            print(f"{name}.csv {table.shape[0]} x {table.shape[1]}, {new.stat().st_size / 2**20:.0f} MiB: "
                  f"pandas path {t_old:6.2f} s   write_csv {t_new:6.2f} s   "
                  f"({t_old / t_new:.1f}x; bytes {'identical' if equal else 'DIFFER'})")
            print(f"  neutralise_frame: former {best(args.runs, neutralise_frame_former, table):6.3f} s"
                  f"   current {best(args.runs, neutralise_frame, table):6.3f} s")
    verdict = "PASS" if total_new < 1.5 else "MISS"
    print(f"both files: pandas path {total_old:6.2f} s   write_csv {total_new:6.2f} s "
          f"(target well under 1.5 s: {verdict})")
    return 0 if same else 1


if __name__ == "__main__":
    sys.exit(main())
