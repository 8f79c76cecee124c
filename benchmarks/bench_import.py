"""Benchmark: read and parse a 100,000-row register, as CSV and as XLSX.

Generates the register in a temporary folder (an invented plant: tags, sizes, temperatures and
insulation drawn from a few hundred distinct strings, as a real line list repeats them), then
prints the seconds taken by ``read_register`` for each.  Targets (issue 3): CSV under 1 s,
XLSX under 5 s on a 2-core machine.  Not a test: run ``python benchmarks/bench_import.py`` from
the repository root with the package installed (or ``PYTHONPATH=.``).
"""

from __future__ import annotations

import gc
import importlib.util
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


def main() -> None:
    with tempfile.TemporaryDirectory() as folder:
        csv_path, xlsx_path = Path(folder) / "bench.csv", Path(folder) / "bench.xlsx"
        frame = make_register(ROWS)
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
            print(f"{path.suffix[1:]:4s}: {ROWS} rows ({ok} ok) read and parsed in "
                  f"{statistics.median(seconds):.2f} s (median of {RUNS}: {runs}; "
                  f"parse caches cleared before each run)", flush=True)
    sys.stdout.flush()


if __name__ == "__main__":
    main()
