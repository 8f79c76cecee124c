"""compute_economics (audit/economics/__init__.py): the per-row columns against the engine's
states, the energy site, per-run overrides, and the invariants of repairs (hypothesis)."""

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from audit.checks.base import CheckContext
from audit.economics import COLUMNS, compute_economics, energy_site, load_economic_rules
from audit.io.readers import read_register
from audit.pipeline import audit_table
from audit.planning import plan_rows, planning_rules
from audit.rules import load_rules
from audit.thermal import resolve_names

HEADER = "tag,nps,length,temp,layers,jacket,condition,damaged,service,valves,flanges,hours,area_code\n"
REGISTER = HEADER + """H1,4,10,250,mineral-wool 80mm,aluminium-oxidised,intact,,heat-conservation,0,0,8000,A
H2,4,10,250,mineral-wool 80mm,aluminium-oxidised,damaged,30,heat-conservation,1,2,,A
H3,2,25,180,mineral-wool 25mm,aluminium-oxidised,wet,,heat-conservation,0,0,6000,B
C1,3,15,-30,elastomeric-foam 40mm,pvc,intact,,cold,0,0,8760,B
C2,3,15,-30,elastomeric-foam 10mm,pvc,intact,,cold,0,0,8760,B
"""


@pytest.fixture(scope="module")
def shipped():
    return load_rules(), load_economic_rules()


def table_of(folder, rules, text):
    path = folder / "reg.csv"
    path.write_text(text, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), list(table["reason"])
    return table


@pytest.fixture(scope="module")
def result(tmp_path_factory, shipped):
    rules, econ = shipped
    table = table_of(tmp_path_factory.mktemp("reg"), rules, REGISTER)
    audit = audit_table(table, rules)
    context = CheckContext(table, rules)
    return context, audit, compute_economics(context, audit.findings, rules, economic_rules=econ,
                                             repairs=audit.planning)


def test_columns_and_alignment(result):
    context, _, got = result
    assert list(got.per_row.columns) == COLUMNS
    assert got.per_row.index.equals(context.table.index)
    assert got.currency == "EUR"


def test_energy_is_the_engine_heat_under_the_energy_check_site_times_hours(result, shipped):
    context, _, got = result
    rules, econ = shipped
    assert got.site == rules.checks["heat-loss-limit"].site == "outdoor-annual-mean"
    q = context.states(got.site)["heat_loss_W"].to_numpy()
    hours = np.array([8000, econ.hours, 6000, 8760, 8760])       # H2 has no hours: the default
    np.testing.assert_allclose(got.per_row["annual_energy [MWh]"], np.abs(q) * hours / 1e6, rtol=1e-12)
    hot = q > 0
    assert hot.tolist() == [True, True, True, False, False]
    conversion = np.where(hot, econ.heat.conversion, econ.cold.conversion)
    np.testing.assert_allclose(got.per_row["annual_fuel [MWh]"],
                               got.per_row["annual_energy [MWh]"] / conversion, rtol=1e-12)
    assert got.per_row["energy_bought"].tolist() == ["fuel"] * 3 + ["electricity"] * 2


def test_repairs_save_and_intact_items_save_nothing(result):
    _, _, got = result
    row = got.per_row
    assert row["saving_if_repaired [MWh]"][0] == 0 and np.isnan(row["payback [yr]"][0])
    assert (row["saving_if_repaired [MWh]"][[1, 2, 4]] > 0).all()
    # C2 has 10 mm against the cold specification (invented demo: 40 mm for NPS 3 in the
    # "up to NPS 6" row, band -50..-20 degC); C1 has those 40 mm.
    assert row["repair"][4] == "insulate to specification" and row["repair"][3] == ""
    np.testing.assert_allclose(row["payback [yr]"][[1, 2, 4]],
                               row["repair_cost"][[1, 2, 4]] / row["annual_saving"][[1, 2, 4]])


