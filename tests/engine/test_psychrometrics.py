"""Saturation pressure and dew point (audit/engine/psychrometrics.py) against psychrolib,
CoolProp and the triple point of water."""

import numpy as np
import pandas as pd
import psychrolib
import pytest
from CoolProp.CoolProp import PropsSI
from CoolProp.HumidAirProp import HAPropsSI
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.engine.psychrometrics import (T_TRIPLE, dew_point_hyland_wexler, dew_point_valid,
                                         saturation_pressure_hyland_wexler,
                                         saturation_pressure_ice_hyland_wexler,
                                         saturation_pressure_water_hyland_wexler)

C = 273.15
psychrolib.SetUnitSystem(psychrolib.SI)

# The brief's range: air -40..50 degC, 5..100 % RH.
AIR_C = np.arange(-40.0, 50.01, 2.5)
RH = np.array([5, 10, 20, 35, 50, 65, 80, 90, 95, 100.0])
GRID_T, GRID_RH = (x.ravel() for x in np.meshgrid(AIR_C, RH))


def test_dew_point_matches_psychrolib_over_the_grid():
    # psychrolib 2.5 GetTDewPointFromRelHum (SI) inverts the same ASHRAE 2017 ch. 1 eqs. 5/6
    # by Newton's method and stops when a step is below PSYCHROLIB_TOLERANCE = 0.001 degC:
    # that stopping rule bounds its own error, so 1e-3 K is the fair tolerance.
    ours = dew_point_hyland_wexler(GRID_T + C, GRID_RH) - C
    theirs = np.array([psychrolib.GetTDewPointFromRelHum(t, r / 100) for t, r in zip(GRID_T, GRID_RH)])
    np.testing.assert_allclose(ours, theirs, rtol=0, atol=1e-3)


def test_dew_point_matches_coolprop_over_the_grid():
    # CoolProp HAPropsSI('D', ...) at 101325 Pa uses IAPWS-95 saturation (Hyland & Wexler
    # differs from it by up to 0.03 % in p_ws, see below) and the enhancement factor of real
    # humid air (about 1.004 at 1 atm, varying with temperature between air and dew point).
    # 0.1 % in vapour pressure is 0.012 to 0.02 K of dew point at d(ln p)/dT = 0.05..0.09 /K;
    # 0.03 K covers both (largest seen: 0.018 K at 50 degC, 5 %).
    ours = dew_point_hyland_wexler(GRID_T + C, GRID_RH)
    theirs = np.array([HAPropsSI("D", "T", t + C, "P", 101325.0, "R", r / 100)
                       for t, r in zip(GRID_T, GRID_RH)])
    np.testing.assert_allclose(ours, theirs, rtol=0, atol=0.03)


def test_design_day_dew_point_against_both_oracles():
    # The demo plant's humid design day (rules/sites.toml): 30 degC, 85 % RH.
    # psychrolib 2.5 gives 27.1986 degC; CoolProp 27.2000 degC (run and seen).
    ours = dew_point_hyland_wexler(30 + C, 85.0) - C
    assert ours == pytest.approx(psychrolib.GetTDewPointFromRelHum(30.0, 0.85), abs=1e-3)
    assert ours == pytest.approx(HAPropsSI("D", "T", 30 + C, "P", 101325.0, "R", 0.85) - C, abs=0.03)


def test_water_branch_against_iapws95_saturation_pressure():
    # CoolProp's water is IAPWS-95. Hyland & Wexler (1983) was fitted before IAPWS-95 to the
    # data of its time; 0.03 % is the agreement seen from the triple point to 200 degC
    # (largest: 0.022 %), well inside the few-hundredths-of-a-percent of the 1983 data.
    temps = np.linspace(T_TRIPLE, 473.0, 60)
    iapws = np.array([PropsSI("P", "T", t, "Q", 0, "Water") for t in temps])
    np.testing.assert_allclose(saturation_pressure_water_hyland_wexler(temps), iapws, rtol=3e-4)


