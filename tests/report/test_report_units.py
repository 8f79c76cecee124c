"""The report and the work orders in US customary units (--units us)."""

import html as html_text
import re

import pypdf
import pytest

from audit.cautions import CAUTION
from audit.report.context import build_context
from audit.report.html import render
from audit.report.workorders import build_orders, plan_packs, write_workorders

# A number followed by an SI unit of the outputs, as the report and the packs write them.
SI_VALUE = re.compile(r"\d ?(degC|°C|mm|W/m2|W/m|MWh|m/s|m²|kW)(?![\w/])|\d m\b")


def visible_text(page: str) -> str:
    page = re.sub(r"<(style|script)\b.*?</\1>", " ", page, flags=re.S)
    return html_text.unescape(re.sub(r"<[^>]+>", " ", page))


def without_quoted_sources(text: str, audit) -> str:
    """The report quotes each limit's published source word for word (its own units)."""
    for source in set(audit.findings["limit_source"].astype(str)):
        text = text.replace(html_text.unescape(source), " ")
    for check in audit.rules.checks.values():
        text = text.replace(check.source, " ").replace(check.description, " ")
    return " ".join(text.split())


@pytest.fixture(scope="module")
def us_report(demo_audit):
    meta = {"tool": "lagaudit test", "run_at": "2026-01-01T00:00:00+00:00", "registers": []}
    return render("report.html", build_context(demo_audit, meta=meta, caution=CAUTION,
                                               economics=demo_audit.economics, units="us"))


def test_report_labels_and_axes_in_us_units(us_report):
    text = visible_text(us_report)
    # Heat lost and gained apart (never netted), in the run's units.
    assert "kBtu/h (sums of the positive and of the negative heat_loss [Btu/h] in results.csv" \
        in " ".join(text.split())
    assert "MMBtu" in text and "°F</text>" in us_report  # a chart axis in degF


def test_report_carries_no_si_value_but_in_quoted_sources(us_report, demo_audit):
    text = without_quoted_sources(" ".join(visible_text(us_report).split()), demo_audit)
    found = [text[max(0, m.start() - 40):m.end() + 5] for m in SI_VALUE.finditer(text)]
    assert not found, found[:5]


def test_work_orders_in_us_units(demo_audit, tmp_path):
    meta = {"tool": "lagaudit test", "run_at": "2026-01-01T00:00:00+00:00", "registers": []}
    plan = plan_packs(build_orders(demo_audit), 6)
    write_workorders(demo_audit, tmp_path, caution=CAUTION, meta=meta, plan=plan, units="us")
    header = (tmp_path / "workorders.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "remedy_thickness [in]" in header and "insulate [ft]" in header
    assert "[mm]" not in header and "[m]" not in header
    for pack in (tmp_path / "workorders").iterdir():
        text = " ".join(" ".join(p.extract_text().split()) for p in pypdf.PdfReader(pack).pages)
        text = without_quoted_sources(text, demo_audit)
        assert "thickness [in]" in text and "[°F]" in text
        found = [text[max(0, m.start() - 40):m.end() + 5] for m in SI_VALUE.finditer(text)]
        assert not found, found[:5]
