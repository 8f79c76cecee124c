"""[fluid.NAME] rule tables (rules/fluids.toml) and the register's `fluid` column."""

import numpy as np
import pytest

from audit.errors import RuleError
from audit.rules import load_rules
from support import item_table

CoolProp = pytest.importorskip("CoolProp.CoolProp")  # test-only oracle

P_ATM = 101325.0  # Pa: 1 atm, the pressure the shipped boiling points and latent heats are at

# Each shipped fluid's CoolProp name: the source its rule file quotes (CoolProp 8.0.0).
PURE = {"water": "Water", "steam": "Water", "lng": "Methane", "liquid-nitrogen": "Nitrogen",
        "ammonia": "Ammonia", "natural-gas": "Methane"}


def _sig4(value, reference):
    """The rule file rounds to 4 significant figures: half a unit in the 4th figure."""
    return abs(value - reference) <= 0.5 * 10 ** (np.floor(np.log10(abs(reference))) - 3) * 1.0001


def test_the_shipped_fluids_are_there_each_with_its_source(rules):
    assert {"water", "steam", "lng", "liquid-nitrogen", "ammonia", "ethylene-glycol-30",
            "thermal-oil", "natural-gas"} <= set(rules.fluids)
    for fluid in rules.fluids.values():
        assert fluid.source.strip() and np.isfinite(fluid.cp)
        # Heavy fuel oil has a pour point (the supplier's figure), not a freezing point.
        assert np.isfinite(fluid.freezing_point) or fluid.name == "fuel-oil"
    payers = {n: f.heat_gain for n, f in rules.fluids.items()}
    assert payers["lng"] == payers["liquid-nitrogen"] == "boil-off"
    assert payers["natural-gas"] == "none" and payers["water"] == "refrigeration"


@pytest.mark.parametrize("name", ["water", "lng", "liquid-nitrogen", "ammonia"])
def test_boiling_points_and_latent_heats_are_coolprops_at_1_atm(rules, name):
    fluid, coolprop = rules.fluids[name], PURE[name]
    boiling = CoolProp.PropsSI("T", "P", P_ATM, "Q", 0, coolprop)
    assert _sig4(fluid.boiling_point - 273.15, boiling - 273.15)
    assert _sig4(fluid.freezing_point - 273.15, CoolProp.PropsSI("Ttriple", coolprop) - 273.15)
    if fluid.boiling_liquid:
        latent = (CoolProp.PropsSI("H", "P", P_ATM, "Q", 1, coolprop)
                  - CoolProp.PropsSI("H", "P", P_ATM, "Q", 0, coolprop))
        assert _sig4(fluid.latent_heat, latent)
        assert _sig4(fluid.cp, CoolProp.PropsSI("C", "P", P_ATM, "Q", 0, coolprop))


@pytest.mark.parametrize("name, coolprop, temp_c", [
    ("water", "Water", 25.0), ("natural-gas", "Methane", 5.0),
    ("ethylene-glycol-30", "INCOMP::MEG[0.3]", -5.0), ("thermal-oil", "INCOMP::T66", 250.0)])
def test_heat_capacities_are_coolprops_at_the_quoted_temperature(rules, name, coolprop, temp_c):
    cp = CoolProp.PropsSI("C", "T", temp_c + 273.15, "P", P_ATM, coolprop)
    assert _sig4(rules.fluids[name].cp, cp)


def test_glycol_freezing_point_is_coolprops(rules):
    freeze = CoolProp.PropsSI("T_freeze", "T", 273.15, "P", P_ATM, "INCOMP::MEG[0.3]")
    assert _sig4(rules.fluids["ethylene-glycol-30"].freezing_point - 273.15, freeze - 273.15)


def _user(tmp_path, text):
    (tmp_path / "u").mkdir(exist_ok=True)
    (tmp_path / "u" / "f.toml").write_text("# test fluids\n" + text, encoding="utf-8")
    return tmp_path / "u"


@pytest.mark.parametrize("body, key", [
    ('heat_gain = "boil-off"\nlatent_heat = 200\nboiling_point = -196\nsource = "x"', "price"),
    ('latent_heat = 200\nsource = "x"', "boiling_point"),
    ('heat_gain = "boil-off"\nsource = "x"', "latent_heat"),
])
def test_a_boiling_liquid_or_boil_off_lacking_a_key_is_refused_naming_it(tmp_path, body, key):
    with pytest.raises(RuleError) as info:
        load_rules([_user(tmp_path, f"[fluid.cryo]\n{body}\n")])
    assert key in str(info.value) and "fluid.cryo" in str(info.value)


def test_an_unknown_way_of_paying_is_refused(tmp_path):
    with pytest.raises(RuleError, match="heat_gain"):
        load_rules([_user(tmp_path, '[fluid.cryo]\nheat_gain = "chiller"\nsource = "x"\n')])


