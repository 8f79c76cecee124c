"""The vectorised solver: layers in series, with the outer surface's heat balance.

For one wall element the unknown is its outer surface temperature T_s.  Given T_s, the
surface model gives the heat flux leaving the surface, hence the heat rate Q through every
layer (steady state: the same Q through each).  Marching inwards, each layer's hot-face
temperature follows exactly from the conductivity integral,
Phi(T_hot) = Phi(T_cold) + Q / G, and finally the inner resistance (film, metal wall) adds
Q * R.  The residual

    f(T_s) = T_hot_computed(T_s) - T_process

increases with T_s (a hotter surface sheds more heat, which needs a hotter inside), is <= 0
at the lowest of process, air and surroundings temperatures and >= 0 at the highest, so a
bracketed root always exists and is unique.  The root is found for every element at once by
Newton steps kept inside that bracket, falling back to bisection when a step leaves the
bracket or fails to halve the residual (the safeguarded Newton method, Press, W.H. et al.
(2007), Numerical Recipes, 3rd ed., Cambridge, section 9.4): quadratic where the residual is
smooth, never worse than bisection.  The derivative comes from the march itself: through each
layer k(T_hot) dT_hot = k(T_cold) dT_cold + dQ/G, with dQ/dT_s from the surface model's own
analytic slope.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from audit.engine.conduction import ConductivityTables

#: Relative closure of the surface heat balance that counts as converged.
BALANCE_TOLERANCE = 1e-6
#: A working set this small is swept whole rather than gathered anew.
_SMALL_SET = 4096


@dataclass
class WallSolution:
    """Answer of :func:`solve_walls` for n elements with up to L layers (SI units)."""

    surface_temp: np.ndarray       #: outer surface temperature [K], (n,)
    interface_temps: np.ndarray    #: hot face of layer 1 ... outer surface [K], (n, L + 1)
    heat_rate: np.ndarray          #: heat rate per basis (m2, m or whole sphere) [W], (n,)
    q_conv: np.ndarray             #: convective flux at the surface [W/m2], (n,)
    q_rad: np.ndarray              #: radiative flux at the surface [W/m2], (n,)
    balance_error: np.ndarray      #: |Q_layers - Q_surface| / |Q_surface| [-], (n,)
    converged: np.ndarray          #: bool, (n,)
    iterations: int                #: sweeps used
    validity: np.ndarray = None    #: bits of the correlations' published ranges left, (n,)


def solve_walls(t_process, t_air, t_low, t_high, conductance, table, present,
                tables: ConductivityTables, r_inner, outer_area, flux_for, *, max_iter: int = 100):
    """Solve the surface temperature and heat rate of n wall elements at once.

    Parameters
    ----------
    t_process : numpy.ndarray
        Process (hot-face) temperature [K], (n,).
    t_air : numpy.ndarray
        Air temperature [K], (n,); only for the first estimate.
    t_low, t_high : numpy.ndarray
        A bracket of the surface temperature [K]: the lowest and highest of process, air
        and surroundings temperatures, (n,).
    conductance : numpy.ndarray
        Geometric conductance factor of each layer times its conductivity multiplier
        (wet insulation), innermost first [1/m, - or m by geometry], (n, L).
    table : numpy.ndarray of int
        Index into ``tables`` of each layer's material, (n, L).
    present : numpy.ndarray of bool
        Which layer slots hold a layer, (n, L).
    tables : ConductivityTables
        The conductivity tables.
    r_inner : numpy.ndarray
        Resistance inside the first layer (inner film, metal wall) per basis [K/W], (n,).
    outer_area : numpy.ndarray
        Outer surface area per basis [m2/m2, m2/m or m2], (n,).
    flux_for : callable
        ``flux_for(rows)`` returns the surface model of the elements ``rows`` (an index
        array): ``flux(T_s) -> (q_conv, q_rad)`` [W/m2] and
        ``flux(T_s, slope=True) -> (q_conv, q_rad, dq_dT)`` [W/m2, W/m2, W/(m2 K)], as
        :func:`audit.engine.surface.surface_flux_function` builds them.  The solver asks
        again for fewer rows as elements converge.
    max_iter : int
        Most sweeps of the root finder.  An element stops when its residual is a hundredth
        of what the balance tolerance allows, or when its bracket is a few float steps wide.

    Returns
    -------
    WallSolution

    Notes
    -----
    The root finder starts from a linearised series network (conductivities at the mean of
    process and air temperature, the surface model's coefficient), then takes safeguarded
    Newton steps (module docstring), so every element converges.  Converged elements leave
    the working set, so the sweeps cost only what is left to solve.
    """
    n, n_layers = conductance.shape
    # A layer of zero thickness carries heat with no temperature drop: as good as absent.
    present = present & np.isfinite(conductance)

    def walls_of(rows):
        return _Walls(t_process[rows], conductance[rows], table[rows], present[rows],
                      r_inner[rows], outer_area[rows], tables, flux_for(rows))

    temps = np.empty((n, n_layers + 1))
    heat, q_conv, q_rad = np.empty(n), np.empty(n), np.empty(n)
    stored = np.zeros(n, bool)

    def store(at, state):
        temps[at], heat[at], q_conv[at], q_rad[at] = state
        stored[at] = True

    # Nothing to solve for an item at ambient, or for bare metal with no inner resistance.
    settled = (t_high - t_low <= _ulps(t_low, t_high)) | (~present.any(axis=1) & (r_inner == 0.0))
    root = np.where(settled, t_process, t_low).astype(float)
    rows = np.flatnonzero(~settled)
    walls = walls_of(rows)
    # f(t_low) <= 0 <= f(t_high) (module docstring): the bracket.
    low, high = t_low[rows].astype(float), t_high[rows].astype(float)
    x = _first_estimate(walls, t_air[rows])
    f_prev = None
    live = np.ones(rows.size, bool)
    iterations = 0
    for iterations in range(1, max_iter + 1):
        if not live.any():
            break
        # The bracket is closed: an element at ambient without heat flow (the simplified ISO
        # model ignores the surroundings) has its root at an end of it.
        x = np.where(np.isfinite(x) & (x >= low) & (x <= high), x, 0.5 * (low + high))
        state, df = walls.march(x, slope=True)
        f = walls.residual(*state[:2])
        root[rows] = np.where(live, x, root[rows])
        below = f < 0
        low, high = np.where(below, x, low), np.where(below, high, x)
        drop = np.maximum(np.abs(walls.t_process - x), 1e-6)
        # Done when the residual is well inside the tolerance, or down to the rounding of
        # the temperatures (an element within microkelvins of its process temperature), or
        # when the bracket is.
        finished = live & ((np.abs(f) <= np.maximum(1e-2 * BALANCE_TOLERANCE * drop,
                                                    _ulps(x, walls.t_process)))
                           | (high - low <= _ulps(low, high)) | np.isnan(f))
        store(rows[finished], tuple(part[finished] for part in state))
        live &= ~finished
        with np.errstate(invalid="ignore", divide="ignore"):
            step = x - f / df
            if f_prev is not None:
                # A step that did not halve the residual is followed by bisection.
                step = np.where(np.abs(f) > 0.5 * np.abs(f_prev), 0.5 * (low + high), step)
        f_prev = f
        x = np.where(live, step, x)
        # Gathering the working set anew costs a rebuild of the surface model: worth it
        # while the set is large, not for the few stragglers at the end.
        if live.sum() < 0.75 * rows.size and rows.size > _SMALL_SET:
            keep = live
            rows = rows[keep]
            walls = walls_of(rows)
            low, high = low[keep], high[keep]
            x, f_prev, live = x[keep], f_prev[keep], live[keep]

    # Settled elements, and any the sweeps left unfinished, at their root.
    rest = np.flatnonzero(~stored)
    if rest.size:
        store(rest, walls_of(rest).march(root[rest]))
    # Relative closure of the series balance: the marched stack needs a temperature drop
    # that misses the real one by |f|; for the heat rate that is a relative error of
    # |f| / drop (exact for constant conductivities, first order otherwise).  Drops below
    # a microkelvin (an item at ambient, a film-thin layer) are measured against 1 uK.
    miss = np.abs(temps[:, 0] + heat * r_inner - t_process)
    drop = np.maximum.reduce([np.abs(t_process - root), np.abs(temps[:, 0] + heat * r_inner - root),
                              np.full(n, 1e-6)])
    with np.errstate(invalid="ignore", divide="ignore"):
        balance = np.where(miss == 0.0, 0.0, miss / drop)
    converged = np.isfinite(balance) & (balance <= BALANCE_TOLERANCE) & np.isfinite(heat)
    return WallSolution(root, temps, heat, q_conv, q_rad, balance, converged, iterations)


def _first_estimate(walls, t_air):
    """Surface temperature of the linearised series network [K] (see Notes of solve_walls).

    Conductivities at the mean of process and air temperature, 10 W/(m2 K) at the surface
    (a typical combined coefficient) at first, then the surface model's own coefficient at
    that surface temperature: only a starting point for the root finder, but one that saves
    it about a quarter of its work.
    """
    t_mean = 0.5 * (walls.t_process + t_air)
    resistance = walls.r_inner.copy()
    for slot in walls.slots:
        if slot is not None:
            idx, tab, g = slot
            rows = slice(None) if idx is None else idx
            with np.errstate(divide="ignore", invalid="ignore"):
                resistance[rows] += 1.0 / (g * walls.tables.conductivity(tab, t_mean[rows]))
    r_surface = 1.0 / (10.0 * walls.outer_area)
    x = t_air + (walls.t_process - t_air) * r_surface / (r_surface + resistance)
    q_conv, q_rad = walls.flux(x)
    with np.errstate(divide="ignore", invalid="ignore"):
        h = (q_conv + q_rad) / (x - t_air)
        r_surface = np.where(np.isfinite(h) & (h > 0), 1.0 / (h * walls.outer_area), r_surface)
    return t_air + (walls.t_process - t_air) * r_surface / (r_surface + resistance)


class _Walls:
    """The elements still being solved, with their arrays gathered once."""

    def __init__(self, t_process, conductance, table, present, r_inner, outer_area, tables, flux):
        self.t_process, self.conductance, self.table = t_process, conductance, table
        self.present, self.r_inner, self.outer_area = present, r_inner, outer_area
        self.tables, self.flux = tables, flux
        # Per layer slot: (positions holding a layer or None for all, their tables, their G),
        # gathered once; None for a slot that no element uses.
        self.slots = []
        for j in range(present.shape[1]):
            column = present[:, j]
            if not column.any():
                self.slots.append(None)
            elif column.all():
                self.slots.append((None, table[:, j].copy(), conductance[:, j].copy()))
            else:
                idx = np.flatnonzero(column)
                self.slots.append((idx, table[idx, j], conductance[idx, j]))

    def march(self, t_surface, *, slope=False):
        """Interface temperatures, heat rate and fluxes for trial surface temperatures.

        With ``slope``, also d(T_hot_computed)/d(T_s): through each layer
        k(T_hot) dT_hot = k(T_cold) dT_cold + dQ / G, with dQ/dT_s of the surface model.
        """
        if slope:
            q_conv, q_rad, dq = self.flux(t_surface, slope=True)
            dheat = self.outer_area * dq
            d = np.ones_like(t_surface)
        else:
            q_conv, q_rad = self.flux(t_surface)
        heat = self.outer_area * (q_conv + q_rad)
        n_layers = len(self.slots)
        temps = np.empty((t_surface.size, n_layers + 1))
        temps[:, n_layers] = t_surface
        t = t_surface.copy()
        for j in range(n_layers - 1, -1, -1):
            slot = self.slots[j]
            if slot is not None:
                idx, tab, g = slot
                rows = slice(None) if idx is None else idx
                with np.errstate(invalid="ignore", divide="ignore"):
                    phi_cold, k_cold = self.tables.phi(tab, t[rows], with_conductivity=True)
                    t_hot, k_hot = self.tables.phi_inverse(tab, phi_cold + heat[rows] / g,
                                                           with_conductivity=True)
                    if slope:
                        d[rows] = (k_cold * d[rows] + dheat[rows] / g) / k_hot
                t[rows] = t_hot
            temps[:, j] = t
        if slope:
            return (temps, heat, q_conv, q_rad), d + dheat * self.r_inner
        return temps, heat, q_conv, q_rad

    def residual(self, temps, heat):
        """Computed minus actual process temperature [K], from a march's temperatures and heat."""
        f = temps[:, 0] + heat * self.r_inner - self.t_process
        # No inner temperature can deliver this heat before the extrapolated conductivity
        # reaches zero: the trial surface is too far from the air, on the side heat flows to.
        return np.where(np.isnan(temps[:, 0]) & ~np.isnan(heat),
                        np.where(heat > 0, np.inf, -np.inf), f)


def _ulps(a, b):
    """A bracket width of a few floating-point steps at these temperatures [K]."""
    return 8.0 * np.spacing(np.maximum(np.abs(a), np.abs(b)))
