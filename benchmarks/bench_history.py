"""Benchmark: recording audits in a history database and comparing with the last one.

Audits the invented register of ``bench_run.py`` once (default 100,000 rows), then times, twice
over (the second time with a previous audit to compare with): ``compare_with_last`` and
``record_audit``.  ``--db`` takes an SQLite path or a ``postgresql://`` URL (default: a
temporary SQLite file).  Not a test: run ``python benchmarks/bench_history.py [--items N] [--db DB]``.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_run import make_register, timed  # noqa: E402


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", type=int, default=100_000)
    parser.add_argument("--db", help="SQLite path or postgresql:// URL (default: a temporary file)")
    args = parser.parse_args()

    from audit.history import History, compare_with_last, record_audit
    from audit.pipeline import audit_register

    with tempfile.TemporaryDirectory() as folder:
        register = Path(folder) / "register.csv"
        make_register(args.items).to_csv(register, index=False)
        audit = timed("audit", audit_register, [register])
        print(f"register: {args.items} rows, {len(audit.findings)} findings")
        history = History.open(args.db or str(Path(folder) / "history.db"))
        print(f"history: {history.label}")
        for attempt in ("first audit", "second audit"):
            print(attempt)
            since = timed("compare_with_last", compare_with_last, history, audit, plant="bench")
            timed("record_audit", record_audit, history, audit, since, registers=[],
                  rules_digest="", surface_model="correlations")
        history.close()


if __name__ == "__main__":
    main()
