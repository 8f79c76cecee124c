"""Energy over a year, the energy bought to supply it, its cost and its CO2.

Hot service: the heat lost is made up by a heater or boiler burning fuel, so the fuel bought
is the heat over the heater's efficiency.  Cold service: who pays for the heat gained is the
item's fluid's ``heat_gain``: refrigeration removes it, so the electricity bought is the heat
over the coefficient of performance; or it boils the product off (a boiling liquid such as
LNG), so the cost is the mass boiled off at the product's price; or nobody pays (a gas warmed
downstream anyway).
All functions are pure and vectorised (scalars, numpy arrays and pandas Series alike).
"""

from __future__ import annotations

from dataclasses import dataclass

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


def boil_off_kg_h(heat_rate_w, latent_heat_j_kg):
    """Liquid boiled off by the heat a boiling liquid gains: m = Q / h_fg.

    Parameters
    ----------
    heat_rate_w : float or array_like
        Heat loss of the item, negative for a heat gain [W]
    latent_heat_j_kg : float or array_like
        Latent heat of vaporisation of the liquid at its boiling point; NaN for a fluid that
        is not a boiling liquid [J/kg]

    Returns
    -------
    float or numpy.ndarray
        Mass boiled off [kg/h]: 0 where the item loses heat, NaN where the fluid is not a
        boiling liquid or the heat is not known. Valid for a liquid held at its boiling point
        (all heat gained goes to vaporisation; none to warming a subcooled liquid).
    """
    q = np.asarray(heat_rate_w, float)
    with np.errstate(invalid="ignore"):
        return np.maximum(-q, 0.0) / np.asarray(latent_heat_j_kg, float) * 3600.0


#: How a cold item's heat gain is paid for, by code (``HeatGainPayers.mode``).
REFRIGERATION, BOIL_OFF, UNPAID = 0, 1, 2


@dataclass(frozen=True)
class HeatGainPayers:
    """Per item, how the heat it gains is paid for (the ``heat_gain`` of its fluid)."""

    mode: np.ndarray         #: REFRIGERATION, BOIL_OFF or UNPAID per item
    latent_heat: np.ndarray  #: [J/kg], NaN for a fluid that is not a boiling liquid
    price: np.ndarray        #: value of the boil-off, currency per kg (NaN: not boil-off)
    co2: np.ndarray          #: CO2 of the boil-off [kg/kg]

    def take(self, rows) -> HeatGainPayers:
        return HeatGainPayers(self.mode[rows], self.latent_heat[rows], self.price[rows],
                              self.co2[rows])


def yearly(heat_rate_w, hours_h, economic_rules, payers: HeatGainPayers | None = None):
    """Heat, energy bought, cost and CO2 per item, choosing the carrier by the sign of the heat
    and, for a heat gain, by who pays for it.

    Parameters
    ----------
    heat_rate_w : array_like
        Heat loss per item, negative for a gain [W]
    hours_h : array_like
        Operating hours per item [h]
    economic_rules : EconomicRules
        ``heat`` (fuel) and ``cold`` (electricity) carriers.
    payers : HeatGainPayers, optional
        Per item, how a heat gain is paid for: refrigeration (electricity at the cold
        carrier's COP; every item when not given), boil-off (the product boiled off, at its
        price, with its CO2) or not at all.

    Returns
    -------
    dict of numpy.ndarray
        ``heat [MWh]``, ``bought [MWh]`` (0 for a gain paid by boil-off or not at all),
        ``cost``, ``co2 [t]``, ``price`` (per MWh bought), ``cold`` (bool: heat gained),
        ``boil_off [t]`` (boiling liquids, heat gained in the year over the latent heat; NaN
        for other fluids) and ``mode`` (the payer code of a gain, -1 for a loss).
    """
    q = np.asarray(heat_rate_w, float)
    hours = np.asarray(hours_h, float)
    with np.errstate(invalid="ignore"):
        cold = q < 0
    n = q.shape
    if payers is None:
        payers = HeatGainPayers(np.full(n, REFRIGERATION), np.full(n, np.nan), np.full(n, np.nan),
                                np.full(n, np.nan))
    hot, chill = economic_rules.heat, economic_rules.cold
    conversion = np.where(cold, chill.conversion, hot.conversion)
    price = np.where(cold, chill.price, hot.price)
    factor = np.where(cold, chill.emission_factor, hot.emission_factor)
    heat = annual_heat_mwh(q, hours)
    bought = purchased_energy_mwh(heat, conversion)
    cost, co2 = annual_cost(bought, price), annual_co2_t(bought, factor)
    boiled_t = boil_off_kg_h(q, payers.latent_heat) * hours * 1e-3
    by_boil_off = cold & (payers.mode == BOIL_OFF)
    unpaid = cold & (payers.mode == UNPAID)
    not_bought = by_boil_off | unpaid
    bought = np.where(not_bought, 0.0, bought)
    cost = np.where(unpaid, 0.0, np.where(by_boil_off, boiled_t * 1e3 * payers.price, cost))
    co2 = np.where(unpaid, 0.0, np.where(by_boil_off, boiled_t * payers.co2, co2))
    return {"heat [MWh]": heat, "bought [MWh]": bought, "cost": cost, "co2 [t]": co2,
            "price": np.where(not_bought, np.nan, price), "cold": cold, "boil_off [t]": boiled_t,
            "mode": np.where(cold, payers.mode, -1)}
