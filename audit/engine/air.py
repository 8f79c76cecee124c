"""Dry air at one standard atmosphere: conductivity, viscosity, Prandtl number.

Closed forms, vectorised over temperature, for the film temperatures of the
outer surfaces the engine deals with (cryogenic to red-hot surfaces in ambient
air).  Everything here is first order in density, which is what air at
101.325 kPa needs above 100 K (reduced density below 0.012):

* transport properties: the dilute-gas terms of Lemmon & Jacobsen (2004) plus
  the terms of their residual functions that are linear in density;
* density: the virial equation truncated after the second virial coefficient,
  which is taken from the density-linear terms of the air equation of state of
  Lemmon et al. (2000);
* isobaric heat capacity: the ideal-gas part of the same equation of state plus
  the matching second-virial real-gas correction (at 150 K the ideal-gas value
  alone is 1 % low).

The coefficients are those published in the two papers, copied from the air
fluid file distributed with CoolProp (``dev/fluids/Air.json``), which encodes
the same papers; none is recalled from memory.  What proves them copied right
is ``tests/engine/test_air.py``: it checks every property against CoolProp 8.0
(``PropsSI(..., 'Air')`` at 101325 Pa) from 100 K to 2000 K, where the largest
deviation is below 0.1 %.

References
----------
Lemmon, E. W., Jacobsen, R. T. (2004). Viscosity and thermal conductivity
equations for nitrogen, oxygen, argon, and air. Int. J. Thermophys. 25, 21-69.
doi:10.1023/B:IJOT.0000022327.04529.f3

Lemmon, E. W., Jacobsen, R. T., Penoncello, S. G., Friend, D. G. (2000).
Thermodynamic properties of air and mixtures of nitrogen, argon, and oxygen
from 60 to 2000 K at pressures to 2000 MPa. J. Phys. Chem. Ref. Data 29,
331-385. doi:10.1063/1.1285884
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from audit.errors import EngineInputError

PRESSURE = 101325.0
"""Pressure of the air these properties are for [Pa]."""

T_MIN = 100.0
"""Lowest temperature checked against CoolProp [K]."""

T_MAX = 2000.0
"""Highest temperature checked against CoolProp (upper limit of the equation of state) [K]."""

# Equation of state of Lemmon et al. (2000): reducing point, gas constant, molar mass.
_T_RED = 132.6312  # K
_RHO_RED = 10447.7  # mol/m3
_R = 8.31451  # J/(mol K), the value the equation of state was fitted with
_M_EOS = 0.02896546  # kg/mol

# Residual Helmholtz terms with density exponent d = 1 (their sum, divided by the
# reducing density, is the second virial coefficient B(T)): coefficient, tau exponent.
_B_N = np.array([0.118160747229, 0.713116392079, -1.61824192067,
                 -0.101365037912, -0.146629609713, 0.0148287891978])
_B_T = np.array([0.0, 0.33, 1.01, 1.6, 3.6, 3.5])

# Ideal-gas Helmholtz energy: power terms (only those with t not in {0, 1} reach cv),
# the log(tau) coefficient, two Planck-Einstein terms and one generalised term.
_CV_POW_N = np.array([6.057194e-08, -2.10274769e-05, -0.000158860716, -0.00019536342])
_CV_POW_T = np.array([-3.0, -2.0, -1.0, 1.5])
_CV_LOG_TAU = 2.490888032
_PE_N = (0.791309509, 0.212236768)
_PE_THETA = (25.36365, 16.90741)
_GEN_N, _GEN_THETA, _GEN_C = -0.197938904, 87.31279, 2.0 / 3.0

# Lemmon & Jacobsen (2004), air.
_EPS_K = 103.3  # epsilon/k [K]
_SIGMA_NM = 0.360  # Lennard-Jones size [nm]
_M_TRANSPORT = 28.9586  # g/mol, the molar mass of the transport correlations
_OMEGA_B = (0.431, -0.4623, 0.08406, 0.005341, -0.00331)
_RHO_RED_TRANSPORT = 10447.7  # mol/m3
# Residual viscosity terms linear in density (d = 1): N tau^t delta [uPa s]; the
# second carries exp(-delta), which is 1 to first order.
_ETA_R = ((10.72, 0.2), (-8.876, 0.6))
# Dilute conductivity: N1 eta0 + N2 tau^t2 + N3 tau^t3 [mW/(m K)], eta0 in uPa s.
_LAM_N1, _LAM_N2, _LAM_T2, _LAM_N3, _LAM_T3 = 1.308, 1.405, -1.1, -1.036, -0.3
# Residual conductivity term linear in density: N tau^t delta [mW/(m K)].
_LAM_R_N, _LAM_R_T = 8.743, 0.1


class AirProperties(NamedTuple):
    """Properties of dry air at :data:`PRESSURE`, each an array like the temperature."""

    conductivity: np.ndarray
    """Thermal conductivity k [W/(m K)]."""
    kinematic_viscosity: np.ndarray
    """Kinematic viscosity nu [m2/s]."""
    prandtl: np.ndarray
    """Prandtl number Pr [-]."""
    dynamic_viscosity: np.ndarray
    """Dynamic viscosity mu [Pa s]."""
    density: np.ndarray
    """Mass density rho [kg/m3]."""
    heat_capacity: np.ndarray
    """Isobaric specific heat capacity cp [J/(kg K)]."""


def _check_range(temperature: np.ndarray) -> None:
    inside = (temperature >= T_MIN) & (temperature <= T_MAX)  # False for NaN
    if not np.all(inside):
        raise EngineInputError(
            "air temperature outside the range the air properties are checked for",
            value=float(np.asarray(temperature)[~inside].flat[0]),
            expected=f"{T_MIN:g} K to {T_MAX:g} K")


def air_properties(temperature) -> AirProperties:
    """All properties of dry air at 101.325 kPa in one pass.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature, for surface correlations the film temperature [K].

    Returns
    -------
    AirProperties
        Conductivity [W/(m K)], kinematic viscosity [m2/s], Prandtl number [-],
        dynamic viscosity [Pa s], density [kg/m3] and isobaric heat capacity
        [J/(kg K)], each an array of the shape of ``temperature``.

    Raises
    ------
    EngineInputError
        If a temperature is NaN or lies outside 100 K to 2000 K, the range
        checked against CoolProp.

    Notes
    -----
    Validity: 100 K to 2000 K at 101.325 kPa, within 0.1 % of CoolProp 8.0.
    Property formulations and references are given in the module docstring.
    """
    t = np.asarray(temperature, dtype=float)
    _check_range(t)
    return _properties(t)


def _properties(t: np.ndarray) -> AirProperties:
    tau = _T_RED / t
    ln_tau = np.log(tau)

    # Second virial coefficient B rho_red = b(tau), with tau b' and tau^2 b'' for cp.
    b = np.full_like(tau, _B_N[0])  # the t = 0 term
    tau_db = np.zeros_like(tau)
    tau2_d2b = np.zeros_like(tau)
    for n, tt in zip(_B_N[1:], _B_T[1:]):
        term = n * np.exp(tt * ln_tau)
        b += term
        tau_db += tt * term
        tau2_d2b += (tt * (tt - 1.0)) * term

    delta = PRESSURE / (_R * _RHO_RED) / t  # ideal-gas reduced density
    delta /= 1.0 + b * delta  # first-order virial correction (Z = 1 + B rho)
    density = delta * (_RHO_RED * _M_EOS)

    # Ideal-gas cv/R = -tau^2 d2(alpha0)/dtau2; the power terms in 1/tau are cheap.
    inv_tau = t / _T_RED
    c3, c2, c1, c15 = _CV_POW_N * _CV_POW_T * (_CV_POW_T - 1.0)
    cv0 = _CV_LOG_TAU - (inv_tau * (c1 + inv_tau * (c2 + inv_tau * c3)) + c15 * tau * np.sqrt(tau))
    for n, theta in zip(_PE_N, _PE_THETA):
        x = theta * tau
        e = np.exp(-x)  # written with exp(-x): no overflow at low temperature
        cv0 += n * x * x * e / (1.0 - e) ** 2
    x = _GEN_THETA * tau
    e = _GEN_C * np.exp(-x)
    cv0 -= _GEN_N * x * x * e / (1.0 + e) ** 2
    # Real-gas cp/R to first order in delta (alpha_r = delta b(tau)).
    cp_r = (cv0 - delta * tau2_d2b
            + (1.0 + delta * (b - tau_db)) ** 2 / (1.0 + 2.0 * delta * b))
    heat_capacity = cp_r * (_R / _M_EOS)

    # Viscosity [uPa s]: dilute gas (collision integral) plus the linear residual.
    ln_ts = np.log(t / _EPS_K)
    omega = np.exp(_OMEGA_B[0] + ln_ts * (_OMEGA_B[1] + ln_ts * (
        _OMEGA_B[2] + ln_ts * (_OMEGA_B[3] + ln_ts * _OMEGA_B[4]))))
    eta0 = (0.0266958 * np.sqrt(_M_TRANSPORT) / _SIGMA_NM ** 2) * np.sqrt(t) / omega
    delta_tr = delta * (_RHO_RED / _RHO_RED_TRANSPORT)
    (n1, t1), (n2, t2) = _ETA_R
    mu = (eta0 + delta_tr * (n1 * np.exp(t1 * ln_tau) + n2 * np.exp(t2 * ln_tau))) * 1e-6

    lam = (_LAM_N1 * eta0 + _LAM_N2 * np.exp(_LAM_T2 * ln_tau)
           + _LAM_N3 * np.exp(_LAM_T3 * ln_tau)
           + _LAM_R_N * np.exp(_LAM_R_T * ln_tau) * delta_tr) * 1e-3

    return AirProperties(conductivity=lam, kinematic_viscosity=mu / density,
                         prandtl=mu * heat_capacity / lam, dynamic_viscosity=mu,
                         density=density, heat_capacity=heat_capacity)


def thermal_conductivity_air(temperature):
    """Thermal conductivity of dry air at 101.325 kPa.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature [K].

    Returns
    -------
    numpy.ndarray
        Thermal conductivity [W/(m K)].

    Notes
    -----
    Valid 100 K to 2000 K; Lemmon & Jacobsen (2004),
    doi:10.1023/B:IJOT.0000022327.04529.f3, terms up to first order in density.
    See :func:`air_properties`.
    """
    return air_properties(temperature).conductivity


def kinematic_viscosity_air(temperature):
    """Kinematic viscosity of dry air at 101.325 kPa.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature [K].

    Returns
    -------
    numpy.ndarray
        Kinematic viscosity [m2/s].

    Notes
    -----
    Valid 100 K to 2000 K; viscosity of Lemmon & Jacobsen (2004),
    doi:10.1023/B:IJOT.0000022327.04529.f3, over the second-virial density of
    Lemmon et al. (2000), doi:10.1063/1.1285884.  See :func:`air_properties`.
    """
    return air_properties(temperature).kinematic_viscosity


def prandtl_air(temperature):
    """Prandtl number of dry air at 101.325 kPa.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature [K].

    Returns
    -------
    numpy.ndarray
        Prandtl number mu cp / k [-].

    Notes
    -----
    Valid 100 K to 2000 K; see :func:`air_properties` for the formulations
    (Lemmon & Jacobsen 2004, doi:10.1023/B:IJOT.0000022327.04529.f3; Lemmon
    et al. 2000, doi:10.1063/1.1285884).
    """
    return air_properties(temperature).prandtl


def expansion_coefficient_ideal_gas(film_temperature):
    """Volumetric thermal expansion coefficient of an ideal gas, 1/T.

    Parameters
    ----------
    film_temperature : float or array_like
        Temperature the coefficient is evaluated at, usually the film
        temperature (T_surface + T_air)/2 [K].

    Returns
    -------
    numpy.ndarray
        beta = 1/T [1/K].

    Notes
    -----
    Exact for an ideal gas (beta = -(1/rho) d(rho)/dT at constant pressure with
    rho = p M / (R T)).  Real air at 1 atm has a slightly larger coefficient:
    1/T is low by 1.9 % at 150 K, 0.9 % at 200 K and 0.3 % at 300 K (CoolProp
    8.0), which changes a natural-convection coefficient (h ~ beta^(1/4) to
    beta^(1/3)) by at most 0.6 %.  Any positive temperature.
    """
    return 1.0 / np.asarray(film_temperature, dtype=float)


class AirTransport(NamedTuple):
    """The properties surface correlations need, each an array like the temperature."""

    conductivity: np.ndarray
    """Thermal conductivity k [W/(m K)]."""
    kinematic_viscosity: np.ndarray
    """Kinematic viscosity nu [m2/s]."""
    prandtl: np.ndarray
    """Prandtl number Pr [-]."""


# air_properties tabulated once at import on a fine grid, for the solver's hot loop:
# linear interpolation there costs a tenth of the closed form.  The grid runs one
# step past T_MAX so that T_MAX itself has an upper neighbour.
_STEP = 0.25  # K; interpolation error below 2e-6 relative (tested)
_GRID = T_MIN + _STEP * np.arange(int(round((T_MAX - T_MIN) / _STEP)) + 2)
_TABLE = _properties(_GRID)
_VALUES = np.stack([_TABLE.conductivity, _TABLE.kinematic_viscosity, _TABLE.prandtl])
_SLOPES = np.diff(_VALUES, axis=1)
_MU = _TABLE.dynamic_viscosity[None]
_MU_SLOPES = np.diff(_MU, axis=1)


def _interpolated(rows, slopes, temperature):
    """The table ``rows`` at ``temperature`` [K], linearly interpolated: the values, and the
    rise of each row over the table step the temperature falls in (per step, not per K)."""
    t = np.asarray(temperature, dtype=float)
    _check_range(t)
    x = (t - T_MIN) * (1.0 / _STEP)
    i = x.astype(np.intp)  # floor, as x >= 0
    f = x - i
    steps = [d[i] for d in slopes]
    return [v[i] + f * d for v, d in zip(rows, steps)], steps


def air_transport_tabulated(temperature, *, with_derivatives=False):
    """Conductivity, kinematic viscosity and Prandtl number, fast.

    The same properties as :func:`air_properties`, linearly interpolated in a
    0.25 K table of it built at import; meant for solvers that evaluate
    many rows many times.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature, for surface correlations the film temperature [K].
    with_derivatives : bool, optional
        Also return the derivatives of the three properties in temperature.

    Returns
    -------
    AirTransport
        Conductivity [W/(m K)], kinematic viscosity [m2/s] and Prandtl number
        [-], arrays of the shape of ``temperature``.
    AirTransport
        Only ``with_derivatives``: their derivatives in temperature [W/(m K2),
        m2/(s K), 1/K], those of the interpolation (constant within a table
        step), so that they are the exact slopes of the values returned.

    Raises
    ------
    EngineInputError
        If a temperature is NaN or lies outside 100 K to 2000 K.

    Notes
    -----
    Validity 100 K to 2000 K; within 2e-6 (relative) of :func:`air_properties`.
    """
    (k, nu, pr), steps = _interpolated(_VALUES, _SLOPES, temperature)
    values = AirTransport(conductivity=k, kinematic_viscosity=nu, prandtl=pr)
    if not with_derivatives:
        return values
    return values, AirTransport(*(d * (1.0 / _STEP) for d in steps))


def dynamic_viscosity_tabulated(temperature, *, with_derivative=False):
    """Dynamic viscosity of dry air at 101.325 kPa, fast.

    The viscosity of :func:`air_properties`, linearly interpolated in the same 0.25 K
    table as :func:`air_transport_tabulated`.

    Parameters
    ----------
    temperature : float or array_like
        Air temperature [K].
    with_derivative : bool, optional
        Also return the derivative in temperature [Pa s/K], that of the interpolation.

    Returns
    -------
    numpy.ndarray
        Dynamic viscosity [Pa s], of the shape of ``temperature``.
    numpy.ndarray
        Only ``with_derivative``: its derivative in temperature [Pa s/K].

    Raises
    ------
    EngineInputError
        For a temperature that :func:`air_transport_tabulated` refuses.

    Notes
    -----
    The range and accuracy of :func:`air_transport_tabulated`, whose table this is.
    """
    (mu,), (step,) = _interpolated(_MU, _MU_SLOPES, temperature)
    if not with_derivative:
        return mu
    return mu, step * (1.0 / _STEP)
