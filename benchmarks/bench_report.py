"""Benchmark: the reports of a large register (HTML, PDF, work orders), timed separately.

Builds an invented register of N rows (default 100,000) with ``bench_run.make_register``,
audits it once (not timed here: ``bench_run.py`` times that), then times ``report.html``,
``report.pdf`` and, on a separate register of ``--workorder-items`` rows (default 2,000), the
work-order packs (one PDF page per item to repair, so their time grows with the number of
repairs: the rate in pages per second is printed).  Target of issue 6: the report (HTML and
PDF) of a 100,000-item register in under 20 s on a 2-core machine.  Not a test: run
``python benchmarks/bench_report.py [--items N] [--workorder-items M]`` (M = 0 skips them).
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_run import make_register  # noqa: E402


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--items", type=int, default=100_000)
    parser.add_argument("--workorder-items", type=int, default=2_000,
                        help="rows of the register whose work-order packs are timed (0: skip)")
    args = parser.parse_args()

    from audit.cli import CAUTION
    from audit.pipeline import audit_register
    from audit.report.context import build_context
    from audit.report.html import render
    from audit.report.pdf import write_pdf
    from audit.report.workorders import write_workorders

    with tempfile.TemporaryDirectory() as folder:
        out = Path(folder)
        register = out / "register.csv"
        make_register(args.items).to_csv(register, index=False)
        audit = audit_register([register])
        economics = getattr(audit, "economics", None)
        meta = {"tool": "lagaudit benchmark", "run_at": "", "registers": [{"file": str(register),
                                                                           "sha256": ""}]}
        print(f"register: {args.items} rows, {len(audit.findings)} findings")

        start = time.perf_counter()
        html = render("report.html", build_context(audit, meta=meta, caution=CAUTION,
                                                    economics=economics))
        (out / "report.html").write_text(html, encoding="utf-8")
        html_s = time.perf_counter() - start
        print(f"  report.html              {html_s:7.2f} s   ({len(html) / 1e6:.1f} MB)")

        start = time.perf_counter()
        write_pdf(html, out / "report.pdf")
        pdf_s = time.perf_counter() - start
        print(f"  report.pdf               {pdf_s:7.2f} s")
        verdict = "PASS" if html_s + pdf_s < 20.0 or args.items != 100_000 else "MISS"
        print(f"report (HTML + PDF)        {html_s + pdf_s:7.2f} s   (target < 20 s for 100,000: {verdict})")

        if args.workorder_items:
            small = out / "small.csv"
            make_register(args.workorder_items).to_csv(small, index=False)
            audit = audit_register([small])
            start = time.perf_counter()
            written = write_workorders(audit, out / "small", caution=CAUTION, meta=meta)
            seconds = time.perf_counter() - start
            import pypdf  # test-only dependency, used here to count pages
            pages = sum(len(pypdf.PdfReader(p).pages) for p in written if p.suffix == ".pdf")
            print(f"work orders of {args.workorder_items} rows: {seconds:7.2f} s for {pages} pages in "
                  f"{len(written) - 1} area PDFs ({pages / seconds:.1f} pages/s)")


if __name__ == "__main__":
    main()
