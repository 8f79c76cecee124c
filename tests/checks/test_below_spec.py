"""below-spec (audit/checks/below_spec.py): specification lookup by band and size, tolerance,
bare items, the service an item is held to, and the shipped demo specification."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.checks.base import CheckContext, validated_params
from audit.checks.below_spec import KIND, spec_thickness
from audit.errors import RuleError
from audit.io.readers import read_register
from audit.pipe_sizes import NOMINAL_PIPE_SIZES, OD_MM_BY_NPS
from audit.rules import load_rules
from audit.thermal import resolve_names

C = 273.15

# A specification written for these tests (layered over the shipped demo one, which it
# replaces whole), so that the tests do not change when the demo plant's table does.
TEST_SPEC = """
[spec.heat-conservation]
material = "mineral-wool"
bands = [[50, 100], [100, 200]]
sizes = [2, 6]
thickness = [[20, 30], [40, 50]]
flat = [60, 70]
tolerance = 3
source = "test fixture"

[spec.personnel]
material = "mineral-wool"
bands = [[60, 300]]
sizes = [48]
thickness = [[35]]
flat = [35]
tolerance = 3
source = "test fixture"

[spec.cold]
material = "elastomeric-foam"
bands = [[-40, 0], [0, 15]]
sizes = [48]
thickness = [[25, 13]]
flat = [25, 13]
tolerance = 2
source = "test fixture"

[spec.frost]
material = "elastomeric-foam"
bands = [[0, 30]]
sizes = [48]
thickness = [[9]]
flat = [9]
tolerance = 2
source = "test fixture"

