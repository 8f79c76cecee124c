"""Economic thickness: the standard thickness with the least yearly cost of insulation plus heat.

The method of VDI 2055 and ISO 12241 (economic insulation thickness): the investment in
insulation is spread over its service life with the annuity (capital recovery) factor of the
interest rate, and added to the yearly cost of the heat that still flows through it; the
thickness with the smallest sum is the economic one.  Here the candidates are the rules'
standard thicknesses (``[thicknesses]``), the insulation is one intact layer of the item's
specification material (else its outermost installed material), fittings are left out (they
are the same at every thickness), and the heat is the engine's, under the energy site
(``audit.engine.items.solve_items_at_thicknesses``: each distinct item solved once per
candidate thickness).
"""

from __future__ import annotations

import numpy as np

from audit.economics.energy import yearly
from audit.economics.repair import insulation_cost
from audit.engine.items import solve_items_at_thicknesses
from audit.thermal import site_batch


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


def last_known(total) -> np.ndarray:
    """Per item (row of ``total``, shape (n, k)): the index of its thickest candidate with a
    known total cost (-1 where none): the edge of its candidate table, where an optimum found
    may lie beyond."""
    known = np.isfinite(np.asarray(total, float))
    k = known.shape[1]
    return np.where(known.any(axis=1), k - 1 - np.argmax(known[:, ::-1], axis=1), -1)


def economic_thickness(context, economic_rules, *, site, hours_h, material, edge=False,
                       payers=None):
    """Economic thickness [m] of every row of the context's table (NaN where not computed);
    with ``edge``, also whether it is the thickest candidate that could be costed for the row
    (the standard list's last, or the repair cost table's last column).

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
    payers : HeatGainPayers, optional
        Per row, who pays for a heat gain (refrigeration for every row when not given).
    """
    table, rules = context.table, context.rules
    n = len(table)
    out = np.full(n, np.nan)
    states = context.states(site)
    rows = np.flatnonzero(states["computed"].to_numpy(bool) & (material != "")
                          & ~table["temp_is_ambient"].fillna(False).to_numpy(bool))
    candidates = np.asarray(rules.thicknesses, float)
    at_edge = np.zeros(n, bool)
    if rows.size == 0 or candidates.size == 0:
        return (out, at_edge) if edge else out
    items = table.iloc[rows]
    # One intact layer of the material, fittings covered; the engine solves it at every
    # candidate, solving once the items that can share (it groups them once for all).
    batch, _ = site_batch(context.prepared().take(rows).reinsulated(material[rows], candidates[0]),
                          rules, site or None)
    solved = solve_items_at_thicknesses(batch, context.tables()[0], candidates,
                                        surface_model=context.surface_model)
    shape = items["shape"].to_numpy(object)
    heat_cost = np.full((rows.size, candidates.size), np.nan)
    investment = np.full((rows.size, candidates.size), np.nan)
    for k, (t, got) in enumerate(zip(candidates, solved)):
        heat = np.where(got.converged, got.heat_loss, np.nan)
        heat_cost[:, k] = yearly(heat, hours_h[rows], economic_rules,
                                 None if payers is None else payers.take(rows))["cost"]
        investment[:, k] = insulation_cost(economic_rules.repair, shape, items["od_m"].to_numpy(float),
                                           items["length_m"].to_numpy(float), got.outer_area, t)
    annuity = float(annuity_factor(economic_rules.interest, economic_rules.life))
    chosen, _ = cheapest(candidates, heat_cost, investment, annuity)
    out[rows] = chosen
    last = last_known(annuity * investment + heat_cost)
    at_edge[rows] = np.isfinite(chosen) & (last >= 0) & (chosen == candidates[np.maximum(last, 0)])
    return (out, at_edge) if edge else out
