"""Benchmark: read and parse a 100,000-row register, as CSV and as XLSX.

Generates the register in a temporary folder (an invented plant: tags, sizes, temperatures and
insulation drawn from a few hundred distinct strings, as a real line list repeats them), then
prints the seconds taken by ``read_register`` for each.  Targets (issue 3): CSV under 1 s,
XLSX under 5 s on a 2-core machine.  Not a test: run ``python benchmarks/bench_import.py`` from
the repository root with the package installed (or ``PYTHONPATH=.``).

``--memory --rows 1000000`` instead writes a CSV of that many rows and reads it once in a fresh
process, printing the reader's peak resident memory (the process's peak after importing the
package, and the rise that reading caused), with the file's size for scale.
"""

from __future__ import annotations

import argparse
import gc
import importlib.util
import json
import os
import subprocess
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

from audit import units
from audit.io.readers import cells, read_register

RUNS = 3

ROWS = 100_000


def make_register(rows: int, seed: int = 1) -> pd.DataFrame:
    """A register of ``rows`` invented items with realistic repetition of cell texts."""
    rng = np.random.default_rng(seed)
    pick = lambda options: rng.choice(np.array(options, dtype=object), rows)  # noqa: E731
    return pd.DataFrame({
        "Line No": [f"HX-{i:06d}" for i in range(rows)],
        "Size": pick(["1/2", "3/4", "1", "1-1/2", '2"', "3", "4", "6", "8", "DN250", "12",
                      "1 1/2", "1.5", "DN50"]),
        "Length [m]": pick([f"{x:.1f}" for x in np.arange(1, 60, 0.5)]),
        "Op Temp": pick([str(t) for t in range(-40, 400, 5)]
                        + ["AMB", "120/150", "300 F", "TBA"]),
        "Insulation": pick(["mineral wool", "calcium silicate", "cellular glass", "none"]),
        "Insul Thk": pick(["25", "40", "50", "2x50", "50+40", "2 in", "80", "100"]),
        "Jacket": pick(["aluminium", "stainless steel", "galvanised steel"]),
        "Location": pick(["outdoor", "indoor"]),
        "Accessible": pick(["yes", "no", ""]),
        "Plant Area": pick([f"U-{u}" for u in range(100, 140)]),
        "Remarks": pick(["", "see P&ID 12", "check"]),
    })


def _clear_caches() -> None:
    """Forget every parsed cell text, so each run parses from scratch."""
    for parser in (cells.quantity, cells.temperature, cells.pipe_size, cells.thicknesses,
                   cells.layers, cells.choice, cells.yes_no, cells.count, units._parse_cached):
        parser.cache_clear()


_CHILD = """
import json, resource, sys, time
from audit.io.readers import read_register
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
start = time.perf_counter()
table = read_register(sys.argv[1])
seconds = time.perf_counter() - start
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
print(json.dumps({"rows": len(table), "ok": int((table["status"] == "ok").sum()),
                  "seconds": seconds, "before_kib": before, "peak_kib": peak}))
"""


def memory(rows: int) -> None:
    """Peak resident memory of one ``read_register`` of a ``rows``-row CSV, in a fresh process."""
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "bench.csv"
        frame = make_register(rows)
        frame.to_csv(path, index=False)
        del frame
        size = path.stat().st_size
        done = subprocess.run([sys.executable, "-c", _CHILD, str(path)], capture_output=True,
                              text=True, check=True, env={**os.environ})
        result = json.loads(done.stdout)
        print(f"csv : {result['rows']} rows ({result['ok']} ok), {size / 2**20:.0f} MiB on disk, "
              f"read in {result['seconds']:.1f} s; peak RSS {result['peak_kib'] / 2**10:.0f} MiB "
              f"({result['before_kib'] / 2**10:.0f} MiB after imports, so reading added "
              f"{(result['peak_kib'] - result['before_kib']) / 2**10:.0f} MiB)", flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=ROWS)
    parser.add_argument("--memory", action="store_true",
                        help="peak memory of one CSV read in a fresh process")
    args = parser.parse_args()
    if args.memory:
        memory(args.rows)
        return
    speed(args.rows)


def speed(rows: int) -> None:
    with tempfile.TemporaryDirectory() as folder:
        csv_path, xlsx_path = Path(folder) / "bench.csv", Path(folder) / "bench.xlsx"
        frame = make_register(rows)
        frame.to_csv(csv_path, index=False)
        # xlsxwriter writes 100,000 rows several times faster than openpyxl; either will do
        engine = "xlsxwriter" if importlib.util.find_spec("xlsxwriter") else "openpyxl"
        frame.to_excel(xlsx_path, index=False, engine=engine)
        del frame
        for path in (csv_path, xlsx_path):
            seconds = []
            for _ in range(RUNS):
                _clear_caches()
                gc.collect()
                start = time.perf_counter()
                table = read_register(path)
                seconds.append(time.perf_counter() - start)
                ok = int((table["status"] == "ok").sum())
                del table
            runs = ", ".join(f"{s:.2f}" for s in seconds)
            print(f"{path.suffix[1:]:4s}: {rows} rows ({ok} ok) read and parsed in "
                  f"{statistics.median(seconds):.2f} s (median of {RUNS}: {runs}; "
                  f"parse caches cleared before each run)", flush=True)
    sys.stdout.flush()


if __name__ == "__main__":
    main()
