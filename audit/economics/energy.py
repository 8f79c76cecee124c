"""Energy over a year, the energy bought to supply it, its cost and its CO2.

Hot service: the heat lost is made up by a heater or boiler burning fuel, so the fuel bought
is the heat over the heater's efficiency.  Cold service: the heat gained is removed by
refrigeration, so the electricity bought is the heat over the coefficient of performance.
All functions are pure and vectorised (scalars, numpy arrays and pandas Series alike).
"""

from __future__ import annotations

import numpy as np

#: The International Table Btu in joules (exact by definition: 1 Btu_IT = 1055.05585262 J).
BTU_IT_J = 1055.05585262
#: Million Btu (mmBtu, MMBtu) per MWh: 3.6e9 J / (1e6 Btu_IT).
MMBTU_PER_MWH = 3.6e9 / (1e6 * BTU_IT_J)


def annual_heat_mwh(heat_rate_w, hours_h):
    """Heat lost (or gained) in a year at a steady rate.

    Parameters
    ----------
    heat_rate_w : float or array_like
        Heat loss of the item; negative for a heat gain (cold service) [W]
    hours_h : float or array_like
        Operating hours in the year, 0 to 8784 [h]

    Returns
    -------
    float or numpy.ndarray
        Magnitude of the heat over the year [MWh] (W x h = Wh; 1 MWh = 1e6 Wh).
        NaN where either input is NaN.
    """
    return np.abs(np.asarray(heat_rate_w, float)) * np.asarray(hours_h, float) * 1e-6


def purchased_energy_mwh(heat_mwh, conversion):
    """Energy bought to make up (or remove) the heat.

    Parameters
    ----------
    heat_mwh : float or array_like
        Heat lost or gained over the year [MWh]
    conversion : float or array_like
        Heat delivered per unit of energy bought: a heater's efficiency (0 to 1] for hot
        service, a refrigeration coefficient of performance (> 0) for cold service [-]

    Returns
    -------
    float or numpy.ndarray
        Fuel or electricity [MWh]
    """
    conversion = np.asarray(conversion, float)
    if np.any(conversion <= 0):
        raise ValueError("an efficiency or coefficient of performance must be above 0")
    return np.asarray(heat_mwh, float) / conversion


def annual_cost(purchased_mwh, price_per_mwh):
    """Money paid for the energy bought [currency] = energy [MWh] x price [currency/MWh]."""
    return np.asarray(purchased_mwh, float) * np.asarray(price_per_mwh, float)


def annual_co2_t(purchased_mwh, emission_factor_kg_per_mwh):
    """CO2 emitted by the energy bought [t] = energy [MWh] x factor [kg CO2/MWh] / 1000.

    For fuel, the factor is per MWh of fuel on the basis its source states (the US EPA factors
    of 40 CFR Part 98 Subpart C Table C-1 are per mmBtu on the higher heating value).
    """
    return np.asarray(purchased_mwh, float) * np.asarray(emission_factor_kg_per_mwh, float) * 1e-3


def yearly(heat_rate_w, hours_h, economic_rules):
    """Heat, energy bought, cost and CO2 per item, choosing the carrier by the sign of the heat.

    Parameters
    ----------
    heat_rate_w : array_like
        Heat loss per item, negative for a gain [W]
    hours_h : array_like
        Operating hours per item [h]
    economic_rules : EconomicRules
        ``heat`` (fuel) and ``cold`` (electricity) carriers.

    Returns
    -------
    dict of numpy.ndarray
        ``heat [MWh]``, ``bought [MWh]``, ``cost``, ``co2 [t]``, ``price`` (per MWh bought) and
        ``cold`` (bool: heat gained, paid for with electricity).
    """
    q = np.asarray(heat_rate_w, float)
    with np.errstate(invalid="ignore"):
        cold = q < 0
    hot, chill = economic_rules.heat, economic_rules.cold
    conversion = np.where(cold, chill.conversion, hot.conversion)
    price = np.where(cold, chill.price, hot.price)
    factor = np.where(cold, chill.emission_factor, hot.emission_factor)
    heat = annual_heat_mwh(q, hours_h)
    bought = purchased_energy_mwh(heat, conversion)
    return {"heat [MWh]": heat, "bought [MWh]": bought, "cost": annual_cost(bought, price),
            "co2 [t]": annual_co2_t(bought, factor), "price": price, "cold": cold}
