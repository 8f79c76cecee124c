"""A line's temperature along its run, and a stagnant line's time to freeze, from the engine's
heat loss as it changes with the line's temperature.

Both integrate ``C dT = -q'(T) ds`` (``s`` the run length or the time, ``C`` the flow's heat
capacity rate or the line's heat capacity per metre) in the logarithm of the excess
temperature ``theta = T - T_ref`` over the air, where the equation reads
``d ln|theta| = -(g(T) / C) ds`` with ``g = q'(T) / theta`` the line's conductance per metre
to the air [W/(m K)].  ``g`` changes slowly with ``T`` (film coefficients, the insulation's
k(T)), so few steps are exact to a part in a million where a march in ``T`` itself would need
many; with ``g`` held constant both are exact: the textbook
``T_out = T_ref + (T_in - T_ref) exp(-U P L / (m cp))`` (Incropera et al., *Fundamentals of
Heat and Mass Transfer*, ch. 8, a tube flow in surroundings at one temperature, ``U P = g``).

``loss_per_m`` is any vectorised function of the temperatures of the items, an array of shape
``(n, k)`` [K], returning the heat loss per metre of run [W/m] of the same shape (the callers
pass the engine's solve; the tests pass closed forms).  Pure numpy, SI units.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

LossPerMetre = Callable[[np.ndarray], np.ndarray]

#: Classical fourth-order Runge-Kutta steps of the march along a run (see the module docstring
#: for why so few suffice); the tests hold the answer to a march of many more steps.
MARCH_STEPS = 8
#: Gauss-Legendre nodes of the cooling integral of a stagnant line.
COOLING_NODES = 8


def outlet_temperature_marched(t_in, t_ref, length, capacity_rate, loss_per_m: LossPerMetre, *,
                               steps: int = MARCH_STEPS) -> np.ndarray:
    """Temperature at the end of a run of a flowing line, marched along it.

    Solves ``m cp dT/dx = -q'(T)`` from ``T(0) = t_in`` to ``x = length`` by the classical
    fourth-order Runge-Kutta method in ``y = ln|T - t_ref|`` (module docstring), with
    ``steps`` equal steps; ``q'`` is evaluated at every stage's temperature.

    Parameters
    ----------
    t_in : array_like
        Inlet temperature of each line [K].
    t_ref : array_like
        Temperature at which the line neither loses nor gains heat: the air [K].
    length : array_like
        Run length [m], > 0.
    capacity_rate : array_like
        Mass flow times specific heat capacity, ``m cp`` [W/K], > 0.
    loss_per_m : callable
        ``loss_per_m(T)``: heat loss per metre [W/m] at line temperatures ``T`` of shape
        ``(n, 1)`` [K] (negative for a heat gain).
    steps : int
        Runge-Kutta steps along the run.

    Returns
    -------
    numpy.ndarray
        Outlet temperature [K]; ``t_in`` where the line is at ``t_ref``; NaN where the loss is
        NaN at some stage.

    Notes
    -----
    Valid where the loss has the sign of ``T - t_ref`` over the run (heat flows towards the
    air); the excess temperature then never changes sign, as the exact solution's does not.
    References: the energy balance of a tube flow in surroundings at one temperature,
    Incropera et al., *Fundamentals of Heat and Mass Transfer*, ch. 8;
    the Runge-Kutta method: Press et al., *Numerical Recipes*, 3rd ed., section 17.1.
    """
    t_in, t_ref, length, capacity_rate = np.broadcast_arrays(
        *(np.asarray(x, float) for x in (t_in, t_ref, length, capacity_rate)))
    theta0 = t_in - t_ref
    sign = np.sign(theta0)
    moving = theta0 != 0
    magnitude = np.where(moving, np.abs(theta0), 1.0)
    h = length / steps

    def slope(y):
        theta = sign * np.exp(y)
        q = loss_per_m((t_ref + theta)[:, None])[:, 0]
        # An excess too small for a float (a very long run) has reached the air: it stays. So
        # does one whose loss rounds to the wrong sign (t_ref + theta == t_ref in floats): a
        # positive slope there would blow y up.
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(moving & (q * theta > 0), -(q / theta) / capacity_rate, 0.0)

    y = np.log(magnitude)
    for _ in range(steps):
        k1 = slope(y)
        k2 = slope(y + 0.5 * h * k1)
        k3 = slope(y + 0.5 * h * k2)
        k4 = slope(y + h * k3)
        y = y + h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4)
    return np.where(moving, t_ref + sign * np.exp(y), t_in)


def freeze_time_stagnant(t_start, t_freeze, t_ref, heat_capacity_per_m, frozen_heat_per_m,
                         loss_per_m: LossPerMetre, *, nodes: int = COOLING_NODES) -> np.ndarray:
    """Time a stagnant line takes to cool to its freezing point and freeze a share of itself.

    Cooling: ``t_1 = integral from t_freeze to t_start of C / q'(T) dT`` (``C`` the heat the
    liquid and the wall hold per metre and kelvin), taken by Gauss-Legendre quadrature in
    ``u = ln(T - t_ref)`` (module docstring), ``q'`` evaluated at every node.  Freezing:
    ``t_2 = H / q'(t_freeze)``, the latent heat ``H`` of the share to be frozen given up at the
    freezing point, the wall held there while the liquid freezes.

    Parameters
    ----------
    t_start : array_like
        Temperature of the line when the flow stops [K].
    t_freeze : array_like
        Freezing point of the liquid [K].
    t_ref : array_like
        Temperature the line cools towards: the air [K].
    heat_capacity_per_m : array_like
        Heat held per metre of run and kelvin, liquid and wall [J/(m K)].
    frozen_heat_per_m : array_like
        Latent heat given up per metre of run in freezing the share [J/m].
    loss_per_m : callable
        ``loss_per_m(T)``: heat loss per metre [W/m] at temperatures ``T`` of shape ``(n, k)``.
    nodes : int
        Gauss-Legendre nodes of the cooling integral.

    Returns
    -------
    numpy.ndarray
        Time [s]: ``inf`` where the air is not below the freezing point (the line never
        freezes), or where the loss at the freezing point is not positive; cooling takes no
        time where the line starts at or below its freezing point.

    Notes
    -----
    A lumped line: the liquid and the wall share one temperature (their Biot number over the
    insulation's resistance is small), no natural convection inside is resolved, and
    supercooling is ignored.  Gauss-Legendre quadrature: Abramowitz and Stegun, *Handbook of
    Mathematical Functions*, 25.4.29.
    """
    t_start, t_freeze, t_ref, capacity, frozen = np.broadcast_arrays(
        *(np.asarray(x, float) for x in (t_start, t_freeze, t_ref, heat_capacity_per_m,
                                         frozen_heat_per_m)))
    freezes = t_ref < t_freeze
    cools = freezes & (t_start > t_freeze)
    u_low = np.log(np.where(freezes, t_freeze - t_ref, 1.0))
    u_high = np.log(np.where(cools, t_start - t_ref, np.where(freezes, t_freeze - t_ref, 1.0)))
    x, w = np.polynomial.legendre.leggauss(nodes)
    half = 0.5 * (u_high - u_low)
    u = (0.5 * (u_high + u_low))[:, None] + half[:, None] * x[None, :]
    theta = np.exp(u)
    temps = np.concatenate([t_ref[:, None] + theta, t_freeze[:, None]], axis=1)
    q = loss_per_m(temps)
    with np.errstate(invalid="ignore", divide="ignore"):
        cooling = half * np.sum(w[None, :] * capacity[:, None] * theta / q[:, :-1], axis=1)
        freezing = frozen / q[:, -1]
    time = np.where(cools, cooling, 0.0) + freezing
    return np.where(freezes & (q[:, -1] > 0), time, np.inf)
