"""audit/report/context.py: selection, sorting, counting and number formatting."""

import hashlib

import numpy as np
import pandas as pd

from audit.cli import CAUTION
from audit.digests import rules_digest
from audit.report.context import build_context, fmt, worst_first


def test_fmt_significant_figures_and_missing():
    assert fmt(float("nan")) == "–"
    assert fmt(1234567.8) == "1,234,568"
    assert fmt(65.4651) == "65.5"
    assert fmt(0.012345) == "0.0123"
    assert fmt(60.0) == "60"
    assert fmt(-2.5) == "-2.50"


def test_worst_first_orders_by_severity_then_distance_from_limit():
    findings = pd.DataFrame({"tag": ["a", "b", "c", "d"], "severity": ["low", "high", "high", "medium"],
                             "value": [500.0, 70.0, 90.0, 1.0], "limit": [60.0, 60.0, 60.0, 0.0]})
    assert list(worst_first(findings)["tag"]) == ["c", "b", "d", "a"]


def test_rules_digest_is_the_hash_of_the_files_bytes_in_order(tmp_path):
    a, b = tmp_path / "a.toml", tmp_path / "b.toml"
    a.write_bytes(b"[site.x]\nambient = 20\n")
    b.write_bytes(b"# second\n")
    assert rules_digest([a, b]) == hashlib.sha256(a.read_bytes() + b.read_bytes()).hexdigest()
    assert rules_digest([b, a]) != rules_digest([a, b])  # layering order matters


def test_counts_add_up_to_the_findings_and_results(demo_audit, meta):
    context = build_context(demo_audit, meta=meta, caution=CAUTION)
    results, findings = demo_audit.results, demo_audit.findings
    counts = context["counts"]
    assert counts["rows"] == len(results)
    assert counts["audited"] + counts["rejected"] == len(results)
    assert counts["rejected"] == int((results["status"] == "rejected").sum())
    assert sum(r["total"] for r in context["by_check"]) == len(findings)
    assert sum(r["findings"] for r in context["by_area"]) == len(findings)
    assert sum(r["n_items"] for r in context["by_area"]) == len(results)
    per_check = findings["check"].value_counts()
    for row in context["by_check"]:
        assert row["total"] == per_check[row["check"]]
    # Each exception table is sorted worst first.
    ranks = {"critical": 4, "high": 3, "medium": 2, "low": 1, "info": 0}
    for table in context["checks"]:
        shown = [ranks[r["severity"]] for r in table["rows"]]
        assert shown == sorted(shown, reverse=True)
    heat = results.loc[results["status"] == "audited", "heat_loss [W]"].to_numpy(float) / 1000
    # Hot and cold are never netted: heat lost and heat gained are summed apart.
    assert context["heat_lost_kW"] == fmt(np.nansum(heat[heat > 0]), 4)
    assert context["heat_gained_kW"] == fmt(-np.nansum(heat[heat < 0]), 4)
