"""audit/report/charts.py: inline SVG, labels escaped, bounded size, nothing to draw -> None."""

import xml.etree.ElementTree as ET

import numpy as np
import pandas as pd

from audit.report import charts

SVG = "{http://www.w3.org/2000/svg}"


def parse(svg) -> ET.Element:
    return ET.fromstring(str(svg))  # raises if the SVG is not well-formed XML


def test_labels_are_text_not_markup():
    tags = ["<script>alert(1)", "a&b", "\"quoted\""]
    root = parse(charts.cost_pareto(tags, [3.0, 2.0, 1.0], "EUR"))
    assert root.findall(f".//{SVG}script") == []
    texts = [t.text for t in root.iter(f"{SVG}text")]
    assert "<script>alert(1)" in texts and "a&b" in texts and "\"quoted\"" in texts


def test_pareto_largest_first_and_cumulative_share_reaches_100_percent():
    costs = np.array([1.0, 5.0, np.nan, 3.0, 0.0, 1.0])
    root = parse(charts.cost_pareto(list("abcdef"), costs, "EUR"))
    labels = [t.text for t in root.iter(f"{SVG}text") if t.get("text-anchor") == "end"
              and t.get("x") == str(charts.LABEL - 6) and t.get("font-size") == "10"]
    assert labels == ["b", "d", "a", "f"]  # NaN and zero cost are not drawn
    shares = [t.text for t in root.iter(f"{SVG}text") if (t.text or "").endswith(" %")
              and t.get("x") == str(charts.WIDTH - 4)]
    assert shares == ["50 %", "80 %", "90 %", "100 %"]  # 5/10, 8/10, 9/10, 10/10


def test_rows_are_capped_and_empty_input_draws_nothing():
    root = parse(charts.surface_against_limit([(f"T{i}", 100.0 + i, 60.0) for i in range(100)]))
    assert len(root.findall(f"{SVG}rect")) == charts.MAX_BARS
    assert charts.surface_against_limit([]) is None
    assert charts.cost_pareto(["a"], [np.nan], "EUR") is None
    assert charts.findings_by_area(pd.DataFrame(), ["high"]) is None


def test_findings_by_area_stacks_every_finding():
    counts = pd.DataFrame({"high": [2, 0], "low": [1, 4]}, index=["U1", "U2"])
    root = parse(charts.findings_by_area(counts, ["critical", "high", "low"]))
    titles = sorted(r.find(f"{SVG}title").text for r in root.iter(f"{SVG}rect")
                    if r.find(f"{SVG}title") is not None)
    assert titles == ["high: 2", "low: 1", "low: 4"]
