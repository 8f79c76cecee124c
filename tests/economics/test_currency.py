"""Prices and repair costs carry their own currency (audit/economics/rules.py); a plant that
changes the currency but keeps the shipped costs is warned on the report's cover."""

from audit.economics.rules import load_economic_rules
from audit.report.context import build_context

USD = '[economics]\ncurrency = "USD"\n'
USD_COSTS = USD + """
[economics.repair]
sizes = [4, 48]
thicknesses = [25, 50]
pipe_per_m = [[20, 30], [40, 60]]
surface_per_m2 = [50, 70]
cover_per_fitting = [80, 150]
source = "invented plant's own USD costs (test data)"
"""


def test_shipped_rules_are_all_in_one_currency():
    econ = load_economic_rules()
    assert econ.currency == econ.heat.currency == econ.cold.currency == econ.repair.currency
    assert econ.currency_warnings() == []


def test_changing_the_currency_alone_keeps_the_shipped_tables_currency_and_warns(tmp_path):
    (tmp_path / "money.toml").write_text(USD, encoding="utf-8")
    econ = load_economic_rules([tmp_path])
    shipped = load_economic_rules().currency
    assert econ.currency == "USD"
    assert econ.repair.currency == econ.heat.currency == shipped != "USD"
    warnings = econ.currency_warnings()
    assert len(warnings) == 3
    assert any(w.startswith(f"The repair costs [economics.repair] are in {shipped} "
                            "(economics/economics.toml)") for w in warnings)
    assert econ.heat.price_as_written.split()[1] == shipped  # the price says its own currency


def test_a_plant_giving_its_own_costs_is_warned_only_for_what_it_kept(tmp_path):
    (tmp_path / "money.toml").write_text(USD_COSTS, encoding="utf-8")
    econ = load_economic_rules([tmp_path])
    assert econ.repair.currency == "USD"
    warnings = econ.currency_warnings()
    assert len(warnings) == 2 and not any("repair" in w for w in warnings)


def test_the_warning_is_on_the_report_cover(tmp_path):
    from html import escape

    from audit.pipeline import audit_register
    from audit.report.html import render
    from audit.rules import load_rules
    from audit.shipped import shipped_dir

    (tmp_path / "money.toml").write_text(USD, encoding="utf-8")
    audit = audit_register([shipped_dir("sample_data") / "demo_line_list.csv"],
                           rules=load_rules([tmp_path]))
    assert audit.economics.warnings
    context = build_context(audit, meta={"run_at": "now", "tool": "lagaudit", "registers": [],
                                         "rules": [], "rules_digest": ""},
                            caution="caution", economics=audit.economics)
    html = render("report.html", context)
    cover = html[html.index('id="cover"'):html.index("Register files")]
    assert escape(audit.economics.warnings[0], quote=False) in cover
