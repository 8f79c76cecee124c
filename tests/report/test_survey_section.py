"""audit/report/survey_section.py and its chart: the report's "Field survey" section."""

import xml.etree.ElementTree as ET

import numpy as np
import pypdf
import pytest

from audit.cautions import THERMOGRAPHY
from audit.report import charts, write_reports
from audit.report.context import build_context
from test_survey import PIPE, register, survey
from audit.pipeline import audit_table

SVG = "{http://www.w3.org/2000/svg}"


def parse(svg) -> ET.Element:
    return ET.fromstring(str(svg))  # raises if the SVG is not well-formed XML


def test_a_reading_equal_to_its_prediction_sits_on_the_one_to_one_line():
    points = [("A", 40.0, 40.0, False), ("B", 30.0, 80.0, True), ("<x>", 60.0, 20.0, False)]
    root = parse(charts.measured_against_predicted(points, "°C", 5.0))
    solid = [line for line in root.iter(f"{SVG}line") if line.get("stroke-width") == "1.2"]
    assert len(solid) == 1
    x1, y1, x2, y2 = (float(solid[0].get(k)) for k in ("x1", "y1", "x2", "y2"))
    dots = {c.find(f"{SVG}title").text.split(":")[0]: (float(c.get("cx")), float(c.get("cy")))
            for c in root.iter(f"{SVG}circle") if c.find(f"{SVG}title") is not None}
    assert set(dots) == {"A", "B", "<x>"}  # the tag is text, not markup
    # A lies on the segment (the cross product of the two vectors is zero, to the 0.1 px the
    # coordinates are written to); B, read hotter, lies above it (smaller y in SVG).
    ax, ay = dots["A"]
    assert (x2 - x1) * (ay - y1) - (y2 - y1) * (ax - x1) == pytest.approx(0.0, abs=0.2 * abs(x2 - x1))
    bx, by = dots["B"]
    assert by < y1 + (bx - x1) * (y2 - y1) / (x2 - x1)
    # The margin band: two dashed lines; the reading beyond it drawn in the warning colour.
    assert len([line for line in root.iter(f"{SVG}line") if line.get("stroke-dasharray")]) == 2
    fills = {c.find(f"{SVG}title").text.split(":")[0]: c.get("fill")
             for c in root.iter(f"{SVG}circle") if c.find(f"{SVG}title") is not None}
    assert fills["B"] == charts.OVER and fills["A"] == charts.BAR
    assert charts.measured_against_predicted([("A", np.nan, 3.0, False)]) is None


@pytest.fixture(scope="module")
def surveyed(rules):
    rows = [PIPE, ["P-2", *PIPE[1:]], ["P-3", *PIPE[1:]]]
    readings = survey(("P-1", 29, 20, 1, 0.9),     # as expected
                      ("P-2", 45, 20, 1, 0.9),     # hotter: degraded
                      ("P-2", 185, 20, 1, 0.9),    # above the process: rejected
                      ("P-9", 40, 20, 1, 0.9))     # not in the register
    return audit_table(register(rules, *rows), rules, readings=readings)


def test_the_section_lists_worst_first_and_counts_what_was_missed(surveyed, meta):
    section = build_context(surveyed, meta=meta, caution="c", economics=surveyed.economics)["survey"]
    assert (section["readings"], section["matched"], section["rejected"], section["unknown"]) \
        == (4, 2, 1, 1)
    assert [r["tag"] for r in section["worst"]] == ["P-2", "P-1"]
    assert [r["tag"] for r in section["unused"]] == ["P-2", "P-9"]
    assert section["measured_items"] == 1
    missed = surveyed.economics.per_row["missed_energy [MWh]"].to_numpy(float)
    # P-2 alone is measured; its missed energy is what the section totals.
    assert np.isfinite(missed).sum() == 1 and missed[1] > 0
    # rel 1e-3: the report prints 4 significant figures.
    assert float(section["missed"]["energy"].replace(",", "")) == pytest.approx(missed[1],
                                                                               rel=1e-3)
    assert section["chart"] is not None and section["cautions"] == THERMOGRAPHY


def test_the_html_shows_the_section_with_its_cautions(surveyed, meta, tmp_path):
    write_reports(surveyed, tmp_path, meta=meta, formats=["html"], economics=surveyed.economics)
    html = (tmp_path / "report.html").read_text(encoding="utf-8")
    section = html[html.index('<section id="survey"'):]
    section = section[:section.index("</section>")]
    for text in ("Field survey", "What the register alone missed", "Worst deviations",
                 "Readings not used", "known emissivity", "reflections", "is not in the register"):
        assert text in section, text
    assert "<svg" in section


def test_no_survey_no_section(hostile_audit, meta):
    assert build_context(hostile_audit, meta=meta, caution="c",
                         economics=hostile_audit.economics)["survey"] is None


def test_the_pdf_carries_the_section_and_its_cautions(surveyed, meta, tmp_path):
    write_reports(surveyed, tmp_path, meta=meta, formats=["pdf"], economics=surveyed.economics)
    text = " ".join(" ".join(page.extract_text().split())
                    for page in pypdf.PdfReader(tmp_path / "report.pdf").pages)
    for words in ("Field survey", "What the register alone missed", "Worst deviations",
                  "known emissivity", "predicted as registered"):
        assert words in text, words


def test_us_units_convert_the_section(surveyed, meta):
    section = build_context(surveyed, meta=meta, caution="c", economics=surveyed.economics,
                            units="us")["survey"]
    # 5 K = 9 degF and 45 degC = 113 degF, exact by the definition of the scales.
    assert (section["margin"], section["symbol"]) == ("9", "°F")
    assert section["worst"][0]["measured"] == "113"
    si = build_context(surveyed, meta=meta, caution="c", economics=surveyed.economics)["survey"]
    # 1 MWh = 3.412142 MMBtu (Btu_IT, NIST SP 811); the report prints 4 significant figures.
    assert float(section["missed"]["energy"]) == pytest.approx(
        float(si["missed"]["energy"]) * 3.412142, rel=2e-3)
