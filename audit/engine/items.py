"""Solve a register of items: the one batching wrapper around the element solve.

:func:`solve_items` validates nothing and builds no element itself (see
:mod:`audit.engine.validation` and :mod:`audit.engine.elements`); it owns what makes a large
register cheap: items that can share one solve are solved once and their answers scaled to
each (:func:`shared_items`), and a large batch is cut into parts solved side by side in
threads (:func:`solve_threads`).  :func:`solve_items_at_thicknesses` solves one batch at
several insulation thicknesses, grouping its items once for all of them.

The batch's types and codes live in :mod:`audit.engine.batch` and are re-exported here.
"""

from __future__ import annotations

import os
from collections.abc import Iterator
from concurrent.futures import ThreadPoolExecutor

import numpy as np

from audit.engine.batch import (  # noqa: F401 (re-exported: the engine's item interface)
    ELLIPSOIDAL, FACING_DOWN, FACING_UP, FLAT, FLAT_HEADS, HEAD_CODES, HEMISPHERICAL, HORIZONTAL,
    HORIZONTAL_VESSEL, NO_HEADS, ORIENTATION_CODES, PIPE, SHAPE_CODES, SPHERE_ITEM, VERTICAL,
    VERTICAL_VESSEL, ItemBatch, ItemStates, complete, item_surfaces, rows_of, take_items)
from audit.engine.conduction import ConductivityTables
from audit.engine.distinct import WORTH_SHARING, distinct_rows, may_repeat
from audit.engine.elements import solve_valid_items
from audit.engine.validation import invalid_reasons

#: Fewest items a thread is given: below this a part's fixed costs outweigh the second core.
_ITEMS_PER_THREAD = 10_000


def solve_items(batch: ItemBatch, tables: ConductivityTables, *,
                surface_model: str = "correlations", threads: int | None = None) -> ItemStates:
    """Heat loss and surface temperatures of every item of ``batch`` in one vectorised solve.

    Parameters
    ----------
    batch : ItemBatch
        The items, SI units.
    tables : ConductivityTables
        Conductivity tables that ``batch.layer_table`` indexes.
    surface_model : str
        Name of the outer-surface model, see
        :func:`audit.engine.surface.available_surface_models`.
    threads : int, optional
        Most threads to solve in; by default one per CPU this process may use.

    Returns
    -------
    ItemStates
        Items with bad inputs carry a reason and NaN results; the rest of the batch is
        computed regardless.

    Notes
    -----
    Each distinct item is solved once and its answer shared (:func:`shared_items`, grouping
    by :mod:`audit.engine.distinct`).  Within the items solved, each distinct wall element is
    solved once as well.

    A large batch is cut into consecutive parts of at least 10,000 items, solved side by
    side in threads: numpy lets go of the interpreter lock inside its array operations, so
    the parts use every core.  An item's answer does not depend on the cut.
    """
    b = complete(batch)
    sharing = _shared_items(b)
    if sharing is None:
        return _solve_in_parts(b, tables, surface_model, threads)
    states = _solve_in_parts(take_items(b, sharing[0]), tables, surface_model, threads)
    return _spread(states, sharing)


def solve_items_at_thicknesses(batch: ItemBatch, tables: ConductivityTables, thicknesses, *,
                               surface_model: str = "correlations",
                               threads: int | None = None) -> Iterator[ItemStates]:
    """:func:`solve_items` of ``batch`` with every item's one layer at each thickness in turn.

    Parameters
    ----------
    batch : ItemBatch
        The items, SI units, each with at most one layer (its thickness is replaced).
    tables : ConductivityTables
        Conductivity tables that ``batch.layer_table`` indexes.
    thicknesses : array_like, shape (k,)
        Layer thicknesses to solve at [m]
    surface_model, threads
        As for :func:`solve_items`.

    Yields
    ------
    ItemStates
        One per thickness, in order, each what :func:`solve_items` returns for the batch at
        it (one at a time: a register's answers at every thickness at once would be large).

    Notes
    -----
    Every item has the same thickness at each candidate, so the items that can share one
    solve are the same at every candidate: they are grouped once, and only the
    representatives are solved per thickness.
    """
    b = complete(batch)
    if b.layer_table.shape[1] != 1:
        raise ValueError("solve_items_at_thicknesses: the items must have one layer slot each")
    thicknesses = np.asarray(thicknesses, float).reshape(-1)
    if thicknesses.size == 0:
        return
    b.layer_thickness = np.full_like(b.layer_thickness, thicknesses[0])
    sharing = _shared_items(b)
    solved = b if sharing is None else take_items(b, sharing[0])
    for thickness in thicknesses:
        solved.layer_thickness = np.full_like(solved.layer_thickness, thickness)
        states = _solve_in_parts(solved, tables, surface_model, threads)
        yield states if sharing is None else _spread(states, sharing)


