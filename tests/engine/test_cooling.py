"""The march along a flowing line and the freezing time of a stagnant one
(audit/engine/cooling.py), against closed forms and an independent numerical integration."""

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from audit.engine.cooling import freeze_time_stagnant, outlet_temperature_marched

SIGMA = 5.670374419e-8  # Stefan-Boltzmann constant, CODATA 2018 [W/(m2 K4)]


def linear_loss(conductance, t_ref):
    """q' = g (T - T_ref): the line's conductance per metre held constant."""
    g, t_ref = np.asarray(conductance, float), np.asarray(t_ref, float)
    return lambda temps: g[:, None] * (temps - t_ref[:, None])


def closed_form_outlet(t_in, t_ref, g, length, capacity_rate):
    # Incropera et al., Fundamentals of Heat and Mass Transfer, ch. 8 (tube flow in
    # surroundings at one temperature): T_out = T_a + (T_in - T_a) exp(-U P L / (m cp)),
    # with U P = g the conductance per metre.
    return t_ref + (t_in - t_ref) * np.exp(-g * length / capacity_rate)


def test_the_march_with_u_held_constant_is_the_textbook_exponential():
    t_in = np.array([353.15, 333.15, 278.15, 293.15, 253.15])
    t_ref = np.array([253.15, 283.15, 293.15, 293.15, 293.15])
    g = np.array([0.35, 1.2, 0.8, 0.5, 2.0])               # W/(m K)
    length = np.array([600.0, 50.0, 1000.0, 100.0, 2000.0])
    rate = np.array([5 * 4181.0, 0.2 * 2379.0, 1.0 * 4181.0, 1.0, 0.05 * 2000.0])  # W/K
    marched = outlet_temperature_marched(t_in, t_ref, length, rate, linear_loss(g, t_ref))
    expected = closed_form_outlet(t_in, t_ref, g, length, rate)
    # The log-excess march is exact for constant U; what remains is float rounding.
    np.testing.assert_allclose(marched, expected, rtol=1e-12, atol=1e-9)
    assert marched[3] == t_in[3]  # at the air temperature: nothing changes


def nonlinear_loss(temps, t_ref, g, eps_area):
    """Convection-like linear part plus grey radiation to the air temperature: g varies with T."""
    return g * (temps - t_ref) + eps_area * SIGMA * (temps ** 4 - t_ref ** 4)


def test_the_march_with_a_varying_loss_agrees_with_an_independent_integration():
    t_in, t_ref, g, eps_area, length, rate = 420.0, 250.0, 0.4, 0.09, 800.0, 900.0
    loss = lambda temps: nonlinear_loss(temps, t_ref, g, eps_area)  # noqa: E731
    ivp = solve_ivp(lambda x, t: -loss(t) / rate, (0.0, length), [t_in], rtol=1e-11,
                    atol=1e-9, method="DOP853")
    marched = outlet_temperature_marched(np.array([t_in]), np.array([t_ref]),
                                         np.array([length]), np.array([rate]), loss)
    # Eight fourth-order steps in the log-excess: well inside 1 mK of a tight adaptive solve.
    assert marched[0] == pytest.approx(ivp.y[0, -1], abs=1e-3)
    assert t_ref < marched[0] < t_in


def test_freezing_time_with_u_held_constant_is_the_closed_form():
    t0, tf, ta = np.array([283.15, 278.15]), np.array([273.16, 273.16]), np.array([253.15, 263.15])
    g, c, h = np.array([0.3, 0.6]), np.array([11_000.0, 30_000.0]), np.array([2.0e5, 9.0e5])
    time = freeze_time_stagnant(t0, tf, ta, c, h, linear_loss(g, ta))
    # Newton cooling of a lumped body: t = C/g ln((T0-Ta)/(Tf-Ta)), the form of ASHRAE
    # Handbook -- Fundamentals (2009), ch. 23, eq. 1 for water cooling to its freezing point in
    # an insulated pipe (C = rho cp pi D^2/4, 1/g the insulation's resistance per metre); then
    # the latent heat H at the freezing point, H / (g (Tf - Ta)).
    expected = c / g * np.log((t0 - ta) / (tf - ta)) + h / (g * (tf - ta))
    np.testing.assert_allclose(time, expected, rtol=1e-12)


def test_freezing_time_with_a_varying_loss_agrees_with_an_independent_integration():
    t0, tf, ta, g, eps_area, c, h = 288.15, 273.16, 248.15, 0.25, 0.1, 12_000.0, 3.0e5
    loss = lambda temps: nonlinear_loss(temps, ta, g, eps_area)  # noqa: E731

    def reached(t, temp):
        return temp[0] - tf
    reached.terminal = True
    ivp = solve_ivp(lambda t, temp: -loss(temp) / c, (0.0, 1e7), [t0], events=reached,
                    rtol=1e-11, atol=1e-9, method="DOP853")
    expected = ivp.t_events[0][0] + h / loss(np.array(tf))
    time = freeze_time_stagnant(np.array([t0]), np.array([tf]), np.array([ta]), np.array([c]),
                                np.array([h]), loss)
    # Eight Gauss-Legendre nodes of a smooth integrand: far inside a second in hours.
    assert time[0] == pytest.approx(expected, rel=1e-7)


def test_a_line_in_air_above_freezing_never_freezes_and_one_below_only_freezes():
    ta = np.array([275.15, 263.15])
    time = freeze_time_stagnant(np.array([283.15, 270.0]), np.array([273.16, 273.16]), ta,
                                np.array([1e4, 1e4]), np.array([1e5, 1e5]),
                                linear_loss([0.5, 0.5], ta))
    assert time[0] == np.inf
    assert time[1] == pytest.approx(1e5 / (0.5 * 10.01))  # no cooling: freezing only


@settings(max_examples=60, deadline=None)
@given(t_in=st.floats(260, 600), t_ref=st.floats(230, 320), g=st.floats(0.05, 5),
       length=st.floats(1, 5000), rate=st.floats(1, 1e5), more=st.floats(1.01, 10))
# Found by hypothesis: the excess fell below a float's resolution of t_ref and the loss rounded
# to the wrong sign, which blew the march up to NaN.
@example(t_in=304.0, t_ref=303.87109375, g=2.0, length=33.0, rate=1.0, more=2.0)
def test_the_outlet_lies_between_inlet_and_air_and_a_longer_run_comes_closer_to_the_air(
        t_in, t_ref, g, length, rate, more):
    loss = lambda temps: nonlinear_loss(temps, t_ref, g, 0.05)  # noqa: E731
    short, long = (outlet_temperature_marched(np.array([t_in]), np.array([t_ref]),
                                              np.array([x]), np.array([rate]), loss)[0]
                   for x in (length, length * more))
    low, high = sorted((t_in, t_ref))
    assert low - 1e-9 <= short <= high + 1e-9
    assert abs(long - t_ref) <= abs(short - t_ref) + 1e-9