def test_ice_branch_against_psychrolib():
    # psychrolib GetSatVapPres codes ASHRAE 2017 ch. 1 eq. 5 below the triple point; the
    # same formula must agree to rounding (1e-12 relative: float64 arithmetic only).
    temps_c = np.linspace(-99.9, 0.0, 50)
    theirs = np.array([psychrolib.GetSatVapPres(t) for t in temps_c])
    np.testing.assert_allclose(saturation_pressure_ice_hyland_wexler(temps_c + C), theirs, rtol=1e-12)


def test_branches_meet_at_the_triple_point_pressure():
    # Triple point of water: 273.16 K, 611.657 Pa (IAPWS R14-08(2011), 'Revised release on the
    # pressure along the melting and sublimation curves of ordinary water substance').
    # 1e-5 relative: 611.657 is given to 6 figures.
    for branch in (saturation_pressure_ice_hyland_wexler, saturation_pressure_water_hyland_wexler):
        assert branch(T_TRIPLE) == pytest.approx(611.657, rel=1e-5)
    # The combined function takes ice at the triple point and water just above it.
    assert saturation_pressure_hyland_wexler(T_TRIPLE) == saturation_pressure_ice_hyland_wexler(T_TRIPLE)
    assert saturation_pressure_hyland_wexler(T_TRIPLE + 0.5) == saturation_pressure_water_hyland_wexler(T_TRIPLE + 0.5)


def test_saturated_air_has_its_own_temperature_as_dew_point():
    temps = np.array([233.15, 260.0, T_TRIPLE, 290.0, 323.15])
    np.testing.assert_allclose(dew_point_hyland_wexler(temps, 100.0), temps, rtol=0, atol=1e-9)


def test_scalars_arrays_and_series_alike():
    scalar = dew_point_hyland_wexler(303.15, 85.0)
    assert isinstance(scalar, float)
    array = dew_point_hyland_wexler(np.array([303.15, 303.15]), np.array([85.0, 85.0]))
    series = dew_point_hyland_wexler(pd.Series([303.15, 303.15]), pd.Series([85.0, 85.0]))
    np.testing.assert_array_equal(array, [scalar, scalar])
    np.testing.assert_array_equal(np.asarray(series), array)


def test_bad_elements_give_nan_and_leave_the_rest_computed():
    air = np.array([300.0, 300.0, 300.0, 300.0, 150.0, 500.0, 300.0, 323.15])
    rh = np.array([50.0, 0.0, -5.0, 100.5, 50.0, 50.0, np.nan, 1e-6])
    dew = dew_point_hyland_wexler(air, rh)
    valid = dew_point_valid(air, rh)
    # 0 %, negative, above 100 %, air out of range, NaN, and a dew point below 173.15 K
    # (50 degC at 1e-6 %: frost point near -120 degC) are not computable.
    np.testing.assert_array_equal(valid, [True, False, False, False, False, False, False, False])
    assert np.isfinite(dew[0])
    assert np.isnan(dew[1:]).all()
    assert dew[0] == pytest.approx(psychrolib.GetTDewPointFromRelHum(300.0 - C, 0.5) + C, abs=1e-3)


@settings(max_examples=200, deadline=None)
@given(st.floats(-40.0, 50.0), st.floats(0.5, 100.0), st.floats(0.0, 1.0))
def test_invariants(air_c, rh, fraction):
    air = air_c + C
    dew = dew_point_hyland_wexler(air, rh)
    # Never above the air temperature (tolerance: Newton's stopping step).
    assert dew <= air + 1e-9
    # Exact inverse: saturation pressure at the dew point is the vapour pressure; 1e-8
    # relative is the 1e-9 K stopping step times d(ln p)/dT < 0.1 /K, with margin.
    assert saturation_pressure_hyland_wexler(dew) == pytest.approx(
        rh / 100 * saturation_pressure_hyland_wexler(air), rel=1e-8)
    # Drier air has a lower (or equal) dew point.
    drier = max(rh * fraction, 0.5)
    assert dew_point_hyland_wexler(air, drier) <= dew + 1e-9
