"""Output units (audit/display_units.py): the one SI -> US customary table, checked against
NIST SP 811 (2008), Appendix B.8/B.9 factors, and against pint's own definitions."""

import numpy as np
import pandas as pd
import pytest

from audit import display_units
from audit.display_units import US_UNITS, frame, text, to_us
from audit.errors import LagauditError
from audit.units import ureg


# NIST SP 811 (2008), B.9, "factor" = SI value of one US unit; a US value is SI / factor.
# Btu is the International Table Btu (Btu_IT) throughout.
@pytest.mark.parametrize("si_label, factor", [
    ("mm", 25.4),                       # inch = 2.54 E-02 m (exact)
    ("m", 0.3048),                      # foot = 3.048 E-01 m (exact)
    ("m2", 0.09290304),                 # square foot = 9.290 304 E-02 m2 (exact)
    ("m/s", 0.44704),                   # mile per hour = 4.4704 E-01 m/s (exact)
    ("W", 0.2930711),                   # Btu_IT per hour = 2.930 711 E-01 W
    ("W/m2", 3.154591),                 # Btu_IT per hour square foot = 3.154 591 E+00 W/m2
    ("W/m", 0.2930711 / 0.3048),        # Btu_IT/h over a foot (exact foot)
    ("kg/h", 0.45359237),               # pound (avoirdupois) = 4.535 923 7 E-01 kg (exact)
    ("kg/s", 0.45359237 / 3600),        # pound per hour = 1.259 979 E-04 kg/s
    ("MWh", 1.055056e9 / 3.6e9),        # Btu_IT = 1.055 056 E+03 J; MWh = 3.6 E+09 J
    ("t", 0.9071847),                   # ton, short (2000 lb) = 9.071 847 E+02 kg
    ("K", 1 / 1.8),                     # a kelvin is 1.8 degF of difference (exact)
])
def test_factors_against_nist_sp811(si_label, factor):
    assert to_us(factor, si_label) == pytest.approx(1.0, rel=5e-7)  # SP 811 gives 7 figures


@pytest.mark.parametrize("celsius, fahrenheit", [(100.0, 212.0), (-40.0, -40.0), (0.0, 32.0)])
def test_temperature_levels_exactly(celsius, fahrenheit):
    # NIST SP 811, B.9 note: t/degF = 1.8 t/degC + 32 (exact)
    assert to_us(celsius, "degC") == fahrenheit


def test_every_unit_matches_pint():
    for si_label, unit in US_UNITS.items():
        values = np.array([-40.0, 0.0, 1.0, 123.456])
        expected = ureg.Quantity(values, unit.si).to(unit.us).magnitude
        assert to_us(values, si_label) == pytest.approx(expected, rel=1e-11, abs=1e-9), si_label


def test_frame_converts_by_header_unit_whatever_the_name():
    table = pd.DataFrame({"tag": ["a"], "surface_temp@hot-still-day [degC]": [100.0],
                          "od [mm]": [25.4], "boil_off [kg/h]": [0.45359237],
                          "note [degC]": ["warm"], "rh [%]": [80.0], "carried [degC]": [7.0]})
    out = frame(table, "us", keep=("carried [degC]",))
    assert list(out.columns) == ["tag", "surface_temp@hot-still-day [degF]", "od [in]",
                                 "boil_off [lb/h]", "note [degC]", "rh [%]", "carried [degC]"]
    assert out.iloc[0, 1:4].tolist() == pytest.approx([212.0, 1.0, 1.0])
    assert out.loc[0, "carried [degC]"] == 7.0  # the register's own column, untouched
    assert frame(table, "si", keep=()) is table


def test_findings_value_and_limit_follow_their_unit():
    findings = pd.DataFrame({"value": [100.0, 5.0], "limit": [60.0, 1.0],
                             "unit": ["degC", "fittings"], "message": ["at 100 degC", "5 valves"],
                             "remedy": ["insulate with 50 mm of x", ""]})
    out = frame(findings, "us")
    assert out["value"].tolist() == pytest.approx([212.0, 5.0])
    assert out["limit"].tolist() == pytest.approx([140.0, 1.0])
    assert out["unit"].tolist() == ["degF", "fittings"]
    assert out["message"].tolist() == ["at 212 degF", "5 valves"]
    assert out.loc[0, "remedy"] == "insulate with 1.97 in of x"


@pytest.mark.parametrize("si, us", [
    ("250 degC, above the 60 degC burn limit", "482 degF, above the 140 degF burn limit"),
    ("1 K margin", "1.8 degF margin"),
    ("120 W/m and 35.0 W/m2 over 12 m2, 3 m/s", "125 Btu/h/ft and 11.1 Btu/(h ft2) over 129 ft2, "
                                                  "6.7 mph"),
    ("NPS 4 (DN100), 2 valves, 80 % RH", "NPS 4 (DN100), 2 valves, 80 % RH"),
    ("50mm", "1.97 in"),
    ("window 50 to 175 degC in cyclic service", "window 122 to 347 degF in cyclic service"),
    ("from -12 to -5 degC; 50-60 degC", "from 10 to 23 degF; 122-140 degF"),
    ("insulate with 1.5e+03 mm of x", "insulate with 59.06 in of x"),
    ('length: "5 degC" is not a length; expected a length above 0 m',  # the cell as written
     'length: "5 degC" is not a length; expected a length above 0 ft'),
])
def test_quantities_in_messages(si, us):
    assert text(si) == us


def test_unknown_unit_system_refused():
    with pytest.raises(LagauditError, match="unit system"):
        display_units.check_system("imperial")


def test_converted_columns_carry_no_float_noise():
    # 50.8 mm is 2 in exactly (NIST SP 811: inch = 25.4 mm); the 12-figure factor alone gives
    # 2.00000000000216. Each converted figure is written to 6 significant figures, the oracle
    # being Python's own decimal rounding of the unrounded conversion.
    si = np.array([50.8, 76.2, 37.7, 100.0, 3.3, np.nan])
    table = pd.DataFrame({"od [mm]": si, "surface_temp [degC]": si, "heat_loss [W]": si,
                          "length [m]": si})
    out = frame(table, "us")
    for column, unit in zip(out.columns, ("mm", "degC", "W", "m")):
        expected = [float(f"{x:.6g}") for x in to_us(si, unit)]
        np.testing.assert_array_equal(out[column].to_numpy(float), expected)  # exact: same decimal
    assert out["od [in]"].tolist()[:2] == [2.0, 3.0]
    findings = pd.DataFrame({"value": [50.8], "limit": [76.2], "unit": ["mm"]})
    assert frame(findings, "us")[["value", "limit"]].iloc[0].tolist() == [2.0, 3.0]