def test_energy_site_falls_back_when_the_check_is_absent(tmp_path, shipped):
    rules, econ = shipped
    folder = tmp_path / "r"
    folder.mkdir()
    (folder / "e.toml").write_text('[economics]\nenergy_check = "no-such-check"\nenergy_site = "indoor"\n')
    other = load_economic_rules([folder])
    assert energy_site(rules, other) == "indoor"
    (folder / "e.toml").write_text('[economics]\nenergy_check = "no-such-check"\nenergy_site = "moon"\n')
    with pytest.raises(ValueError, match="moon"):
        energy_site(rules, load_economic_rules([folder]))


def test_overrides_for_one_run(result, shipped):
    context, audit, base = result
    rules, econ = shipped
    got = compute_economics(context, audit.findings, rules, economic_rules=econ,
                            repairs=audit.planning, fuel_price=2 * econ.heat.price, hours=4000)
    # H2 has no hours of its own: the run's default replaces the rules' (8000 -> 4000).
    scale = np.array([2, 2 * 4000 / econ.hours, 2, 1, 1])
    np.testing.assert_allclose(got.per_row["annual_cost"], base.per_row["annual_cost"] * scale, rtol=1e-12)
    assert any("--fuel-price" in a["source"] for a in got.assumptions)


def test_totals_and_ranking(result):
    _, audit, got = result
    row = got.per_row
    assert got.plant["annual_cost"] == pytest.approx(row["annual_cost"].sum(), rel=1e-12)
    assert got.by_area.set_index("area_code")["annual_energy [MWh]"].to_dict() == pytest.approx(
        {"A": row["annual_energy [MWh]"][:2].sum(), "B": row["annual_energy [MWh]"][2:].sum()})
    assert set(got.by_check["check"]) == set(audit.findings["check"])
    top = got.top_repairs
    assert len(top) == 3 and top["payback [yr]"].is_monotonic_increasing
    assert set(top["tag"]) == {"H2", "H3", "C2"}


ROW = st.tuples(
    st.sampled_from(["1", "2", "4", "8"]),
    st.integers(60, 400),                              # degC, hot service
    st.sampled_from([25, 50, 65, 80, 100, 130]),       # installed mm
    st.sampled_from(["intact", "damaged", "wet", "missing"]),
    st.integers(1, 100),                               # damaged %
    st.integers(0, 3), st.integers(0, 3))              # valves, flanges


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(ROW, min_size=1, max_size=8))
def test_repairing_never_costs_energy(tmp_path_factory, shipped, rows):
    """Invariants: a repair never increases the fuel bought; an intact item at or above its
    specification with no bare fittings saves exactly 0 and has no payback."""
    rules, econ = shipped
    lines = [f"R{i},{nps},10,{t},mineral-wool {mm}mm,aluminium-oxidised,{cond},{pct},"
             f"heat-conservation,{v},{f},8000,A" for i, (nps, t, mm, cond, pct, v, f) in enumerate(rows)]
    table = table_of(tmp_path_factory.mktemp("hyp"), rules, HEADER + "\n".join(lines) + "\n")
    context = CheckContext(table, rules)
    no_findings = table.iloc[:0].assign(row=[], check=[])
    repairs = plan_rows(table, context.states(""), no_findings, planning_rules(rules), econ.repair)
    got = compute_economics(context, no_findings, rules, economic_rules=econ,
                            repairs=repairs).per_row
    computed = np.isfinite(got["annual_energy [MWh]"].to_numpy())
    saving = got["saving_if_repaired [MWh]"].to_numpy()
    assert (saving[computed] >= -1e-9 * got["annual_fuel [MWh]"].to_numpy()[computed]).all()
    nothing = computed & (got["repair"].to_numpy() == "")
    assert (saving[nothing] == 0).all() and np.isnan(got["payback [yr]"].to_numpy()[nothing]).all()


def test_notes_say_why(result, shipped):
    _, _, got = result
    rules, _ = shipped
    row = got.per_row
    thickest = row["economic_thickness [mm]"] >= rules.thicknesses[-1] * 1000
    assert thickest.any() and not thickest.all()
    assert (row["economics_note"][thickest].str.contains("thickest standard")).all()
    assert not row["economics_note"][~thickest].str.contains("thickest").any()
