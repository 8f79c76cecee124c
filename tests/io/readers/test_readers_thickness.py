"""Thickness notations as plants write them (audit/io/readers/thickness.py, via cells)."""

import pytest
from hypothesis import given, strategies as st

from audit.io.readers import cells
from audit.io.readers.thickness import decimal, split_layer

INCH = 0.0254  # m, exact by definition (NIST SP 811, B.8: inch = 2.54 E-02 m)


@pytest.mark.parametrize("text, metres", [
    ("1-1/2 in", (1.5 * INCH,)),
    ('1 1/2"', (1.5 * INCH,)),
    ("1 - 1/2 inch", (1.5 * INCH,)),
    ("1½in", (1.5 * INCH,)),
    ("3/4 in", (0.75 * INCH,)),
    ("38 mm", (0.038,)),
    ("2 x 1.5in", (1.5 * INCH, 1.5 * INCH)),
    ("2x1-1/2in", (1.5 * INCH, 1.5 * INCH)),
    ("50+40", (0.050, 0.040)),
    ("50mm + 2in", (0.050, 2 * INCH)),  # mixed units in one list are fine
])
def test_thickness_notations(text, metres):
    values, problem = cells.thicknesses(text, "mm")
    assert problem is None
    assert values == pytest.approx(metres, rel=1e-12)  # float rounding of the unit factor only


@pytest.mark.parametrize("text", ["50 degC", "2 in/h", "3 kg"])
def test_a_unit_of_the_wrong_kind_is_a_reason(text):
    values, problem = cells.thicknesses(text, "mm")
    assert values == () and "not a length unit" in problem


@pytest.mark.parametrize("text, materials, metres", [
    ("CaSi 50mm + MW 50mm", ("casi", "mw"), (0.05, 0.05)),
    ('MW 1 1/2"', ("mw",), (1.5 * INCH,)),
    ("mineral-wool 1-1/2 in + calcium-silicate 38 mm", ("mineral-wool", "calcium-silicate"),
     (1.5 * INCH, 0.038)),
    ("MW 2 x 1.5in", ("mw", "mw"), (1.5 * INCH, 1.5 * INCH)),
    ("2 x 1.5in MW", ("mw", "mw"), (1.5 * INCH, 1.5 * INCH)),
    ("Rockwool 860 50", ("rockwool-860",), (0.05,)),  # the last number is the thickness
])
def test_layer_notations(text, materials, metres):
    got_materials, got, problem = cells.layers(text, "mm")
    assert problem is None and got_materials == materials
    assert got == pytest.approx(metres, rel=1e-12)  # float rounding of the unit factor only


def test_a_layer_with_a_temperature_for_thickness_says_so():
    _, _, problem = cells.layers("MW 50 degC", "mm")
    assert problem.startswith("is not a thickness (not a length unit)")


@given(st.integers(0, 99), st.integers(1, 63), st.sampled_from([2, 4, 8, 16, 32, 64]))
def test_whole_and_fraction_read_as_their_sum(whole, top, bottom):
    if top >= bottom:
        return
    for written in (f"{whole}-{top}/{bottom} in", f'{whole} {top}/{bottom}"'):
        values, problem = cells.thicknesses(written, "mm")
        assert problem is None
        assert values == pytest.approx(((whole + top / bottom) * INCH,), rel=1e-12)


def test_plain_texts_pass_through_decimal_unchanged():
    assert decimal("50 mm") == "50 mm" and decimal("2x50") == "2x50"
    assert decimal("1-1/2 in") == "1.5 in"


def test_split_layer_is_bounded_for_long_texts():
    words = " ".join(["9"] * 5000)
    # many digit words: only MAX_THICKNESS_WORDS runs are tried at each end
    calls = []
    split_layer(f"MW {words}", lambda t: calls.append(t) or False)
    assert len(calls) <= 12
