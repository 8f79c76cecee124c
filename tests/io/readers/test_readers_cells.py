"""Cell parsers of audit/io/readers/cells.py.

Unit conversions are checked against pint's own definitions (pint.UnitRegistry, a fresh
registry, so the check does not share code with the parser), and against the exact SI
definitions of the inch (0.0254 m) and of the Fahrenheit and Celsius scales
(NIST SP 811, 2008, appendix B.8 and section 4.2.1.1).
"""

import math

import pint
import pytest
from hypothesis import given, strategies as st

from audit.io.readers import cells
from audit.pipe_sizes import NOMINAL_PIPE_SIZES

UREG = pint.UnitRegistry()


@pytest.mark.parametrize("text, default, target, pint_value, pint_unit", [
    ("2 in", "mm", "m", 2, "inch"),
    ('1.5"', "mm", "m", 1.5, "inch"),
    ("25 mm", "mm", "m", 25, "millimetre"),
    ("50", "mm", "m", 50, "millimetre"),
    ("30 ft", "m", "m", 30, "foot"),
    ("5 km/h", "m/s", "m/s", 5, "km/hour"),
    ("8000", "h", "h", 8000, "hour"),
])
def test_quantity_matches_pint_definition(text, default, target, pint_value, pint_unit):
    value, problem = cells.quantity(text, default, target, "a length")
    assert problem is None
    # Tolerance: float round-off of one multiplication.
    assert value == pytest.approx(UREG.Quantity(pint_value, pint_unit).to(target).magnitude,
                                  rel=1e-12)


def test_inch_is_exactly_0_0254_m():
    # NIST SP 811 (2008), B.8: 1 in = 2.54 cm exactly.
    value, _ = cells.quantity("2 in", "mm", "m", "a thickness")
    assert value == pytest.approx(0.0508, rel=1e-15)  # float round-off only


@pytest.mark.parametrize("text, unit, kelvin", [
    ("300 F", "degC", (300 - 32) * 5 / 9 + 273.15),   # NIST SP 811 B.8: T/K = (t/F + 459.67)/1.8
    ("65 degC", "degC", 338.15),                       # NIST SP 811 4.2.1.1: T = t + 273.15 K
    ("120 °C", "degC", 393.15),
    ("120", "degC", 393.15),
    ("350", "degF", (350 + 459.67) / 1.8),
    ("400 K", "degC", 400.0),
    ("-196", "degC", 77.15),
    ("300 deg F", "degC", (300 - 32) * 5 / 9 + 273.15),
    ("150°C", "degC", 423.15),
])
def test_temperature_levels(text, unit, kelvin):
    value, max_k, ambient, problem, note = cells.temperature(text, unit)
    assert problem is None and not ambient and math.isnan(max_k) and note is None
    assert value == pytest.approx(kelvin, rel=1e-12)  # float round-off of the offset
    # The same through pint's own offset conversion:
    number, _, word = text.replace("°C", " degC").replace("deg F", "F").partition(" ")
    pint_unit = {"F": "degF", "degC": "degC", "K": "kelvin", "": unit}[word.strip()]
    assert value == pytest.approx(UREG.Quantity(float(number), pint_unit).to("kelvin").magnitude,
                                  rel=1e-12)


@pytest.mark.parametrize("text", ["AMB", "amb", "Ambient", "AMB."])
def test_ambient(text):
    value, max_k, ambient, problem, _ = cells.temperature(text, "degC")
    assert ambient and math.isnan(value) and math.isnan(max_k) and problem is None


def test_normal_over_max_keeps_both_and_notes_it():
    value, max_k, _, problem, note = cells.temperature("120/150", "degC")
    assert (value, max_k, problem) == (pytest.approx(393.15), pytest.approx(423.15), None)
    assert note == "normal/max given; normal used"


def test_unit_after_a_pair_applies_to_both():
    value, max_k, _, _, _ = cells.temperature("250/300 F", "degC")
    assert value == pytest.approx(UREG.Quantity(250, "degF").to("K").magnitude, rel=1e-12)
    assert max_k == pytest.approx(UREG.Quantity(300, "degF").to("K").magnitude, rel=1e-12)


@pytest.mark.parametrize("text, problem", [
    ("TBA", "is not a temperature; expected a number with an optional unit (degC if none), "
            "AMB, or normal/max"),
    ("150/120", "has a maximum below the normal temperature; expected normal/max"),
    ("-300", "is below absolute zero; expected a temperature above -273.15 degC"),
    ("120-150", "is not a temperature; expected a number with an optional unit (degC if none), "
                "AMB, or normal/max"),
])
def test_bad_temperatures(text, problem):
    assert cells.temperature(text, "degC")[3] == problem


