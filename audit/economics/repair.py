"""What a repair costs and what it saves.

What a repair is (:func:`audit.checks.repairs.plan_repairs`) is shared with the remedies of
the findings.  An item with nothing to repair saves 0 and has no payback.  The saving
is reckoned with the engine on a modified copy of the item table, for the whole register in
one solve.  The cost of a row's work is priced once, by :func:`audit.planning.plan_rows`, with
the functions here: the rule tables of ``[economics.repair]`` are INSTALLED rates (material,
jacket and the insulators' labour): per metre of pipe run
by size and thickness, per m2 of insulated surface for vessels, spheres, flat items and pipes
larger than the table, per removable cover for fittings.  Between listed thicknesses the cost
is interpolated linearly; a thickness or fitting size outside the tables has no cost (NaN,
with a note), never the nearest entry.
"""

from __future__ import annotations

import numpy as np

from audit.checks.below_spec import _EDGE_M
from audit.pipe_sizes import NOMINAL_PIPE_SIZES

_OD_OF_NPS = {value: mm / 1000.0 for _, value, _, mm in NOMINAL_PIPE_SIZES}
#: Size comparisons carry this slack so that the same number written in the register and in a
#: rule file meets at a table edge whatever the unit-conversion rounding.
_EDGE_REL = 1e-9


def size_row(repair, od_m) -> np.ndarray:
    """Row of the repair tables for each pipe outside diameter: the first size whose ASME
    B36.10M outside diameter is at least the pipe's; ``len(sizes)`` beyond the last row."""
    bounds = np.array([_OD_OF_NPS[s] for s in repair.sizes]) * (1 + _EDGE_REL)
    with np.errstate(invalid="ignore"):
        return np.searchsorted(bounds, np.asarray(od_m, float), side="left")


def insulation_cost(repair, shape, od_m, length_m, surface_m2, thickness_m) -> np.ndarray:
    """Cost of insulating each whole item at a total thickness, from the repair tables.

    Parameters
    ----------
    repair : Repair
        ``[economics.repair]`` tables.
    shape : array of str
        Item shapes; ``pipe`` uses the per-metre table up to its last size [-]
    od_m : array of float
        Outside diameter of the metal [m]
    length_m : array of float
        Pipe run length [m]
    surface_m2 : array of float
        Insulated outer surface of non-pipe items at this thickness (from the engine) [m2]
    thickness_m : float or array of float
        Total insulation thickness [m]

    Returns
    -------
    numpy.ndarray
        Cost [currency]; NaN where the thickness is outside the table's columns (or inputs
        are NaN).  Pipes beyond the last size row cost per m2 of the insulation's outer
        surface, pi (od + 2 t) L.
    """
    shape = np.asarray(shape, object)
    od = np.asarray(od_m, float)
    t = np.broadcast_to(np.asarray(thickness_m, float), od.shape)
    cols = np.asarray(repair.thicknesses, float)
    with np.errstate(invalid="ignore"):
        inside = (t >= cols[0] - _EDGE_M) & (t <= cols[-1] + _EDGE_M)
    j = np.clip(np.searchsorted(cols, np.where(inside, t, cols[0])), 1, cols.size - 1)
    w = np.clip((t - cols[j - 1]) / (cols[j] - cols[j - 1]), 0.0, 1.0)  # edge slack only
    pipe_table = np.asarray(repair.pipe_per_m, float)
    surface = np.asarray(repair.surface_per_m2, float)
    row = size_row(repair, od)
    in_pipe_table = (shape == "pipe") & (row < len(repair.sizes))
    r = np.minimum(row, len(repair.sizes) - 1)
    per_m = pipe_table[r, j - 1] * (1 - w) + pipe_table[r, j] * w
    per_m2 = surface[j - 1] * (1 - w) + surface[j] * w
    area = np.where(shape == "pipe", np.pi * (od + 2 * t) * np.asarray(length_m, float),
                    np.asarray(surface_m2, float))
    cost = np.where(in_pipe_table, per_m * np.asarray(length_m, float), per_m2 * area)
    return np.where(inside, cost, np.nan)


def cover_cost(repair, od_m, count) -> np.ndarray:
    """Cost of ``count`` removable fitting covers per pipe [currency]; 0 for no fitting, NaN
    for a pipe beyond the table's last size."""
    count = np.asarray(count, float)
    row = size_row(repair, od_m)
    covers = np.asarray(repair.cover_per_fitting, float)
    each = np.where(row < covers.size, covers[np.minimum(row, covers.size - 1)], np.nan)
    return np.where(count > 0, count * each, 0.0)


def payback_years(cost, yearly_saving, needed) -> np.ndarray:
    """Simple payback [yr] = repair cost [currency] / money saved per year [currency/yr].

    NaN where nothing is to be repaired, or the repair saves no money (a repair that does
    not pay back has no payback time rather than a negative one).
    """
    cost = np.asarray(cost, float)
    saving = np.asarray(yearly_saving, float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(np.asarray(needed, bool) & (saving > 0), cost / saving, np.nan)
