"""Moist air: saturation vapour pressure and dew point, vectorised, in kelvin and pascal.

Saturation pressure is the Hyland & Wexler (1983) formulation in the form of the ASHRAE
Handbook Fundamentals (2017), chapter 1, equations 5 (over ice) and 6 (over liquid water).
As in the handbook, relative humidity is taken relative to saturation over ice at or below
the triple point of water (273.16 K) and over liquid water above it; the two branches are
split at the triple point, where they meet, rather than at 0 degC.  The dew point is the
exact inverse of that saturation pressure (below the triple point it is the frost point),
found by Newton's method on ln p_ws, which is smooth, increasing and concave on each
branch, so the iteration converges monotonically after its first step.

Per-item philosophy of the engine: nothing here raises for one bad element.  A relative
humidity that is not finite, is at or below 0 % or above 100 %, an air temperature outside
the formulation's range (173.15 K to 473.15 K), or a dew point that would fall below
173.15 K, gives NaN for that element; the caller says why (see :func:`dew_point_valid`).

References
----------
Hyland, R. W., Wexler, A. (1983). Formulations for the thermodynamic properties of the
saturated phases of H2O from 173.15 K to 473.15 K. ASHRAE Transactions 89(2A), 500-519.

ASHRAE (2017). ASHRAE Handbook - Fundamentals, chapter 1 'Psychrometrics', equations 5 and
6 (coefficients C1 to C13) and the definition of relative humidity (equation 24).
"""

from __future__ import annotations

import numpy as np

T_MIN = 173.15
"""Lowest temperature of the Hyland & Wexler formulation [K]."""

T_MAX = 473.15
"""Highest temperature of the Hyland & Wexler formulation [K]."""

T_TRIPLE = 273.16
"""Triple point of water, where the ice and water branches meet [K]."""

# ln(p_ws / Pa) = c0/T + c1 + c2 T + c3 T^2 + c4 T^3 + c5 T^4 + c6 ln T, T in K.
_ICE = (-5.6745359e3, 6.3925247e0, -9.6778430e-3, 6.2215701e-7, 2.0747825e-9, -9.4840240e-13,
        4.1635019e0)                                          # ASHRAE 2017 ch. 1 eq. 5, C1..C7
_WATER = (-5.8002206e3, 1.3914993e0, -4.8640239e-2, 4.1764768e-5, -1.4452093e-8, 0.0,
          6.5459673e0)                                        # ASHRAE 2017 ch. 1 eq. 6, C8..C13

_NEWTON_TOL = 1e-9   # K; far below the formulation's own uncertainty, cheap to reach
_NEWTON_MAX = 50


def _ln_p(temp, c):
    return (c[0] / temp + c[1] + c[2] * temp + c[3] * temp**2 + c[4] * temp**3 + c[5] * temp**4
            + c[6] * np.log(temp))


def _dln_p(temp, c):
    return (-c[0] / temp**2 + c[2] + 2 * c[3] * temp + 3 * c[4] * temp**2 + 4 * c[5] * temp**3
            + c[6] / temp)


