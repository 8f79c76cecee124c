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
bracketed root always exists and is unique.  The root is found for every element at once
by the Illinois variant of regula falsi (Dowell, M. and Jarratt, P. (1971), "A modified
regula falsi method for computing the root of an equation", BIT 11, 168-174,
doi:10.1007/BF01934364), which keeps the bracket and converges superlinearly.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from audit.engine.conduction import ConductivityTables

#: Relative closure of the surface heat balance that counts as converged.
BALANCE_TOLERANCE = 1e-6


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


def solve_walls(t_process, t_low, t_high, conductance, table, present, tables: ConductivityTables,
                r_inner, outer_area, flux, *, max_iter: int = 100):
    """Solve the surface temperature and heat rate of n wall elements at once.

    Parameters
    ----------
    t_process : numpy.ndarray
        Process (hot-face) temperature [K], (n,).
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
    flux : callable
        ``flux(T_s) -> (q_conv, q_rad)`` [W/m2] for all n elements.
    max_iter : int
        Most sweeps of the root finder.  An element stops when its residual is a thousandth
        of what the balance tolerance allows, or when its bracket is a few float steps wide.

    Returns
    -------
    WallSolution
    """
    n, n_layers = conductance.shape
    # A layer of zero thickness carries heat with no temperature drop: as good as absent.
    present = present & np.isfinite(conductance)

    def march(t_surface):
        q_conv, q_rad = flux(t_surface)
        heat = outer_area * (q_conv + q_rad)
        temps = np.empty((n, n_layers + 1))
        temps[:, n_layers] = t_surface
        t = t_surface
        for j in range(n_layers - 1, -1, -1):
            if present[:, j].any():
                with np.errstate(invalid="ignore", divide="ignore"):
                    potential = tables.phi(table[:, j], t) + heat / conductance[:, j]
                    t = np.where(present[:, j], tables.phi_inverse(table[:, j], potential), t)
            temps[:, j] = t
        return temps, heat, q_conv, q_rad

    def residual(t_surface):
        temps, heat, _, _ = march(t_surface)
        f = temps[:, 0] + heat * r_inner - t_process
        # No inner temperature can deliver this heat before the extrapolated conductivity
        # reaches zero: the trial surface is too far from the air, on the side heat flows to.
        return np.where(np.isnan(temps[:, 0]) & ~np.isnan(heat), np.where(heat > 0, np.inf, -np.inf), f)

    a, b = t_low.astype(float), t_high.astype(float)
    fa, fb = residual(a), residual(b)
    # The surface sits exactly at the process temperature when nothing resists conduction.
    active = (b - a > _ulps(a, b)) & (fa != 0.0) & (fb != 0.0)
    root = np.where(fa == 0.0, a, b)
    iterations = 0
    for iterations in range(1, max_iter + 1):
        if not active.any():
            break
        denom = fb - fa
        with np.errstate(invalid="ignore", divide="ignore"):
            c = b - fb * (b - a) / denom
        inside = np.isfinite(c) & (c > np.minimum(a, b)) & (c < np.maximum(a, b))
        c = np.where(inside, c, 0.5 * (a + b))
        c = np.where(active, c, root)
        fc = residual(c)
        same_side = np.sign(fc) == np.sign(fb)
        # Illinois: when the same end is kept again, halve its residual so it moves next time.
        new_a = np.where(same_side, a, b)
        new_fa = np.where(same_side, 0.5 * fa, fb)
        a = np.where(active, new_a, a)
        fa = np.where(active, new_fa, fa)
        b = np.where(active, c, b)
        fb = np.where(active, fc, fb)
        root = np.where(active, c, root)
        drop = np.maximum(np.abs(t_process - c), 1e-6)
        done = ((np.abs(fc) <= 1e-3 * BALANCE_TOLERANCE * drop) | (np.abs(b - a) <= _ulps(a, b))
                | np.isnan(fc))
        active &= ~done

    temps, heat, q_conv, q_rad = march(root)
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


def _ulps(a, b):
    """A bracket width of a few floating-point steps at these temperatures [K]."""
    return 8.0 * np.spacing(np.maximum(np.abs(a), np.abs(b)))