def _spread(states: ItemStates, sharing) -> ItemStates:
    """The answers of the representatives of :func:`shared_items`, given to every item of
    their groups: heat loss and outer area scaled to each item's run."""
    _, group, scale = sharing
    shared = rows_of(states, group)
    shared.heat_loss = shared.heat_loss * scale
    shared.outer_area = shared.outer_area * scale
    return shared


def shared_items(batch: ItemBatch):
    """Which items of ``batch`` can share one solve, if enough can to be worth it.

    Items share when every input they use is equal; horizontal pipes without uninsulated
    fittings whatever their length, since every answer of theirs is per metre or in
    proportion to the run.

    Returns
    -------
    tuple of numpy.ndarray or None
        ``(first, group, scale)``: the representative items, each item's group, and the
        factor [-] that turns its representative's heat loss and outer area into its own (the
        ratio of run lengths, else 1); None when at most a fifth of the items would be saved.
    """
    return _shared_items(complete(batch))


def _shared_items(b: ItemBatch):
    """:func:`shared_items` of a batch already completed by :func:`complete`."""
    length_free = ((b.shape == PIPE) & (b.orientation == HORIZONTAL) & (b.fitting_length == 0)
                   & np.isfinite(b.length) & (b.length > 0))
    run = np.where(length_free, 1.0, b.length)  # 1 m: any run, the answer per metre
    if not may_repeat([b.t_process, b.od, run, b.fitting_length, b.layer_thickness[:, 0]]):
        return None
    # Inputs an item neither uses nor checks are left out of its key (NaN for all): the
    # finish of a part it does not have, the area of a round item, the heads of a pipe.
    has_cover, bare_part = item_surfaces(b)
    vessel = np.isin(b.shape, [VERTICAL_VESSEL, HORIZONTAL_VESSEL])
    unused = {"area": b.shape != FLAT, "heads": ~vessel,
              **{name: ~has_cover for name in ("emissivity", "iso_ca", "iso_cb")},
              **{name: ~bare_part for name in ("bare_emissivity", "bare_iso_ca", "bare_iso_cb")}}
    key = [run]
    for name, value in vars(b).items():
        if name == "length":
            continue
        value = np.asarray(value, float).reshape(len(b), -1)
        if name in unused:
            value = np.where(unused[name][:, None], np.nan, value)
        key.extend(value.T)
    first, group = distinct_rows(key)
    if first.size > WORTH_SHARING * len(b):
        return None
    with np.errstate(invalid="ignore", divide="ignore"):
        scale = np.where(length_free, b.length / b.length[first][group], 1.0)
    return first, group, scale


def _solve_in_parts(b: ItemBatch, tables: ConductivityTables, surface_model: str,
                    threads: int | None) -> ItemStates:
    """:func:`_solve_all` on consecutive parts of ``b``, one thread each (see solve_items)."""
    n = len(b)
    parts = solve_threads(n, threads)
    if parts == 1:
        return _solve_all(b, tables, surface_model)
    cuts = np.linspace(0, n, parts + 1).astype(int)
    pieces = [rows_of(b, slice(start, stop)) for start, stop in zip(cuts, cuts[1:])]  # views
    with ThreadPoolExecutor(parts) as pool:
        solved = list(pool.map(lambda piece: _solve_all(piece, tables, surface_model), pieces))
    return type(solved[0])(**{
        name: np.concatenate([getattr(part, name) for part in solved])
        for name in vars(solved[0])})


def solve_threads(n_items: int, threads: int | None = None) -> int:
    """Threads :func:`solve_items` uses for ``n_items`` distinct items.

    One per CPU this process may run on (or at most ``threads``), each with at least
    10,000 items.
    """
    if threads is None:
        try:
            threads = len(os.sched_getaffinity(0))
        except AttributeError:  # not on every system
            threads = os.cpu_count() or 1
    return min(max(1, threads), max(1, n_items // _ITEMS_PER_THREAD))


def _solve_all(b: ItemBatch, tables: ConductivityTables, surface_model: str) -> ItemStates:
    """Validate every item of ``b``, then solve the valid ones (one part, one thread)."""
    return solve_valid_items(b, invalid_reasons(b, tables, surface_model), tables, surface_model)
