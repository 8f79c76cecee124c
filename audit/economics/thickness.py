"""Economic thickness: the standard thickness with the least yearly cost of insulation plus heat.

The method of VDI 2055 and ISO 12241 (economic insulation thickness): the investment in
insulation is spread over its service life with the annuity (capital recovery) factor of the
interest rate, and added to the yearly cost of the heat that still flows through it; the
thickness with the smallest sum is the economic one.  Here the candidates are the rules'
standard thicknesses (``[thicknesses]``), the insulation is one intact layer of the item's
specification material (else its outermost installed material), fittings are left out (they
are the same at every thickness), and the heat is the engine's, under the energy site.  Each
distinct item (see ``audit.engine.items.shared_items``) is solved once per candidate thickness.
"""

from __future__ import annotations

import numpy as np

from audit.economics.energy import yearly
from audit.economics.repair import insulation_cost
from audit.engine.items import shared_items
from audit.repeats import map_values
from audit.thermal import prepared_states, site_batch


def annuity_factor(interest, years):
    """Annuity (capital recovery) factor: the yearly payment that repays a capital of 1.

    a = i (1 + i)^n / ((1 + i)^n - 1), and 1/n when i = 0 (its limit).

    Parameters
    ----------
    interest : float or array_like
        Interest rate per year, >= 0 (0.08 for 8 %) [-]
    years : float or array_like
        Service life (repayment period), > 0 [year]

    Returns
    -------
    float or numpy.ndarray
        Annuity factor [1/year]

    References
    ----------
    VDI 2055 Blatt 1 (2019), Thermal insulation of heated and refrigerated operational
    installations: calculation rules (annuity method for the economic thickness); any
    engineering-economy text's capital recovery factor (A/P, i, n).
    """
    i = np.asarray(interest, float)
    n = np.asarray(years, float)
    if np.any(i < 0) or np.any(n <= 0):
        raise ValueError("interest must be >= 0 and the service life > 0")
    # (1+i)^n - 1 through expm1/log1p: exact to round-off even for a tiny rate, where the
    # plain difference cancels to 0.
    excess = np.expm1(n * np.log1p(i))
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(i > 0, i * (1.0 + excess) / excess, 1.0 / n)


def cheapest(candidates_m, yearly_heat_cost, investment, annuity):
    """The candidate with the least total yearly cost, per item.

    Parameters
    ----------
    candidates_m : array_like, shape (k,)
        Candidate thicknesses [m]
    yearly_heat_cost, investment : array_like, shape (n, k)
        Per item and candidate: cost of the heat lost in a year [currency/yr] and cost of
        the insulation [currency]; NaN where not known
    annuity : float
        Annuity factor [1/yr]

    Returns
    -------
    thickness : numpy.ndarray, shape (n,)
        Economic thickness [m]; NaN where no candidate is known
    total : numpy.ndarray, shape (n,)
        Its total yearly cost [currency/yr]
    """
    total = annuity * np.asarray(investment, float) + np.asarray(yearly_heat_cost, float)
    known = np.isfinite(total).any(axis=1)
    best = np.argmin(np.where(np.isfinite(total), total, np.inf), axis=1)
    pick = total[np.arange(total.shape[0]), best]
    return (np.where(known, np.asarray(candidates_m, float)[best], np.nan),
            np.where(known, pick, np.nan))


def economic_thickness(context, economic_rules, *, site, hours_h, material):
    """Economic thickness [m] of every row of the context's table (NaN where not computed).

    Parameters
    ----------
    context : CheckContext
        Item table, rules (``thicknesses``), surface model and conductivity tables.
    economic_rules : EconomicRules
        Prices, annuity inputs and repair cost tables.
    site : str
        Site the energy is reckoned under ("" = each item's own conditions).
    hours_h : numpy.ndarray
        Operating hours per row [h]
    material : numpy.ndarray of str
        Insulation material per row ("" = none known: not computed).
    """
    table, rules = context.table, context.rules
    n = len(table)
    out = np.full(n, np.nan)
    states = context.states(site)
    rows = np.flatnonzero(states["computed"].to_numpy(bool) & (material != "")
                          & ~table["temp_is_ambient"].fillna(False).to_numpy(bool))
    candidates = np.asarray(rules.thicknesses, float)
    if rows.size == 0 or candidates.size == 0:
        return out
    items = table.iloc[rows].reset_index(drop=True)
    prepared = context.prepared().take(rows)
    # Every item gets the same thickness at each candidate, so the items that can share one
    # solve (the engine's shared_items: equal inputs, or pipe runs that differ in length only)
    # are the same at every candidate: group them once, solve the representatives only.
    probe, _ = site_batch(prepared.reinsulated(material[rows], candidates[0]), rules, site or None)
    sharing = shared_items(probe)
    first, group, scale = sharing if sharing is not None else \
        (np.arange(rows.size), np.arange(rows.size), np.ones(rows.size))
    representatives = prepared.take(first)
    material_index = map_values(material[rows][first], context.tables()[1], -1, dtype=int)
    shape = items["shape"].to_numpy(object)
    heat_cost = np.full((rows.size, candidates.size), np.nan)
    investment = np.full((rows.size, candidates.size), np.nan)
    for k, t in enumerate(candidates):
        got = prepared_states(representatives.reinsulated(material_index, t), rules,
                              site=site or None, surface_model=context.surface_model,
                              tables=context.tables())
        computed = got["computed"].to_numpy(bool)[group]
        heat = np.where(computed, got["heat_loss_W"].to_numpy(float)[group] * scale, np.nan)
        heat_cost[:, k] = yearly(heat, hours_h[rows], economic_rules)["cost"]
        investment[:, k] = insulation_cost(economic_rules.repair, shape, items["od_m"].to_numpy(float),
                                           items["length_m"].to_numpy(float),
                                           got["outer_area_m2"].to_numpy(float)[group] * scale, t)
    annuity = float(annuity_factor(economic_rules.interest, economic_rules.life))
    out[rows] = cheapest(candidates, heat_cost, investment, annuity)[0]
    return out