[check.below-spec]
severity = "medium"
source = "test fixture"
"""

HEADER = "tag,shape,nps,od,length,temp,layers,accessible,service,condition,location\n"


@pytest.fixture(scope="module")
def rules(tmp_path_factory):
    folder = tmp_path_factory.mktemp("rules")
    (folder / "spec.toml").write_text(TEST_SPEC, encoding="utf-8")
    return load_rules([folder])


def run(tmp_path, rules, rows):
    path = tmp_path / "reg.csv"
    path.write_text(HEADER + "".join(r + "\n" for r in rows), encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), list(table["reason"])
    check = rules.checks["below-spec"]
    found = KIND.findings(CheckContext(table, rules), check, validated_params(check, KIND))
    return table, found


def flagged(found):
    return list(found["tag"])


# --- lookup: bands and size rows -------------------------------------------------------------

def test_band_edges_belong_to_the_first_band_listed(rules):
    spec = rules.specs["heat-conservation"]
    temps = C + np.array([49.9, 50.0, 99.9, 100.0, 100.1, 200.0, 200.1])
    got = spec_thickness(spec, ["pipe"] * 7, np.full(7, 0.1143), temps)   # NPS 4: second row
    # 100 degC is the edge shared by [50, 100] and [100, 200]: the first listed band wins.
    np.testing.assert_array_equal(got * 1000, [np.nan, 40, 40, 40, 50, 50, np.nan])


def test_size_rows_by_outside_diameter_of_their_nps(rules):
    spec = rules.specs["heat-conservation"]
    # ASME B36.10M outside diameters: NPS 2 = 60.3 mm, NPS 2-1/2 = 73.0, NPS 6 = 168.3,
    # NPS 8 = 219.1.
    od_mm = np.array([OD_MM_BY_NPS["2"], 60.4, OD_MM_BY_NPS["2-1/2"], OD_MM_BY_NPS["6"], 168.4,
                      OD_MM_BY_NPS["8"]])
    got = spec_thickness(spec, ["pipe"] * 6, od_mm / 1000, np.full(6, C + 80))
    # up to NPS 2 -> row 1 (20 mm); above, up to NPS 6 -> row 2 (40 mm);
    # beyond the last row -> flat (60)
    np.testing.assert_array_equal(got * 1000, [20, 40, 40, 40, 60, 60])


def test_vessels_spheres_and_flat_items_take_the_flat_row(rules):
    spec = rules.specs["heat-conservation"]
    shapes = ["vertical-vessel", "horizontal-vessel", "sphere", "flat"]
    got = spec_thickness(spec, shapes, np.array([0.05, 2.0, 3.0, np.nan]), np.full(4, C + 150))
    np.testing.assert_array_equal(got * 1000, [70, 70, 70, 70])


def test_a_spec_size_that_is_not_a_pipe_size_is_a_rule_error(tmp_path, rules):
    (tmp_path / "bad.toml").write_text(TEST_SPEC.replace("sizes = [2, 6]", "sizes = [2, 7]"),
                                       encoding="utf-8")
    with pytest.raises(RuleError) as err:  # caught when the rules load, before any work
        load_rules([tmp_path])
    assert err.value.column == "spec.heat-conservation.sizes"
    assert err.value.file.endswith("bad.toml")


_BOUNDS_MM = [OD_MM_BY_NPS["2"], OD_MM_BY_NPS["6"]]
_TABLE_MM = [[20, 30], [40, 50], [60, 70]]   # TEST_SPEC rows, then flat


def _plain_lookup(shape, od_mm, temp_c):
    """The specification read by hand, one item at a time (the oracle for the vectorised one).

    Edges carry the module's documented slack (1e-6 K, 1e-9 relative on diameters).
    """
    band = next((j for j, (lo, hi) in enumerate([(50, 100), (100, 200)])
                 if lo - 1e-6 <= temp_c <= hi + 1e-6), None)
    if band is None:
        return math.nan
    row = next((i for i, b in enumerate(_BOUNDS_MM) if od_mm <= b * (1 + 1e-9)), 2) \
        if shape == "pipe" else 2
    return _TABLE_MM[row][band]


@settings(max_examples=200, deadline=None)
@given(st.lists(st.tuples(st.sampled_from(["pipe", "pipe", "sphere"]),
                          st.sampled_from([s[3] for s in NOMINAL_PIPE_SIZES]) | st.floats(10, 1300),
                          st.floats(0, 250)), min_size=1, max_size=30))
def test_vectorised_lookup_matches_a_plain_reading_of_the_table(rules, items):
    shape, od_mm, temp_c = (list(x) for x in zip(*items))
    got = spec_thickness(rules.specs["heat-conservation"], shape, np.array(od_mm) / 1000,
                         np.array(temp_c) + C)
    want = [_plain_lookup(*item) for item in items]
    np.testing.assert_array_equal(got * 1000, want)


# --- the check --------------------------------------------------------------------------------

def test_tolerance_boundary_just_inside_and_just_outside(tmp_path, rules):
    # NPS 4 at 150 degC: 50 mm required, tolerance 3 mm -> 47 mm is the thinnest that passes.
    _, found = run(tmp_path, rules, [
        "IN,pipe,4,,10,150,mineral-wool 47mm,no,heat-conservation,intact,",
        "OUT,pipe,4,,10,150,mineral-wool 46.9mm,no,heat-conservation,intact,",
        "AT,pipe,4,,10,150,mineral-wool 50mm,no,heat-conservation,intact,"])
    assert flagged(found) == ["OUT"]
    out = found.iloc[0]
    assert out["value"] == pytest.approx(46.9) and out["limit"] == pytest.approx(50.0)
    assert out["unit"] == "mm" and bool(out["fixable_by_insulation"])
    assert out["remedy"] == "insulate to specification: 50 mm of mineral-wool"


def test_tolerance_edge_is_not_lost_to_round_off(tmp_path, rules):
    # 0.009 - 0.002 < 0.007 in binary floating point; 7 mm must still pass 9 mm less 2 mm.
    assert 0.009 - 0.002 < 0.007
    _, found = run(tmp_path, rules, [
        "IN,pipe,4,,10,5,elastomeric-foam 7mm,no,frost,intact,",
        "OUT,pipe,4,,10,5,elastomeric-foam 6.9mm,no,frost,intact,"])
    assert flagged(found) == ["OUT"]


def test_layers_add_up(tmp_path, rules):
    _, found = run(tmp_path, rules, [
        "TWO,pipe,4,,10,150,calcium-silicate 25mm + mineral-wool 25mm,no,heat-conservation,"
        "intact,"])
    assert flagged(found) == []


def test_bare_or_missing_insulation_where_the_spec_asks_for_some(tmp_path, rules):
    _, found = run(tmp_path, rules, [
        "BARE,pipe,4,,10,150,none,no,heat-conservation,intact,",
        "GONE,pipe,4,,10,150,mineral-wool 50mm,no,heat-conservation,missing,",
        "COOL,pipe,4,,10,40,none,no,heat-conservation,intact,"])   # 40 degC: outside every band
    assert flagged(found) == ["BARE", "GONE"]
    assert list(found["value"]) == [0.0, 0.0]
    assert all(m.startswith("no insulation installed") for m in found["message"])


def test_service_declared_or_derived(tmp_path, rules):
    # Site 'indoor' (air 20 degC in the shipped sites) decides which items run cold.
    air = rules.sites["indoor"].ambient - C
    assert air == pytest.approx(20.0)
    _, found = run(tmp_path, rules, [
        # derived, hot, not accessible: heat-conservation, NPS 2 at 80 degC -> 20 mm: 20 passes
        "HOT,pipe,2,,10,80,mineral-wool 20mm,no,,intact,indoor",
        # derived, hot, accessible: personnel (35 mm) is thicker and governs
        "REACH,pipe,2,,10,80,mineral-wool 20mm,yes,,intact,indoor",
        # derived, below the air: cold, -10 degC -> 25 mm of elastomeric foam
        "CHILL,pipe,2,,10,-10,elastomeric-foam 20mm,no,,intact,indoor",
        # declared personnel, though not accessible
        "DECL,pipe,2,,10,80,mineral-wool 20mm,no,personnel,intact,indoor",
        # a service the rules have no specification for asks for nothing
        "PROC,pipe,2,,10,80,none,no,process,intact,indoor"])
    assert flagged(found) == ["REACH", "CHILL", "DECL"]
    assert list(found["limit"]) == [35.0, 25.0, 35.0]
    assert "personnel specification" in found["message"][0]
    assert found["remedy"][1] == "insulate to specification: 25 mm of elastomeric-foam"


def test_ambient_items_take_the_air_temperature(tmp_path, rules):
    # AMB at 20 degC indoors is outside every heat-conservation band: nothing asked.
    _, found = run(tmp_path, rules, ["AMB,pipe,4,,10,AMB,none,no,heat-conservation,intact,indoor"])
    assert flagged(found) == []


def test_insulating_to_the_remedy_clears_the_finding(tmp_path, rules):
    _, found = run(tmp_path, rules, ["V,vertical-vessel,,2000,5,150,mineral-wool 40mm,no,,intact,"])
    assert found["remedy"][0] == "insulate to specification: 70 mm of mineral-wool"
    _, again = run(tmp_path, rules, ["V,vertical-vessel,,2000,5,150,mineral-wool 70mm,no,,intact,"])
    assert flagged(again) == []


def test_selector_limits_the_check(tmp_path):
    folder = tmp_path / "rules"
    folder.mkdir()
    (folder / "spec.toml").write_text(TEST_SPEC.replace(
        'severity = "medium"', 'severity = "medium"\napplies_to = "area_code == north"'),
        encoding="utf-8")
    rules = load_rules([folder])
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers,area_code\n"
                    "N,4,10,150,none,north\nS,4,10,150,none,south\n", encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    check = rules.checks["below-spec"]
    found = KIND.findings(CheckContext(table, rules), check, {})
    assert flagged(found) == ["N"]


# --- shipped rule data ------------------------------------------------------------------------

def test_shipped_demo_spec_is_marked_invented_and_fits_its_materials():
    rules = load_rules()
    assert {"heat-conservation", "personnel", "cold"} <= set(rules.specs)
    for spec in rules.specs.values():
        assert "invented" in spec.source
        material = rules.materials[spec.material]
        low = min(b[0] for b in spec.bands)
        high = max(b[1] for b in spec.bands)
        assert high <= material.max_temp, spec.name
        if np.isfinite(material.min_temp):
            assert low >= material.min_temp, spec.name
        spec_thickness(spec, ["pipe"], [0.1], [high])   # every size row is a listed NPS
    check = rules.checks["below-spec"]
    assert check.kind == "below-spec" and validated_params(check, KIND) == {}


def test_shipped_standard_thicknesses_follow_astm_c585():
    rules = load_rules()
    # ASTM C585-10 section 1.2: nominal wall thicknesses from 1/2 to 5 in (13 to 127 mm);
    # 1/2 in = 12.7 mm exactly (1 in = 25.4 mm by definition).
    assert rules.thicknesses[0] == pytest.approx(0.0127, rel=1e-12)
    assert rules.thicknesses[-1] == pytest.approx(0.127, rel=1e-12)
    # half-inch steps: from memory of the C585 tables (see the rule file's source)
    np.testing.assert_allclose(np.diff(rules.thicknesses), 0.0127, rtol=1e-9)
    assert "C585" in rules.thicknesses_source
