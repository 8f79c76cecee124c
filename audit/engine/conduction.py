"""Conduction through layers whose conductivity varies with temperature.

Steady one-dimensional conduction through a layer with conductivity k(T) carries

    Q = G * (Phi(T_hot) - Phi(T_cold)),    Phi(T) = integral of k dT   (Kirchhoff transform)

where G is a purely geometric conductance factor (see :mod:`audit.engine.geometry`).
With k piecewise linear in T, Phi is piecewise quadratic, so both Phi and its inverse are
exact closed forms: no conductivity "at a guessed mean temperature" is needed.

Beyond a table's ends the conductivity continues linearly with the slope of the end
segment.  At the hot end this follows the usual rise of apparent conductivity with
temperature (radiation inside the insulation) and errs towards more heat loss.  Below its
first row a table may instead *hold* that row's conductivity (``hold_below``): the apparent
conductivity of an insulation falls as it gets colder (gas conduction and radiation inside
it both fall), so the held value is an upper bound there, for a material whose data stop
short of the cold service it is used on.  A caller flags every item whose layers leave
their table's data either way (see :meth:`ConductivityTables.outside`).
Where the extrapolated conductivity would reach zero, :meth:`ConductivityTables.phi_inverse`
returns NaN instead of a temperature, and the solver reports the item as not converged.

Reference: Carslaw, H.S. and Jaeger, J.C. (1959), Conduction of Heat in Solids, 2nd ed.,
Oxford, section 1.7 (the Kirchhoff transformation for temperature-dependent conductivity).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from audit.errors import EngineInputError

# Temperature span [K] that separates one table from the next in the merged breakpoint
# array; every temperature the engine accepts lies in [0, _T_SPAN).
_T_SPAN = 1.0e4


class ConductivityTables:
    """A set of piecewise-linear conductivity tables, evaluated for many layers at once.

    Parameters
    ----------
    tables : sequence of (temperatures, conductivities)
        One table per material: temperatures [K] strictly increasing, conductivities
        [W/(m K)] positive and finite.  A table of one point is a constant conductivity.
        A bare float is a constant conductivity too.  A constant is valid at every
        temperature; any other table only over its own temperature range.
    names : sequence of str, optional
        Material names, for messages.
    hold_below : sequence of bool, optional
        Per table: below its first row, hold that row's conductivity instead of continuing
        the first segment's slope.  Default: continue the slope for every table.

    Notes
    -----
    All tables are merged into one sorted breakpoint array with each table offset by a
    fixed temperature span, so one ``numpy.searchsorted`` locates the segment of every
    (layer, temperature) pair of a whole register at once.

    Examples
    --------
    One material whose conductivity rises linearly from 0.040 W/(m K) at 50 degC to
    0.055 W/(m K) at 200 degC; its integral mean over that span is the mid value:

    >>> tables = ConductivityTables([[(323.15, 0.040), (473.15, 0.055)]], names=["wool"])
    >>> round(float(tables.conductivity(0, 398.15)), 4)
    0.0475
    >>> round(float(tables.mean_conductivity(0, 323.15, 473.15)), 4)
    0.0475
    """

    def __init__(self, tables: Sequence, names: Sequence[str] | None = None,
                 hold_below: Sequence[bool] | None = None):
        self.names = list(names) if names is not None else [f"table {i}" for i in range(len(tables))]
        hold = [False] * len(tables) if hold_below is None else [bool(h) for h in hold_below]
        if len(self.names) != len(tables) or len(hold) != len(tables):
            raise EngineInputError("names, tables and hold_below differ in length",
                                   value=(len(self.names), len(tables), len(hold)))
        seg_t0, seg_k0, seg_slope, seg_phi0, seg_table = [], [], [], [], []
        first, last, t_min, t_max = [], [], [], []
        for index, (name, table) in enumerate(zip(self.names, tables)):
            temps, ks = _validated_table(name, table)
            constant = temps.size == 1
            if constant:  # one segment of zero slope
                temps = np.array([temps[0], temps[0] + 1.0])
                ks = np.array([ks[0], ks[0]])
            data_min = temps[0]
            held = hold[index] and not constant and data_min > 0.0
            if held:  # a flat segment from absolute zero up to the first row
                temps = np.concatenate(([0.0], temps))
                ks = np.concatenate(([ks[0]], ks))
            slope = np.diff(ks) / np.diff(temps)
            phi = np.concatenate(([0.0], np.cumsum(0.5 * (ks[1:] + ks[:-1]) * np.diff(temps))))
            if held:  # Phi counted from the first row of data, as for every other table
                phi -= phi[1]
            first.append(len(seg_t0))
            seg_t0.extend(temps[:-1])
            seg_k0.extend(ks[:-1])
            seg_slope.extend(slope)
            seg_phi0.extend(phi[:-1])
            seg_table.extend([index] * (temps.size - 1))
            last.append(len(seg_t0) - 1)
            t_min.append(0.0 if constant else data_min)
            t_max.append(np.inf if constant else temps[-1])
        self._t0 = np.asarray(seg_t0, float)
        self._k0 = np.asarray(seg_k0, float)
        self._slope = np.asarray(seg_slope, float)
        self._phi0 = np.asarray(seg_phi0, float)
        seg_table = np.asarray(seg_table, int)
        self._first = np.asarray(first, int)
        self._last = np.asarray(last, int)
        self.t_min = np.asarray(t_min, float)   #: first row of each table's data [K]
        self.t_max = np.asarray(t_max, float)   #: last row of each table's data [K]
        self.hold_below = np.asarray(hold, bool)
        self._t_breaks = self._t0 + seg_table * _T_SPAN
        # Potential breakpoints: offset each table by more than the potential can span
        # between 0 K and _T_SPAN, so blocks never overlap.
        reach = [np.max(np.abs(self._phi_extremes(i))) for i in range(len(tables))]
        self._phi_span = 4.0 * (max(reach, default=0.0) + 1.0)
        self._phi_breaks = self._phi0 + seg_table * self._phi_span

    def __len__(self) -> int:
        return len(self.names)

    def _phi_extremes(self, table: int) -> np.ndarray:
        """Potential at 0 K, at _T_SPAN and at any extrapolation turning point."""
        values = [float(self.phi(table, 0.0)), float(self.phi(table, np.nextafter(_T_SPAN, 0.0)))]
        for seg in (self._first[table], self._last[table]):
            if self._slope[seg] != 0.0:
                values.append(self._phi0[seg] - self._k0[seg] ** 2 / (2.0 * self._slope[seg]))
        return np.asarray(values, float).ravel()

    def _segment_by_temperature(self, table, temperature):
        # Callers mask temperatures outside [0, _T_SPAN) K, where the offset blocks would mix.
        pos = np.searchsorted(self._t_breaks, temperature + table * _T_SPAN, side="right") - 1
        return np.clip(pos, self._first[table], self._last[table])

    def conductivity(self, table, temperature):
        """Conductivity [W/(m K)] of ``table`` (int array) at ``temperature`` [K]."""
        table = np.asarray(table, int)
        temperature = np.asarray(temperature, float)
        seg = self._segment_by_temperature(table, temperature)
        k = self._k0[seg] + self._slope[seg] * (temperature - self._t0[seg])
        return np.where(_physical(temperature), k, np.nan)

    def phi(self, table, temperature, *, with_conductivity=False):
        """Conductivity integral Phi [W/m] from the table's first point to ``temperature`` [K].

        With ``with_conductivity``, also the conductivity there [W/(m K)] (same lookup).
        """
        table = np.asarray(table, int)
        temperature = np.asarray(temperature, float)
        seg = self._segment_by_temperature(table, temperature)
        x = temperature - self._t0[seg]
        slope_x = self._slope[seg] * x
        physical = _physical(temperature)
        phi = np.where(physical, self._phi0[seg] + x * (self._k0[seg] + 0.5 * slope_x), np.nan)
        if with_conductivity:
            return phi, np.where(physical, self._k0[seg] + slope_x, np.nan)
        return phi

    def phi_inverse(self, table, potential, *, with_conductivity=False):
        """Temperature [K] at which ``table`` reaches the conductivity integral ``potential`` [W/m].

        NaN where no such temperature exists because the extrapolated conductivity would
        fall to zero or below first, or where it would lie below absolute zero.  With
        ``with_conductivity``, also the conductivity at that temperature [W/(m K)], which
        the inversion yields for free.
        """
        table = np.asarray(table, int)
        potential = np.asarray(potential, float)
        pos = np.searchsorted(self._phi_breaks, potential + table * self._phi_span, side="right") - 1
        seg = np.clip(pos, self._first[table], self._last[table])
        d = potential - self._phi0[seg]
        k0 = self._k0[seg]
        disc = k0 * k0 + 2.0 * self._slope[seg] * d
        with np.errstate(invalid="ignore"):
            root = np.sqrt(disc)
        # Stable root of slope/2 x^2 + k0 x - d = 0 on the branch where k = k0 + slope x > 0.
        x = 2.0 * d / (k0 + root)
        temperature = self._t0[seg] + x
        valid = (disc > 0.0) & _physical(temperature)
        temperature = np.where(valid, temperature, np.nan)
        if with_conductivity:
            # k = k0 + slope x = sqrt(disc) on the branch the root was taken from.
            return temperature, np.where(valid, root, np.nan)
        return temperature

    def mean_conductivity(self, table, t1, t2):
        """Integral-mean conductivity [W/(m K)] between ``t1`` and ``t2`` [K]."""
        t1 = np.asarray(t1, float)
        t2 = np.asarray(t2, float)
        span = t2 - t1
        same = span == 0.0
        safe = np.where(same, 1.0, span)
        mean = (self.phi(table, t2) - self.phi(table, t1)) / safe
        return np.where(same, self.conductivity(table, t1), mean)

    def outside(self, table, t1, t2):
        """True where the span between ``t1`` and ``t2`` [K] leaves the table's data range by
        more than ``_EDGE_K`` (a face at a table's end row, solved to rounding, is inside)."""
        table = np.asarray(table, int)
        low = np.minimum(t1, t2)
        high = np.maximum(t1, t2)
        return (low < self.t_min[table] - _EDGE_K) | (high > self.t_max[table] + _EDGE_K)


#: How far [K] a layer's face may pass a table's end row before it counts as extrapolated: the
#: solver's rounding (a liquid-nitrogen line at -196 degC against a row at -196 degC), far
#: below any temperature a table is given to.
_EDGE_K = 1e-6


def _physical(temperature):
    """Temperatures the tables can be evaluated at: from absolute zero to _T_SPAN."""
    with np.errstate(invalid="ignore"):
        return (temperature >= 0.0) & (temperature < _T_SPAN)


def table_points(table):
    """The (T, k) rows of a table given as a constant or as rows of (T [K], k [W/(m K)])."""
    if np.isscalar(table):
        return [(273.15, table)]
    return [tuple(row) for row in table]


def _validated_table(name: str, table) -> tuple[np.ndarray, np.ndarray]:
    try:
        rows = np.asarray(table_points(table), dtype=float)
    except (TypeError, ValueError) as exc:
        raise EngineInputError(f"conductivity table of {name} is not numeric", value=table,
                               expected="rows of [temperature K, conductivity W/(m K)]") from exc
    if rows.ndim != 2 or rows.shape[1] != 2 or rows.shape[0] == 0:
        raise EngineInputError(f"conductivity table of {name} has no usable rows", value=table,
                               expected="rows of [temperature K, conductivity W/(m K)]")
    temps, ks = rows[:, 0], rows[:, 1]
    if not (np.all(np.isfinite(temps)) and np.all(np.isfinite(ks))):
        raise EngineInputError(f"conductivity table of {name} has a value that is not finite",
                               value=table, expected="finite numbers")
    if np.any(ks <= 0.0):
        raise EngineInputError(f"conductivity table of {name} has a conductivity <= 0",
                               value=table, expected="conductivities above zero")
    if np.any(temps < 0.0) or np.any(temps >= _T_SPAN):
        raise EngineInputError(f"conductivity table of {name} has a temperature outside "
                               f"0 to {_T_SPAN:g} K", value=table, expected="temperatures in kelvin")
    if np.any(np.diff(temps) <= 0.0):
        raise EngineInputError(f"conductivity table of {name} is not sorted by temperature",
                               value=table, expected="strictly increasing temperatures")
    return temps, ks
