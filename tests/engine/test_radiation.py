"""Grey-body radiation against scipy.constants (test-only oracle)."""

import numpy as np
import pandas as pd
import pytest
import scipy.constants
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.engine.radiation import (
    STEFAN_BOLTZMANN, radiative_coefficient_linearised, radiative_flux_grey_body,
    radiative_flux_grey_body_slope)


def test_sigma_is_codata_2018():
    # CODATA 2018 tabulates sigma to 10 digits, 5.670374419e-8; scipy.constants
    # derives it exactly from the defining constants (h, k, c), so the two agree to
    # the 10 digits tabulated.
    value, unit, uncertainty = scipy.constants.physical_constants["Stefan-Boltzmann constant"]
    assert STEFAN_BOLTZMANN == 5.670374419e-8
    assert STEFAN_BOLTZMANN == pytest.approx(value, rel=1e-10)
    assert unit == "W m^-2 K^-4" and uncertainty == 0.0
    c = scipy.constants
    derived = 2 * np.pi ** 5 * c.k ** 4 / (15 * c.h ** 3 * c.c ** 2)
    assert STEFAN_BOLTZMANN == pytest.approx(derived, rel=1e-10)


def test_flux_against_hand_value():
    # eps sigma (Ts^4 - Tsur^4) with scipy's sigma, for a painted pipe at 100 C in a 20 C room.
    eps, ts, tsur = 0.9, 373.15, 293.15
    expected = eps * scipy.constants.Stefan_Boltzmann * (ts ** 4 - tsur ** 4)
    # 1e-10: scipy's sigma carries digits beyond CODATA's tabulated 10.
    assert float(radiative_flux_grey_body(ts, tsur, eps)) == pytest.approx(expected, rel=1e-10)


def test_flux_sign_and_zero():
    assert radiative_flux_grey_body(300.0, 300.0, 0.9) == 0.0
    assert radiative_flux_grey_body(250.0, 300.0, 0.9) < 0.0  # a cold surface gains heat
    assert radiative_flux_grey_body(350.0, 300.0, 0.0) == 0.0  # a perfect reflector


@settings(max_examples=200, deadline=None)
@given(st.floats(50.0, 1500.0), st.floats(50.0, 1500.0), st.floats(0.0, 1.0))
def test_linearised_coefficient_is_an_exact_factorisation(ts, tsur, eps):
    # h_rad (Ts - Tsur) = q_rad algebraically; only rounding may differ.
    q = float(radiative_flux_grey_body(ts, tsur, eps))
    h = float(radiative_coefficient_linearised(ts, tsur, eps))
    assert h >= 0.0
    assert h * (ts - tsur) == pytest.approx(q, rel=1e-9, abs=1e-9)


def test_linearised_coefficient_is_the_slope_at_equal_temperatures():
    # d q / d Ts = 4 eps sigma T^3 at Ts = Tsur.
    t, eps = 293.15, 0.8
    assert float(radiative_coefficient_linearised(t, t, eps)) == pytest.approx(
        4 * eps * scipy.constants.Stefan_Boltzmann * t ** 3, rel=1e-10)  # as above


@pytest.mark.parametrize("make", [np.array, pd.Series], ids=["array", "series"])
def test_accepts_arrays_and_series(make):
    ts, tsur, eps = [300.0, 400.0, 500.0], [290.0, 290.0, 250.0], [0.1, 0.5, 0.9]
    expected = [float(radiative_flux_grey_body(a, b, e)) for a, b, e in zip(ts, tsur, eps)]
    got = radiative_flux_grey_body(make(ts), make(tsur), make(eps))
    np.testing.assert_allclose(np.asarray(got), expected, rtol=1e-15)


def test_slope_is_the_derivative_of_the_flux():
    # d/dT_s of eps sigma (T_s^4 - T_sur^4) is 4 eps sigma T_s^3; here against a central
    # difference of the flux itself over +-1e-3 K (truncation ~1e-8 relative).
    ts = np.linspace(73.15, 1073.15, 41)
    slope = radiative_flux_grey_body_slope(ts, 0.7)
    central = (radiative_flux_grey_body(ts + 1e-3, 293.15, 0.7)
               - radiative_flux_grey_body(ts - 1e-3, 293.15, 0.7)) / 2e-3
    np.testing.assert_allclose(slope, central, rtol=1e-7)
    assert radiative_flux_grey_body_slope(300.0, 0.0) == 0.0