def _saturation_pressure(temp, c):
    """exp(ln p) of coefficients ``c`` [Pa], NaN outside the range of validity."""
    temp = np.asarray(temp, float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return _out(np.where(_in_range(temp), np.exp(_ln_p(temp, c)), np.nan))


def _out(x):
    return x[()] if isinstance(x, np.ndarray) and x.ndim == 0 else x


def _in_range(temp):
    with np.errstate(invalid="ignore"):
        return (temp >= T_MIN) & (temp <= T_MAX)


def saturation_pressure_water_hyland_wexler(temp):
    """Saturation vapour pressure over plane liquid water, Hyland & Wexler (1983).

    Parameters
    ----------
    temp : float or array_like
        Temperature [K]; valid from 273.15 K to 473.15 K (supercooled water below is the
        formula's extrapolation, kept for the comparison with the ice branch).

    Returns
    -------
    float or numpy.ndarray
        Saturation pressure [Pa]; NaN outside 173.15 K to 473.15 K.

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017), ch. 1, eq. 6; Hyland & Wexler (1983).
    """
    return _saturation_pressure(temp, _WATER)


def saturation_pressure_ice_hyland_wexler(temp):
    """Saturation vapour pressure over plane ice, Hyland & Wexler (1983).

    Parameters
    ----------
    temp : float or array_like
        Temperature [K]; valid from 173.15 K to 273.16 K.

    Returns
    -------
    float or numpy.ndarray
        Saturation pressure [Pa]; NaN outside 173.15 K to 473.15 K.

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017), ch. 1, eq. 5; Hyland & Wexler (1983).
    """
    return _saturation_pressure(temp, _ICE)


def saturation_pressure_hyland_wexler(temp):
    """Saturation vapour pressure of moist air's water: over ice at or below the triple point,
    over liquid water above it (the ASHRAE Handbook convention).

    Parameters
    ----------
    temp : float or array_like
        Temperature [K]; valid from 173.15 K to 473.15 K.

    Returns
    -------
    float or numpy.ndarray
        Saturation pressure [Pa]; NaN outside the valid range.

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017), ch. 1, eqs. 5 and 6; Hyland & Wexler (1983).

    Examples
    --------
    Over ice at -20 degC, over water at 20 degC:

    >>> saturation_pressure_hyland_wexler([253.15, 293.15]).round(1)
    array([ 103.3, 2338.8])
    """
    temp = np.asarray(temp, float)
    with np.errstate(invalid="ignore"):
        ice = temp <= T_TRIPLE
    return _out(np.where(ice, saturation_pressure_ice_hyland_wexler(temp),
                         saturation_pressure_water_hyland_wexler(temp)))


def dew_point_valid(air_temp, rh):
    """Which elements :func:`dew_point_hyland_wexler` can compute (the rest give NaN).

    Parameters
    ----------
    air_temp : float or array_like
        Air (dry-bulb) temperature [K].
    rh : float or array_like
        Relative humidity [%].

    Returns
    -------
    bool or numpy.ndarray of bool
        True where the air temperature is within 173.15 K to 473.15 K, the relative humidity
        is above 0 % and at most 100 %, and the dew point is not below 173.15 K.

    Examples
    --------
    >>> dew_point_valid(293.15, [50.0, 0.0, 101.0])
    array([ True, False, False])
    """
    air_temp, rh = np.broadcast_arrays(np.asarray(air_temp, float), np.asarray(rh, float))
    with np.errstate(invalid="ignore", divide="ignore"):
        p_vap = rh / 100.0 * saturation_pressure_hyland_wexler(air_temp)
        ok = _in_range(air_temp) & (rh > 0.0) & (rh <= 100.0) \
            & (p_vap >= np.exp(_ln_p(T_MIN, _ICE)))
    return _out(ok)


def dew_point_hyland_wexler(air_temp, rh):
    """Dew point (frost point at or below 273.16 K) of moist air, the exact inverse of the
    Hyland & Wexler (1983) saturation pressure.

    The vapour pressure is ``rh / 100 * p_ws(air_temp)``; the dew point is the temperature at
    which ``p_ws`` equals it, solved by Newton's method on ``ln p_ws`` to 1e-9 K.

    Parameters
    ----------
    air_temp : float or array_like
        Air (dry-bulb) temperature [K]; valid from 173.15 K to 473.15 K.
    rh : float or array_like
        Relative humidity [%], relative to saturation over ice at or below 273.16 K and over
        liquid water above it; valid above 0 and up to 100.

    Returns
    -------
    float or numpy.ndarray
        Dew point [K]; equal to ``air_temp`` at 100 %.  NaN where :func:`dew_point_valid` is
        False (relative humidity not finite, 0 % or less, above 100 %; air temperature out of
        range; dew point below 173.15 K).  Nothing is clamped.

    References
    ----------
    Hyland, R. W., Wexler, A. (1983). ASHRAE Transactions 89(2A), 500-519; ASHRAE Handbook -
    Fundamentals (2017), ch. 1, eqs. 5, 6 and 24.

    Examples
    --------
    Air at 20 degC and 50 % relative humidity:

    >>> round(float(dew_point_hyland_wexler(293.15, 50.0)) - 273.15, 2)
    9.27
    """
    air_temp, rh = np.broadcast_arrays(np.asarray(air_temp, float), np.asarray(rh, float))
    ok = np.asarray(dew_point_valid(air_temp, rh))
    with np.errstate(invalid="ignore", divide="ignore"):
        ln_p_vap = np.log(rh / 100.0) + np.log(saturation_pressure_hyland_wexler(air_temp))
    ln_p_vap = np.where(ok, ln_p_vap, np.log(611.0))  # placeholder for invalid elements
    # The branch follows from the vapour pressure: above the triple-point pressure, water.
    water = ln_p_vap > _ln_p(T_TRIPLE, _WATER)
    # Start at the air temperature, at or right of the root: on a concave increasing curve the
    # tangent lies above it, so the first step lands at or left of the root and the rest climb
    # monotonically to it.
    guess = np.where(ok, air_temp, T_TRIPLE)
    dew = guess.copy()
    for _ in range(_NEWTON_MAX):
        f = np.where(water, _ln_p(dew, _WATER), _ln_p(dew, _ICE)) - ln_p_vap
        slope = np.where(water, _dln_p(dew, _WATER), _dln_p(dew, _ICE))
        step = f / slope
        dew = dew - step
        if np.all(np.abs(step) <= _NEWTON_TOL):
            break
    else:
        ok = ok & (np.abs(step) <= _NEWTON_TOL)
    return _out(np.where(ok, dew, np.nan))