@pytest.mark.parametrize("text, nps", [
    ("4", "4"), ("1-1/2", "1-1/2"), ("1 1/2", "1-1/2"), ("1½", "1-1/2"), ("1.5", "1-1/2"),
    ("3/4", "3/4"), ('1-1/2"', "1-1/2"), ("1-1/2 in", "1-1/2"), ("DN40", "1-1/2"),
    ("dn 100", "4"), ("100DN", "4"), ("NPS 24", "24"), ("4.0", "4"), ("½", "1/2"),
])
def test_pipe_size_forms(text, nps):
    got, od_mm, problem = cells.pipe_size(text, None)
    assert (got, problem) == (nps, None)
    assert od_mm == dict((t, od) for t, _, _, od in NOMINAL_PIPE_SIZES)[nps]


def test_pipe_size_bare_number_under_a_dn_header():
    assert cells.pipe_size("100", "DN")[0] == "4"
    assert cells.pipe_size("4", "DN")[0] == ""  # there is no DN 4
    assert cells.pipe_size('4"', "DN")[0] == "4"  # an inch mark wins over the header


@pytest.mark.parametrize("text", ["7", "100 mm", "2026-03-04", "1-3/2", "abc", "DN 101"])
def test_not_a_pipe_size(text):
    nps, od_mm, problem = cells.pipe_size(text, None)
    assert nps == "" and math.isnan(od_mm)
    assert problem.startswith("is not a standard pipe size; expected an NPS of ASME B36.10M")


@given(st.sampled_from(NOMINAL_PIPE_SIZES))
def test_every_size_reads_the_same_from_text_decimal_and_dn(size):
    text, value, dn, od_mm = size
    for form in (text, f"{value}", f"DN{dn}", f'{text}"', f"NPS {text}"):
        assert cells.pipe_size(form, None)[:2] == (text, od_mm)


@pytest.mark.parametrize("text, metres", [
    ("50", (0.05,)), ("2 in", (0.0508,)), ("2x50", (0.05, 0.05)), ("50+40", (0.05, 0.04)),
    ("2 x 2in", (0.0508, 0.0508)), ("3×25", (0.025, 0.025, 0.025)), ("50 + 1in", (0.05, 0.0254)),
])
def test_thicknesses(text, metres):
    values, problem = cells.thicknesses(text, "mm")
    assert problem is None
    assert values == pytest.approx(metres, rel=1e-12)  # float round-off of unit conversion


@pytest.mark.parametrize("text", ["0", "-50", "fifty", "50+", "0x50"])
def test_bad_thicknesses(text):
    values, problem = cells.thicknesses(text, "mm")
    assert values == () and problem.startswith("is not a thickness; expected a length per layer")


@pytest.mark.parametrize("text, materials, metres", [
    ("calcium-silicate 50mm + mineral-wool 2in", ("calcium-silicate", "mineral-wool"),
     (0.05, 0.0508)),
    ("Mineral Wool 50", ("mineral-wool",), (0.05,)),
    ("mineral-wool 2x40", ("mineral-wool", "mineral-wool"), (0.04, 0.04)),
    ("50mm cellular glass", ("cellular-glass",), (0.05,)),
    ("none", (), ()), ("NONE", (), ()), ("bare", (), ()),
])
def test_layers(text, materials, metres):
    got_materials, got_metres, problem = cells.layers(text, "mm")
    assert problem is None and got_materials == materials
    assert got_metres == pytest.approx(metres, rel=1e-12)  # float round-off


@pytest.mark.parametrize("text", ["mineral-wool", "50mm", "mineral-wool fifty", "a 50 + "])
def test_bad_layers(text):
    assert cells.layers(text, "mm")[2].startswith("is not a list of layers")


@given(st.lists(st.tuples(st.sampled_from(["mineral wool", "calcium-silicate", "pir foam"]),
                          st.integers(min_value=1, max_value=300)), min_size=1, max_size=4))
def test_layers_round_trip(spec):
    text = " + ".join(f"{m} {t}mm" for m, t in spec)
    materials, metres, problem = cells.layers(text, "mm")
    assert problem is None
    assert materials == tuple(m.replace(" ", "-") for m, _ in spec)
    assert metres == pytest.approx(tuple(t / 1000 for _, t in spec), rel=1e-12)


def test_choice_yes_no_count():
    assert cells.choice("Horizontal Vessel", ("pipe", "horizontal-vessel")) == \
        ("horizontal-vessel", None)
    assert cells.choice("tank", ("pipe",))[1] == "is not recognised; expected one of pipe"
    assert [cells.yes_no(t)[0] for t in ("Yes", "y", "TRUE", "1", "x", "no", "N", "0")] == \
        [True] * 5 + [False] * 3
    assert cells.yes_no("maybe")[1].startswith("is not yes or no")
    assert cells.count("3") == (3, None) and cells.count("3.0") == (3, None)
    assert cells.count("2.5")[1] == "is not a count; expected a whole number, 0 or more"
    assert cells.count("-1")[1] is not None


def test_unit_detection():
    assert cells.has_unit("250/300 F") and cells.has_unit("2x2in") and cells.has_unit('1.5"')
    assert cells.is_unit_free("120/150") and cells.is_unit_free("2x50")
    assert not cells.has_unit("TBA") and not cells.is_unit_free("TBA")