REGISTER = """tag,nps,length,temp,layers,jacket,fluid
A,4,10,-162,polyisocyanurate 100,aluminium-oxidised,LNG
B,4,10,-150,polyisocyanurate 100,aluminium-oxidised,lng
C,4,10,5,elastomeric-foam 25,aluminium-oxidised,brine
D,4,10,180,mineral-wool 50,aluminium-oxidised,Steam
E,4,10,5,elastomeric-foam 25,aluminium-oxidised,
"""


def test_the_fluid_column_is_read_as_a_rules_name(tmp_path, rules):
    table = item_table(tmp_path, REGISTER, rules)
    assert list(table["fluid"]) == ["lng", "lng", "brine", "steam", ""]
    assert list(table["status"]) == ["ok", "rejected", "rejected", "ok", "ok"]


def test_an_unknown_fluid_is_rejected_naming_the_word_and_listing_the_fluids(tmp_path, rules):
    reason = item_table(tmp_path, REGISTER, rules)["reason"][2]
    assert reason.startswith('fluid: "brine" is not in the rules')
    assert all(name in reason for name in rules.fluids)


def test_a_boiling_liquid_above_its_boiling_point_is_rejected_with_both_temperatures(tmp_path,
                                                                                    rules):
    reason = item_table(tmp_path, REGISTER, rules)["reason"][1]
    assert "-150.0 degC" in reason and "-161.5 degC" in reason and "lng" in reason


def test_water_can_freeze_in_a_stagnant_line_with_coolprops_density(rules):
    water = rules.fluids["water"]
    # CoolProp 8.0.0, IAPWS-95: liquid water at 10 degC and 1 atm, 999.70 kg/m3 (4 figures).
    assert _sig4(water.density, CoolProp.PropsSI("D", "T", 283.15, "P", P_ATM, "Water"))
    # Enthalpy of melting of ice Ih at 0 degC: 333.6 kJ/kg (IAPWS R10-06; from memory, as the
    # rule file says: CoolProp has no solid phase to check it against).
    assert water.fusion_heat == pytest.approx(333.6e3)
    assert "from memory" in water.source


def test_fuel_oil_cp_is_cragoes_correlation(rules):
    # Cragoe (NBS Misc. Publ. 97, 1929): c = (0.388 + 0.00045 t[degF]) / sqrt(s) Btu/(lb degF);
    # 1 Btu/(lb degF) = 4186.8 J/(kg K) (international table Btu, NIST SP 811). At 194 degF and
    # s = 0.98, as the rule file states; the shipped value keeps 3 figures.
    cragoe = (0.388 + 0.00045 * 194) / np.sqrt(0.98) * 4186.8
    assert rules.fluids["fuel-oil"].cp == pytest.approx(cragoe, abs=5.0)


def test_steel_wall_heat_capacity_agrees_with_ht(rules):
    ht = pytest.importorskip("ht")  # test-only oracle
    # ht's insulation tables (ASHRAE Handbook -- Fundamentals): 'Metals, steel' 7800 kg/m3,
    # 450 J/(kg K); 'Metals, stainless steel' 7900, 460. The rules quote Incropera Table A.1
    # (from memory); two handbooks agree on the volumetric heat capacity within 5 %.
    for metal, name in (("carbon-steel", "Metals, steel"),
                        ("stainless-steel", "Metals, stainless steel")):
        ours = rules.metals[metal].density * rules.metals[metal].cp
        theirs = ht.insulation.rho_material(name) * ht.insulation.Cp_material(name)
        assert ours == pytest.approx(theirs, rel=0.05)


def test_a_negative_flow_is_rejected_naming_the_cell_and_the_range(tmp_path, rules):
    register = ("tag,nps,length,temp,layers,jacket,location,fluid,flow\n"
                "NEG,2,10,-170,polyisocyanurate 100mm,pvc,outdoor,lng,-0.5 kg/s\n"
                "ZERO,2,10,-170,polyisocyanurate 100mm,pvc,outdoor,lng,0\n"
                "LBH,2,10,-170,polyisocyanurate 100mm,pvc,outdoor,lng,7200 lb/h\n")
    table = item_table(tmp_path, register, rules)
    assert list(table["status"]) == ["rejected", "ok", "ok"]
    assert table["reason"][0] == 'flow: "-0.5 kg/s" is out of range; expected a mass flow at least 0 kg/s'
    # 7200 lb/h = 7200 * 0.45359237 kg / 3600 s (NIST SP 811: 1 lb = 0.45359237 kg, exact)
    assert table["flow_kg_s"][2] == pytest.approx(7200 * 0.45359237 / 3600, rel=1e-12)
