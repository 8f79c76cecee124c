"""Conductivity tables and the conductivity integral (audit/engine/conduction.py)."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.engine.conduction import ConductivityTables
from audit.errors import EngineInputError, LagauditError

# An arbitrary, invented table for exercising the arithmetic (not material data).
TABLE = [(323.15, 0.040), (373.15, 0.045), (473.15, 0.058), (673.15, 0.095)]


def test_phi_of_linear_conductivity_matches_its_closed_form():
    # k = k0 (1 + beta (T - T0)) integrates to k0 [x + beta x^2 / 2], x = T - T0 (closed form).
    k0, beta, t0 = 0.04, 2.0e-3, 300.0
    tables = ConductivityTables([[(t0, k0), (900.0, k0 * (1 + beta * 600.0))]])
    t = np.linspace(250.0, 1000.0, 31)  # both sides of the table: extrapolation is linear too
    expected = k0 * ((t - t0) + beta * (t - t0) ** 2 / 2)
    np.testing.assert_allclose(tables.phi(np.zeros(t.size, int), t), expected, rtol=1e-12, atol=1e-12)


def test_mean_conductivity_of_linear_k_is_k_at_mean_temperature():
    # For k linear in T the integral mean equals k at the arithmetic mean temperature
    # (closed form; the reason ASTM tables quote k at the mean temperature).
    tables = ConductivityTables([[(300.0, 0.03), (700.0, 0.07)]])
    t1, t2 = np.array([320.0, 350.0]), np.array([650.0, 420.0])
    mean = tables.mean_conductivity(np.zeros(2, int), t1, t2)
    np.testing.assert_allclose(mean, 0.03 + 1e-4 * ((t1 + t2) / 2 - 300.0), rtol=1e-12)


def test_phi_is_exact_trapezoid_across_breakpoints():
    tables = ConductivityTables([TABLE])
    t = np.array([p[0] for p in TABLE])
    k = np.array([p[1] for p in TABLE])
    expected = np.concatenate(([0.0], np.cumsum(0.5 * (k[1:] + k[:-1]) * np.diff(t))))
    np.testing.assert_allclose(tables.phi(np.zeros(4, int), t), expected, rtol=1e-14)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=150.0, max_value=1200.0))
def test_phi_inverse_undoes_phi(temperature):
    tables = ConductivityTables([TABLE, 0.05])
    for index in (0, 1):
        phi = tables.phi(np.array([index]), np.array([temperature]))
        back = tables.phi_inverse(np.array([index]), phi)
        assert back[0] == pytest.approx(temperature, rel=1e-12, abs=1e-9)


def test_many_tables_evaluated_in_one_call_agree_with_one_at_a_time():
    tables = ConductivityTables([TABLE, [(200.0, 0.02), (300.0, 0.025)], 0.1])
    rng = np.random.default_rng(1)
    idx = rng.integers(0, 3, 500)
    t = rng.uniform(150.0, 900.0, 500)
    together = tables.phi(idx, t)
    for i in range(3):
        alone = ConductivityTables([[TABLE, [(200.0, 0.02), (300.0, 0.025)], 0.1][i]])
        sel = idx == i
        np.testing.assert_allclose(together[sel], alone.phi(np.zeros(sel.sum(), int), t[sel]))


def test_accepts_series_and_lists():
    tables = ConductivityTables([TABLE])
    t = pd.Series([300.0, 400.0])
    np.testing.assert_allclose(tables.conductivity([0, 0], t),
                               tables.conductivity(np.zeros(2, int), t.to_numpy()))


def test_extrapolation_that_reaches_zero_conductivity_gives_nan_not_a_number():
    # Slope 1e-4 W/(m K^2) from 0.02 at 300 K: k reaches zero at 100 K.
    tables = ConductivityTables([[(300.0, 0.02), (400.0, 0.03)]])
    below_zero_k = tables.phi(np.array([0]), np.array([100.0]))[0] - 1.0
    assert np.isnan(tables.phi_inverse(np.array([0]), np.array([below_zero_k]))[0])


def test_outside_flags_spans_leaving_the_table_but_never_a_constant():
    tables = ConductivityTables([TABLE, 0.05])
    assert tables.outside(np.array([0]), np.array([330.0]), np.array([700.0]))[0]
    assert not tables.outside(np.array([0]), np.array([330.0]), np.array([600.0]))[0]
    assert not tables.outside(np.array([1]), np.array([10.0]), np.array([3000.0]))[0]


@pytest.mark.parametrize("table, words", [
    ([(300.0, 0.04), (290.0, 0.05)], "not sorted"),
    ([(300.0, 0.04), (300.0, 0.05)], "not sorted"),
    ([(300.0, -0.04)], "<= 0"),
    ([(300.0, float("nan"))], "not finite"),
    ([(-5.0, 0.04)], "outside"),
    ([], "no usable rows"),
    ("mineral wool", "not numeric"),
])
def test_bad_tables_raise_with_the_table_named(table, words):
    with pytest.raises(EngineInputError, match=words) as info:
        ConductivityTables([table], names=["wool-x"])
    assert "wool-x" in str(info.value)
    assert isinstance(info.value, LagauditError) and isinstance(info.value, ValueError)


def test_a_face_at_the_end_row_within_rounding_is_not_extrapolated():
    # A liquid-nitrogen line at -196 degC against a table whose first row is -196 degC: the
    # solved face may sit a rounding error below the row (1e-9 K here); 1e-3 K is outside.
    tables = ConductivityTables([[(77.15, 0.0135), (200.0, 0.0201)]])
    assert not tables.outside(np.array([0]), np.array([77.15 - 1e-9]), np.array([150.0]))[0]
    assert tables.outside(np.array([0]), np.array([77.15 - 1e-3]), np.array([150.0]))[0]


# --- holding the first row's conductivity below a table (materials with below_data = "hold")
# The tables here are invented, for the arithmetic only.
COLD_TABLE = [(200.0, 0.030), (250.0, 0.036), (300.0, 0.040)]


def test_held_table_keeps_its_first_row_below_and_its_data_range():
    held, extended = ConductivityTables([COLD_TABLE, COLD_TABLE], hold_below=[True, False]).conductivity(
        np.array([0, 1]), np.array([80.0, 80.0]))
    assert held == pytest.approx(0.030, rel=1e-15)
    # Extended: the first segment's slope (1.2e-4 W/(m K^2)) carried 120 K further down.
    assert extended == pytest.approx(0.030 - 1.2e-4 * 120.0, rel=1e-12)
    tables = ConductivityTables([COLD_TABLE], hold_below=[True])
    assert tables.t_min[0] == 200.0 and tables.t_max[0] == 300.0
    assert tables.outside(np.array([0]), np.array([80.0]), np.array([250.0]))[0]
    assert not tables.outside(np.array([0]), np.array([200.0]), np.array([250.0]))[0]


def test_held_table_is_unchanged_inside_its_data_and_above_it():
    held = ConductivityTables([COLD_TABLE], hold_below=[True])
    plain = ConductivityTables([COLD_TABLE])
    t = np.linspace(200.0, 600.0, 41)
    zero = np.zeros(t.size, int)
    np.testing.assert_allclose(held.conductivity(zero, t), plain.conductivity(zero, t), rtol=1e-15)
    np.testing.assert_allclose(held.phi(zero, t), plain.phi(zero, t), rtol=1e-12, atol=1e-15)


def test_held_phi_below_the_table_is_the_constant_times_the_span():
    # Phi counts from the first row, so below it Phi = -k_first * (T_first - T) exactly.
    tables = ConductivityTables([COLD_TABLE], hold_below=[True])
    t = np.array([1.0, 77.0, 150.0, 199.0])
    np.testing.assert_allclose(tables.phi(np.zeros(4, int), t), -0.030 * (200.0 - t), rtol=1e-12)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=0.5, max_value=599.0))
def test_held_phi_inverse_undoes_phi_below_and_above(temperature):
    tables = ConductivityTables([COLD_TABLE], hold_below=[True])
    table = np.array([0])
    back = tables.phi_inverse(table, tables.phi(table, np.array([temperature])))
    # 1e-9 K: the round trip's float error, far below any temperature that matters.
    assert back[0] == pytest.approx(temperature, abs=1e-9)


@settings(max_examples=200, deadline=None)
@given(cold=st.floats(min_value=1.0, max_value=199.0), warm=st.floats(min_value=200.0, max_value=320.0))
def test_holding_never_lowers_the_mean_conductivity_of_a_rising_table(cold, warm):
    # The held value is an upper bound below a table whose conductivity rises with
    # temperature, so a layer spanning the table's end conducts at least as much held.
    tables = ConductivityTables([COLD_TABLE, COLD_TABLE], hold_below=[True, False])
    held, extended = tables.mean_conductivity(np.array([0, 1]), np.array([cold, cold]),
                                              np.array([warm, warm]))
    assert held >= extended


def test_hold_below_must_name_every_table():
    with pytest.raises(EngineInputError, match="hold_below"):
        ConductivityTables([COLD_TABLE, COLD_TABLE], hold_below=[True])
