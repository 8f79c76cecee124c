"""The shipped emissivities (rules/jackets.toml, rules/metals.toml) against the handbook values
they cite, quoted in tests/data/reference/surface_emissivity_sources.toml."""

import tomllib
from pathlib import Path

import pytest

from audit.rules import load_rules

REFERENCE = Path(__file__).parents[1] / "data" / "reference" / "surface_emissivity_sources.toml"
REF = tomllib.loads(REFERENCE.read_text(encoding="utf-8"))
RULES = load_rules()

# (section, name, handbook table, entry, words its source must contain); a value quoted as
# one number must be shipped exactly, a range must hold the shipped value.
CASES = [
    ("jackets", "aluminium-bright", "hottel_normal_total", "aluminum_commercial_sheet", "Hottel"),
    ("jackets", "aluminium-oxidised", "hottel_normal_total", "aluminum_heavily_oxidized", "Hottel"),
    ("jackets", "galvanised-steel-new", "wolfe_1965_via_compilation", "iron_galvanized_sheet_92C", "Wolfe"),
    ("jackets", "galvanised-steel-weathered", "bramson_1968_via_compilation",
     "iron_galvanized_sheet_oxidized", "Bramson"),
    ("jackets", "stainless-steel", "kutz_mech_eng_handbook_vol4_table5", "stainless_304", "Kutz"),
    ("jackets", "painted-metal", "thome_epfl_2008", "paint_black_gloss", "Thome"),
    ("metals", "carbon-steel", "wolfe_zissis_1978_via_compilation", "iron_and_steel_oxidized_200C",
     "Zissis"),
    ("metals", "stainless-steel", "kutz_mech_eng_handbook_vol4_table5", "stainless_304", "Kutz"),
    ("metals", "galvanised-steel", "bramson_1968_via_compilation", "iron_galvanized_sheet_oxidized",
     "Bramson"),
    ("metals", "aluminium", "hottel_normal_total", "aluminum_commercial_sheet", "Hottel"),
    ("metals", "copper", "wolfe_zissis_1978_via_compilation", "copper_oxidized_heavily", "Zissis"),
    ("metals", "cast-iron", "wolfe_zissis_1978_via_compilation", "iron_cast_oxidized_100C", "Zissis"),
]


@pytest.mark.parametrize("section, name, table, entry, cited", CASES)
def test_emissivity_is_the_handbook_value_it_cites(section, name, table, entry, cited):
    shipped = getattr(RULES, section)[name]
    quoted = REF[table][entry]
    if isinstance(quoted, list):
        assert quoted[0] <= shipped.emissivity <= quoted[1]
    else:
        assert shipped.emissivity == quoted  # transcribed, so exact
    assert cited in shipped.source


@pytest.mark.parametrize("section", ["jackets", "metals"])
def test_no_value_rests_on_an_instrument_makers_own_table(section):
    # Instrument makers named in earlier editions of these files; a source may still say
    # where a handbook's row was read, but then names the handbook.
    makers = ("wenglor", "Triplett", "IDEAL", "LumaSense", "Omega", "ROCKWOOL")
    for name, entry in getattr(RULES, section).items():
        assert not any(m in entry.source for m in makers), name
        if "FLIR" in entry.source:
            assert any(h in entry.source for h in ("Bramson", "Wolfe")), name
