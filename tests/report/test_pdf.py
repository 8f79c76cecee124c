"""audit/report/pdf.py and write_reports: nothing fetched, and the PDF says what the data says.

The PDF text is extracted with pypdf (a general-purpose PDF library, test-only) and compared
with results.csv as written by the project's CSV writer.
"""

from types import SimpleNamespace

import numpy as np
import pandas as pd
import pypdf
import pytest

from audit.cli import CAUTION
from audit.io.writers import write_csv
from audit.report import write_reports
from audit.report.context import build_context, fmt
from audit.report.html import render
from audit.report.pdf import EmbeddedOnlyFetcher, write_pdf

# A 1x1 SVG as a data: URI, the only kind of reference the renderer may read.
DATA_URI = "data:image/svg+xml,%3Csvg xmlns='http://www.w3.org/2000/svg' width='1' height='1'/%3E"


def pdf_text(path) -> str:
    """All text of a PDF with whitespace removed (table cells wrap tags across lines)."""
    return "".join("".join(page.extract_text() for page in pypdf.PdfReader(path).pages).split())


def squeeze(text: str) -> str:
    return "".join(str(text).split())


def test_fetcher_refuses_files_and_network_and_serves_data_uris(tmp_path):
    html = (f'<html><head><link rel="stylesheet" href="http://example.invalid/style.css"></head>'
            f'<body><img src="file:///etc/passwd"><img src="http://example.invalid/x.png">'
            f'<img src="{DATA_URI}"><p>text</p></body></html>')
    fetcher = EmbeddedOnlyFetcher()
    write_pdf(html, tmp_path / "x.pdf", fetcher=fetcher)
    assert (tmp_path / "x.pdf").stat().st_size > 0
    assert sorted(fetcher.refused) == ["file:///etc/passwd", "http://example.invalid/style.css",
                                       "http://example.invalid/x.png"]
    assert [u for u in fetcher.requested if u not in fetcher.refused] == [DATA_URI]


def test_report_of_a_hostile_register_fetches_nothing(hostile_audit, meta, tmp_path):
    html = render("report.html", build_context(hostile_audit, meta=meta, caution=CAUTION))
    fetcher = EmbeddedOnlyFetcher()
    write_pdf(html, tmp_path / "report.pdf", fetcher=fetcher)
    # The register's file:// and http:// text is printed, never followed.
    assert fetcher.requested == []
    text = pdf_text(tmp_path / "report.pdf")
    assert squeeze("<script>alert(1)</script>") in text


@pytest.fixture(scope="module")
def demo_outputs(demo_audit, tmp_path_factory):
    """The demo report with an economics object of made-up per-item numbers (the report only
    sums and prints them; their physics is tested with the economics module)."""
    out = tmp_path_factory.mktemp("demo")
    results = demo_audit.results
    n = len(results)
    audited = (results["status"] == "audited").to_numpy()
    made_up = np.where(audited, np.arange(n) % 7 + 0.5, np.nan)
    per_row = pd.DataFrame({"annual_energy [MWh]": made_up, "annual_fuel [MWh]": made_up * 1.25,
                            "annual_cost": made_up * 40.0, "annual_co2 [t]": made_up * 0.2,
                            "saving_if_repaired [MWh]": made_up / 2,
                            "payback [yr]": np.where(audited, np.arange(n) % 5 + 0.3, np.nan),
                            "energy_bought": np.where(audited, "fuel", ""),
                            "boil_off [kg/h]": np.nan, "annual_boil_off [t]": np.nan})
    economics = SimpleNamespace(per_row=per_row, currency="EUR", totals=None, top_repairs=None,
                                assumptions=["fuel price 40 EUR/MWh (test value)"])
    meta = {"tool": "lagaudit test", "run_at": "2026-01-01T00:00:00+00:00",
            "registers": [{"file": "demo_line_list.csv", "sha256": "f" * 64}]}
    written = write_reports(demo_audit, out, meta=meta, formats=["html", "pdf", "csv"],
                            economics=economics)
    results = results.drop(columns=list(per_row.columns), errors="ignore")
    write_csv(pd.concat([results, per_row.set_index(results.index)], axis=1), out / "results.csv")
    return out, written, pdf_text(out / "report.pdf")


def test_every_burn_risk_tag_is_in_the_pdf(demo_audit, demo_outputs):
    _, _, text = demo_outputs
    touch = demo_audit.findings.loc[demo_audit.findings["kind"] == "touch-temperature", "tag"]
    assert len(touch) > 0
    assert len(touch) <= 100  # all fit in the table: none cut by the row limit
    missing = [t for t in set(touch) if squeeze(t) not in text]
    assert missing == []


def test_pdf_totals_match_results_csv(demo_outputs):
    out, _, text = demo_outputs
    results = pd.read_csv(out / "results.csv", keep_default_na=False, na_values=[""])
    audited = results["status"] == "audited"
    assert squeeze(f"{len(results)}registerrows") in text
    assert squeeze(f"{int(audited.sum())}itemsaudited") in text
    assert squeeze(f"{int((~audited).sum())}rowsrejected") in text
    heat = results.loc[audited, "heat_loss [W]"] / 1000
    # Never netted: the heat lost and the heat gained are each shown.
    assert squeeze(f"{fmt(heat[heat > 0].sum(), 4)} kW") in text
    assert squeeze(f"{fmt(-heat[heat < 0].sum(), 4)} kW") in text
    lost = results["energy_bought"] == "fuel"  # every made-up row is costed as fuel
    for column, unit in (("annual_energy [MWh]", "MWh"), ("annual_cost", "EUR"), ("annual_co2 [t]", "t")):
        assert squeeze(f"{fmt(results.loc[lost, column].sum(), 4)} {unit}") in text, column


def test_caution_and_sections_in_the_pdf(demo_outputs):
    _, written, text = demo_outputs
    assert [p.name for p in written] == ["report.html", "report.pdf"]  # csv is not a report format
    assert squeeze(CAUTION) in text
    for heading in ("Rulesinforce", "Exceptionsbycheck", "Dataquality", "Methodsandreferences",
                    "Repairswiththebestpayback", "Annualcostperitem(EUR)"):
        assert heading in text
