"""Grey-body radiation between a surface and large surroundings."""

from __future__ import annotations

import numpy as np

STEFAN_BOLTZMANN = 5.670374419e-8
"""Stefan-Boltzmann constant [W/(m2 K4)], CODATA 2018 (exact in the 2019 SI)."""


def radiative_flux_grey_body(surface_temp, surroundings_temp, emissivity):
    r"""Net radiative heat flux from a small grey surface to large surroundings.

    .. math::
        q_{rad} = \varepsilon\,\sigma\,(T_s^4 - T_{sur}^4)

    Parameters
    ----------
    surface_temp : float or array_like
        Surface temperature [K].
    surroundings_temp : float or array_like
        Mean radiant temperature of the surroundings [K].
    emissivity : float or array_like
        Hemispherical total emissivity of the surface, 0 to 1 [-].

    Returns
    -------
    numpy.ndarray
        Heat flux leaving the surface [W/m2]; negative when the surroundings
        are warmer.

    Notes
    -----
    Valid for a grey, diffuse surface that sees only surroundings much larger
    than itself (view factor 1, the surroundings' emissivity then does not
    matter).  Any temperatures in kelvin.  Computed in the factored form
    (T_s^2 + T_sur^2)(T_s + T_sur)(T_s - T_sur), so the exchange is exactly zero
    when the two temperatures are equal: T^4 - T^4 leaves rounding there, which a
    thick insulation layer amplifies in the solver.

    References
    ----------
    Tiesinga, E., Mohr, P. J., Newell, D. B., Taylor, B. N. (2021). CODATA
    recommended values of the fundamental physical constants: 2018. Rev. Mod.
    Phys. 93, 025010. doi:10.1103/RevModPhys.93.025010
    """
    ts = np.asarray(surface_temp, dtype=float)
    tsur = np.asarray(surroundings_temp, dtype=float)
    return radiative_coefficient_linearised(ts, tsur, emissivity) * (ts - tsur)


def radiative_coefficient_linearised(surface_temp, surroundings_temp, emissivity):
    r"""Radiative heat transfer coefficient, q_rad / (T_s - T_sur).

    .. math::
        h_{rad} = \varepsilon\,\sigma\,(T_s^2 + T_{sur}^2)(T_s + T_{sur})

    Parameters
    ----------
    surface_temp : float or array_like
        Surface temperature [K].
    surroundings_temp : float or array_like
        Mean radiant temperature of the surroundings [K].
    emissivity : float or array_like
        Hemispherical total emissivity of the surface, 0 to 1 [-].

    Returns
    -------
    numpy.ndarray
        Coefficient [W/(m2 K)], defined without division also at T_s = T_sur,
        where it is the slope of q_rad in the temperature difference.

    Notes
    -----
    Exact factorisation of :func:`radiative_flux_grey_body`, so
    h_rad (T_s - T_sur) = q_rad; same validity.
    """
    ts = np.asarray(surface_temp, dtype=float)
    tsur = np.asarray(surroundings_temp, dtype=float)
    eps_sigma = np.asarray(emissivity, dtype=float) * STEFAN_BOLTZMANN
    return eps_sigma * (ts * ts + tsur * tsur) * (ts + tsur)


def radiative_flux_grey_body_slope(surface_temp, emissivity):
    r"""Derivative of :func:`radiative_flux_grey_body` in the surface temperature.

    .. math::
        \frac{\partial q_{rad}}{\partial T_s} = 4\,\varepsilon\,\sigma\,T_s^3

    Parameters
    ----------
    surface_temp : float or array_like
        Surface temperature [K].
    emissivity : float or array_like
        Hemispherical total emissivity of the surface, 0 to 1 [-].

    Returns
    -------
    numpy.ndarray
        Slope of the net radiative flux [W/(m2 K)]; the surroundings' temperature drops
        out.  Same validity as :func:`radiative_flux_grey_body`.
    """
    ts = np.asarray(surface_temp, dtype=float)
    return 4.0 * STEFAN_BOLTZMANN * np.asarray(emissivity, dtype=float) * ts * ts * ts
