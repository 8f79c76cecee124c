"""Heat flux from an outer surface to the air and surroundings, for the solver.

A surface model turns a surface temperature into a convective and a radiative
heat flux.  :func:`surface_flux_function` does once, for n surfaces of mixed
kinds, everything that does not depend on the surface temperature, and returns
a fast vectorised ``flux(T_s) -> (q_conv, q_rad)`` for the solver to call
repeatedly, with the flux's slope in T_s on request.  Fluxes are in W/m2 of
outer surface, positive when heat leaves the surface.

Surface kinds are small integer codes, so one call serves a whole register:

==========================  ====  ===========================================
kind                        code  ``length`` means
==========================  ====  ===========================================
HORIZONTAL_CYLINDER         0     (not used)
VERTICAL_CYLINDER           1     height
SPHERE                      2     (not used)
VERTICAL_PLATE              3     height
HORIZONTAL_PLATE_UP         4     area / perimeter; exposed face looks up
HORIZONTAL_PLATE_DOWN       5     area / perimeter; exposed face looks down
==========================  ====  ===========================================

Models, by name (see :func:`available_surface_models`):

``correlations``
    Published natural- and forced-convection correlations per kind
    (:mod:`audit.engine.convection`), combined by Churchill's rule, plus
    grey-body radiation to the surroundings (:mod:`audit.engine.radiation`).
``iso12241-simplified``
    The simplified total surface coefficient of ISO 12241, radiation lumped in.

Notes on ``correlations``
-------------------------
=====================  ==============================  ================================
kind                   natural convection (length)     forced convection (length)
=====================  ==============================  ================================
horizontal cylinder    Churchill & Chu cylinder (D)    Churchill & Bernstein (D)
vertical cylinder      Churchill & Chu plate (height)  Churchill & Bernstein (D)
sphere                 Churchill (D)                   Whitaker, (mu_inf/mu_s)^1/4 (D)
vertical plate         Churchill & Chu plate (height)  flat plate laminar/mixed (flow)
horizontal plate       McAdams on A/P: the rising-     flat plate laminar/mixed (flow)
                       flow law for hot-up and
                       cold-down, the other for
                       hot-down and cold-up
=====================  ==============================  ================================

* Natural convection: air properties at the film temperature (T_s + T_a)/2,
  beta = 1/T_film, Ra from |T_s - T_a|.
* Forced convection (wind > 0, assumed across cylinders and spheres and along
  plates), as each correlation was published: Churchill & Bernstein and the
  flat-plate average with air properties at the film temperature; Whitaker's
  sphere with free-stream properties and his viscosity ratio
  (mu_inf/mu_s)^(1/4), mu_s at the surface temperature (held at the ends of
  the air-property range beyond them, and flagged).  Vertical cylinders use the
  cross-flow correlation on the diameter, the wind being horizontal.
* With film properties a plate's flux can fall as its surface heats: near the
  flat plate's transition (Re = 5e5) Nu grows as Re^2.3 while Re falls with the
  film's viscosity.  Cylinders and spheres stay monotonic over the engine's
  domain; for plates, ``tests/engine/test_surface.py`` shows that over the
  domain's process temperatures the wall's heat balance keeps one root for any
  series resistance, and the solver keeps its bracket and bisection regardless.
* With no wind the forced term is left out: its Re -> 0 limits (0.3 for a
  cylinder, 2 for a sphere) are conduction limits the natural correlations
  already contain.
* Combination: h = (h_natural^3 + h_forced^3)^(1/3) on coefficients, which is
  Churchill's Nusselt-number rule when both use the same length.
* The correlations are applied also outside their published ranges (each
  registered with its correlation), e.g. at Ra below 1e4 on horizontal plates
  as a surface approaches the air temperature; ``flux.outside_validity(T_s)``
  says, per surface, which ranges a correlation carrying at least 30 % of the
  combined coefficient left (:data:`VALIDITY_FLAGS`), and the items carry it in
  their warnings.  Not flagged: vertical cylinders thinner than
  D/L >= 35/Gr_L^(1/4), where the plate law understates the loss.
"""

from __future__ import annotations

from typing import Callable, NamedTuple

import numpy as np

from audit.engine import convection as cv
from audit.engine.air import T_MAX as AIR_T_MAX
from audit.engine.air import T_MIN as AIR_T_MIN
from audit.engine.air import air_transport_tabulated, dynamic_viscosity_tabulated
from audit.engine.radiation import radiative_flux_grey_body, radiative_flux_grey_body_slope
from audit.errors import EngineInputError

HORIZONTAL_CYLINDER = 0
VERTICAL_CYLINDER = 1
SPHERE = 2
VERTICAL_PLATE = 3
HORIZONTAL_PLATE_UP = 4
HORIZONTAL_PLATE_DOWN = 5

SURFACE_KINDS = {
    HORIZONTAL_CYLINDER: "horizontal cylinder",
    VERTICAL_CYLINDER: "vertical cylinder",
    SPHERE: "sphere",
    VERTICAL_PLATE: "vertical plate",
    HORIZONTAL_PLATE_UP: "horizontal plate facing up",
    HORIZONTAL_PLATE_DOWN: "horizontal plate facing down",
}
"""Name of each surface kind code."""

GRAVITY = 9.80665
"""Standard acceleration of gravity [m/s2] (CGPM 1901, exact)."""

ISO12241_OUTSIDE_SCOPE = frozenset({SPHERE, HORIZONTAL_PLATE_UP, HORIZONTAL_PLATE_DOWN})
"""Kinds the simplified ISO 12241 coefficient does not cover; the
``iso12241-simplified`` model gives them the vertical-surface form, and callers
should flag such results."""


class SurfaceModel(NamedTuple):
    """A registered surface model."""

    name: str
    description: str
    separates_radiation: bool  #: False when q_rad is lumped into q_conv (q_rad returned as 0)
    reference: str
    build: Callable            #: the builder :func:`surface_flux_function` calls


def _rows(name, value, n):
    """``value`` as a length-n float array (scalars are broadcast)."""
    try:
        return np.broadcast_to(np.asarray(value, dtype=float), (n,))
    except ValueError:
        raise EngineInputError("surface input has the wrong length", column=name,
                               value=np.shape(value), expected=f"{n} values or one") from None


def _require(ok, name, values, expected):
    """Raise naming the first element where ``ok`` is False (NaN fails every check)."""
    if not np.all(ok):
        i = int(np.flatnonzero(~np.asarray(ok))[0])
        raise EngineInputError(f"surface input out of range at element {i}", column=name,
                               value=float(values[i]), expected=expected)


def surface_flux_function(model, kind, diameter, length, wind, air_temp, surroundings_temp,
                          emissivity, *, iso_ca=None, iso_cb=None, flow_length=None):
    """Build ``flux(T_s) -> (q_conv, q_rad)`` for n outer surfaces.

    Parameters
    ----------
    model : str
        Surface model name, one of :func:`available_surface_models`.
    kind : array_like of int
        Surface kind code per row, see the module docstring [-].  Its length
        is n; every other array has length n too (or is a scalar, broadcast).
    diameter : array_like
        Outer surface diameter of cylinders and spheres; not used for plates [m].
    length : array_like
        Height of vertical cylinders and vertical plates, area/perimeter of
        horizontal plates; not used for horizontal cylinders and spheres [m].
    wind : array_like
        Wind speed, >= 0 [m/s].
    air_temp : array_like
        Ambient air temperature [K].
    surroundings_temp : array_like
        Mean radiant temperature of the surroundings [K].
    emissivity : array_like
        Emissivity of the outer surface, 0 to 1 [-].
    iso_ca, iso_cb : array_like, optional
        Constants C_A (horizontal pipes) and C_B (vertical pipes and walls) of
        the simplified ISO 12241 coefficient per row [W/(m2 K)]; required by
        ``iso12241-simplified``, ignored by ``correlations``.
    flow_length : array_like, optional
        Plate length along the wind, used by ``correlations`` for forced
        convection over plates [m].  Defaults to ``length``, i.e. the height
        of vertical plates and A/P of horizontal ones; A/P is shorter than a
        plate's real flow length (a quarter of a square's side), which
        overstates forced convection, so pass the flow length when known.

    Returns
    -------
    callable
        ``flux(T_s)`` taking surface temperatures [K], length n (or a scalar),
        and returning ``(q_conv, q_rad)`` [W/m2], arrays of length n, positive
        for heat leaving the surface.  ``flux(T_s, slope=True)`` returns
        ``(q_conv, q_rad, dq_dT)``, the last the derivative of q_conv + q_rad in
        T_s [W/(m2 K)], exact for the model as computed (air properties and all),
        for a Newton solver.  ``flux.take(rows)`` is the same model for the
        surfaces ``rows`` (positions) only, without validating them again.
        ``flux.outside_validity(T_s)`` gives per surface the bits of
        :data:`VALIDITY_FLAGS` whose published range a correlation left [-].

    Raises
    ------
    EngineInputError
        Unknown model, wrong array lengths, an unknown kind code, or an input
        out of its range (naming the first bad element).
    """
    spec = get_surface_model(model)
    kind = np.asarray(kind)
    if kind.ndim != 1:
        raise EngineInputError("surface kind must be a one-dimensional array", column="kind",
                               value=kind.shape, expected="shape (n,)")
    _require(np.isin(kind, list(SURFACE_KINDS)), "kind", kind,
             "a surface kind code 0-5")
    n = kind.size
    kind = kind.astype(np.int64, copy=False)
    arrays = {name: _rows(name, value, n) for name, value in (
        ("diameter", diameter), ("length", length), ("wind", wind), ("air_temp", air_temp),
        ("surroundings_temp", surroundings_temp), ("emissivity", emissivity))}
    arrays["flow_length"] = arrays["length"] if flow_length is None else _rows(
        "flow_length", flow_length, n)
    for name, value in (("iso_ca", iso_ca), ("iso_cb", iso_cb)):
        arrays[name] = None if value is None else _rows(name, value, n)
    _require(np.isfinite(arrays["air_temp"]) & (arrays["air_temp"] > 0), "air_temp",
             arrays["air_temp"], "a temperature > 0 K")
    return spec.build(kind, **arrays)


# ----------------------------------------------------------------------------------------
# model "correlations"

class _Group(NamedTuple):
    """Surfaces of one kind, all in wind or all in calm air, with what the flux needs that
    does not depend on T_s."""

    rows: np.ndarray | slice   # a slice when they are all the surfaces
    natural: Callable | None   # None for horizontal plates (the heat's direction decides)
    facing_up: bool            # horizontal plates: the exposed face looks up
    g_l3: np.ndarray           # g L^3 of the natural-convection length [m4/s2]
    inv_l: np.ndarray          # 1 / natural-convection length [1/m]
    forced: Callable | None    # forced-convection correlation; None in calm air
    speed_length: np.ndarray   # wind speed times the forced-convection length [m2/s]
    inv_lf: np.ndarray         # 1 / forced-convection length [1/m]
    free: tuple | None         # spheres in wind: Re, Pr, k and mu of the free stream


_NATURAL = {
    HORIZONTAL_CYLINDER: cv.nusselt_natural_horizontal_cylinder_churchill_chu,
    VERTICAL_CYLINDER: cv.nusselt_natural_vertical_plate_churchill_chu,
    SPHERE: cv.nusselt_natural_sphere_churchill,
    VERTICAL_PLATE: cv.nusselt_natural_vertical_plate_churchill_chu,
    HORIZONTAL_PLATE_UP: None,
    HORIZONTAL_PLATE_DOWN: None,
}
_FORCED = {  # on the diameter, plates on the flow length
    HORIZONTAL_CYLINDER: cv.nusselt_forced_cylinder_churchill_bernstein,
    VERTICAL_CYLINDER: cv.nusselt_forced_cylinder_churchill_bernstein,
    SPHERE: cv.nusselt_forced_sphere_whitaker,
    VERTICAL_PLATE: cv.nusselt_forced_flat_plate_mixed_incropera,
    HORIZONTAL_PLATE_UP: cv.nusselt_forced_flat_plate_mixed_incropera,
    HORIZONTAL_PLATE_DOWN: cv.nusselt_forced_flat_plate_mixed_incropera,
}
_WHITAKER = cv.nusselt_forced_sphere_whitaker

#: A correlation's published range is checked where its own coefficient is at least this
#: share of the combined one: leaving out a smaller term changes (h_n^3 + h_f^3)^(1/3) by
#: less than 1 %, so its extrapolation cannot matter.
_MATERIAL_SHARE = 0.3

VALIDITY_FLAGS: tuple[tuple[cv.Correlation, cv.Validity], ...] = tuple(
    (c, v) for c in cv.available_correlations() for v in c.validity)
"""Bit ``i`` of :meth:`flux.outside_validity` stands for ``VALIDITY_FLAGS[i]``: a registered
correlation and one of its published ranges."""
_FLAGS = {c.function: [(v, 1 << VALIDITY_FLAGS.index((c, v))) for v in c.validity]
          for c in cv.available_correlations()}


def validity_warning(correlation: cv.Correlation, validity: cv.Validity) -> str:
    """The words an item's ``warnings`` carry when ``correlation`` left ``validity``."""
    return (f"{correlation.regime} convection, {correlation.geometry}: {correlation.reference} "
            f"used outside its published range {validity.text()} (extrapolated)")


def _rows_by_key(key):
    """(key value, rows) for each value present in ``key`` (small non-negative ints)."""
    present = np.flatnonzero(np.bincount(key))
    if present.size == 1:
        return [(int(present[0]), slice(None))]  # all rows: views, no copies
    return [(int(v), np.flatnonzero(key == v)) for v in present]


def _build_correlations(kind, *, diameter, length, wind, air_temp, surroundings_temp,
                        emissivity, flow_length, **_unused):
    _require(np.isfinite(surroundings_temp) & (surroundings_temp > 0), "surroundings_temp",
             surroundings_temp, "a temperature > 0 K")
    _require((emissivity >= 0) & (emissivity <= 1), "emissivity", emissivity, "0 to 1")
    _require(np.isfinite(wind) & (wind >= 0), "wind", wind, ">= 0 m/s")
    round_kinds = kind <= SPHERE  # horizontal and vertical cylinders, spheres
    _require(~round_kinds | (np.isfinite(diameter) & (diameter > 0)), "diameter", diameter,
             "> 0 m for cylinders and spheres")
    uses_diameter = (kind == HORIZONTAL_CYLINDER) | (kind == SPHERE)
    _require(uses_diameter | (np.isfinite(length) & (length > 0)), "length", length,
             "> 0 m for vertical cylinders and plates")
    plates = kind >= VERTICAL_PLATE
    windy = wind > 0
    _require(~(plates & windy) | (np.isfinite(flow_length) & (flow_length > 0)),
             "flow_length", flow_length, "> 0 m for plates in wind")

    natural_length = np.where(uses_diameter, diameter, length)
    forced_length = np.where(plates, flow_length, diameter)
    return _CorrelationsFlux(kind, windy, air_temp, surroundings_temp, emissivity,
                             GRAVITY * natural_length ** 3, 1.0 / natural_length,
                             wind * forced_length, 1.0 / forced_length)


def _free_stream(t_air, speed_length):
    """Whitaker's free-stream Re, Pr, k [W/(m K)] and mu [Pa s] at air temperatures ``t_air``
    [K], for spheres of wind speed times diameter ``speed_length`` [m2/s]."""
    air = air_transport_tabulated(t_air)
    return (speed_length / air.kinematic_viscosity, air.prandtl, air.conductivity,
            dynamic_viscosity_tabulated(t_air))


class _CorrelationsFlux:
    """``flux(T_s)`` of the "correlations" model for n validated surfaces (see
    :func:`surface_flux_function`)."""

    def __init__(self, kind, windy, t_air, t_sur, emissivity, g_l3, inv_l, speed_length,
                 inv_lf):
        self._surfaces = (kind, windy, t_air, t_sur, emissivity, g_l3, inv_l, speed_length,
                          inv_lf)
        self.n = kind.size
        self.t_air, self.t_sur, self.emissivity = t_air, t_sur, emissivity
        self.groups = []
        for value, rows in _rows_by_key(2 * kind.astype(np.int64) + windy):
            k, in_wind = value // 2, bool(value % 2)
            # Spheres in wind: Whitaker's Re, Pr and k are of the free stream, fixed here;
            # only mu_s follows the surface.
            free = _free_stream(t_air[rows], speed_length[rows]) if in_wind and k == SPHERE \
                else None
            self.groups.append(_Group(
                rows, _NATURAL[k], k == HORIZONTAL_PLATE_UP, g_l3[rows], inv_l[rows],
                _FORCED[k] if in_wind else None, speed_length[rows], inv_lf[rows], free))

    def take(self, rows):
        """The same model for the surfaces ``rows`` (positions) only, not validated again."""
        return _CorrelationsFlux(*(value[rows] for value in self._surfaces))

    def __call__(self, surface_temp, slope=False):
        return self._evaluate(_rows("surface_temp", surface_temp, self.n), slope, None)

    def outside_validity(self, surface_temp):
        """Per surface, the bits of :data:`VALIDITY_FLAGS` whose range a correlation left at
        ``surface_temp`` [K], counting only correlations that carry a material share of the
        coefficient and surfaces that exchange heat with the air; 0 where T_s is NaN."""
        ts = _rows("surface_temp", surface_temp, self.n)
        bits = np.zeros(self.n, np.int64)
        known = np.flatnonzero(np.isfinite(ts))
        if known.size:
            part = self if known.size == self.n else self.take(known)
            found = np.zeros(known.size, np.int64)
            part._evaluate(ts[known], False, found)
            bits[known] = found
        return bits

    def _evaluate(self, ts, slope, bits):
        """(q_conv, q_rad[, dq_dT]) at ``ts``; with ``bits`` (an int array), also set there
        the validity flags."""
        t_air = self.t_air
        dt = ts - t_air
        t_film = 0.5 * (ts + t_air)
        if slope:
            air, d_air = air_transport_tabulated(t_film, with_derivatives=True)
            # Logarithmic slopes in T_s (the film temperature moves half as fast):
            # d ln Ra/dT_s = 1/dt + p_ra, d ln Pr/dT_s = p_pr, d ln k/dT_s = p_k,
            # d ln nu/dT_s = p_nu (so d ln Re/dT_s = -p_nu).
            p_pr = 0.5 * d_air.prandtl / air.prandtl
            p_k = 0.5 * d_air.conductivity / air.conductivity
            p_nu = 0.5 * d_air.kinematic_viscosity / air.kinematic_viscosity
            p_ra = p_pr - 0.5 / t_film - 2.0 * p_nu
            growth = np.empty(self.n)
        else:
            air = air_transport_tabulated(t_film)
        k, nu, pr = air.conductivity, air.kinematic_viscosity, air.prandtl
        # Ra = g beta |dT| L^3 / (nu alpha) with beta = 1/T_film and alpha = nu / Pr.
        ra_per_gl3 = np.abs(dt) * pr / (t_film * nu * nu)
        h = np.empty(self.n)
        for g in self.groups:
            r = g.rows
            ra, pr_g = g.g_l3 * ra_per_gl3[r], pr[r]
            if g.natural is None:
                # Heat rising off the exposed face: hot facing up or cold facing down.
                rising = (dt[r] > 0) == g.facing_up
                up = cv.nusselt_natural_horizontal_plate_up_mcadams(ra, pr_g, with_slopes=slope)
                down = cv.nusselt_natural_horizontal_plate_down_mcadams(ra, pr_g,
                                                                        with_slopes=slope)
                natural = ([np.where(rising, a, b) for a, b in zip(up, down)] if slope
                           else np.where(rising, up, down))
            else:
                natural = g.natural(ra, pr_g, with_slopes=slope)
            nu_nat, s_ra, s_pr = natural if slope else (natural, None, None)
            h_g = h_natural = nu_nat * k[r] * g.inv_l
            if g.forced is not None:
                h_forced, d_ln_forced, groups = self._forced(
                    g, ts[r], k[r], nu[r], pr_g, (p_nu[r], p_pr[r], p_k[r]) if slope else None)
                # Coefficients, not Nusselt numbers: the two regimes may use different lengths.
                h_g = cv.combine_nusselt(h_natural, h_forced)
            h[r] = h_g
            if bits is not None:
                heat_flows = dt[r] != 0
                with np.errstate(invalid="ignore", divide="ignore"):
                    material_natural = heat_flows & (h_natural >= _MATERIAL_SHARE * h_g)
                    if g.natural is None:
                        self._flag(bits, r, material_natural & rising,
                                   cv.nusselt_natural_horizontal_plate_up_mcadams,
                                   {"Ra": ra, "Pr": pr_g})
                        self._flag(bits, r, material_natural & ~rising,
                                   cv.nusselt_natural_horizontal_plate_down_mcadams,
                                   {"Ra": ra, "Pr": pr_g})
                    else:
                        self._flag(bits, r, material_natural, g.natural, {"Ra": ra, "Pr": pr_g})
                    if g.forced is not None:
                        self._flag(bits, r, heat_flows & (h_forced >= _MATERIAL_SHARE * h_g),
                                   g.forced, groups)
            if slope:
                # dt d ln h/dT_s, written without 1/dt; combined,
                # d ln h = (h_n/h)^3 d ln h_n + (h_f/h)^3 d ln h_f.
                dt_g = dt[r]
                e = s_ra * (1.0 + dt_g * p_ra[r]) + dt_g * (s_pr * p_pr[r] + p_k[r])
                if g.forced is not None:
                    share_n, share_f = h_natural / h_g, h_forced / h_g
                    e = (share_n * share_n * share_n * e
                         + share_f * share_f * share_f * dt_g * d_ln_forced)
                growth[r] = e
        q_conv = h * dt
        q_rad = radiative_flux_grey_body(ts, self.t_sur, self.emissivity)
        if not slope:
            return q_conv, q_rad
        dq_dt = h * (1.0 + growth) + radiative_flux_grey_body_slope(ts, self.emissivity)
        return q_conv, q_rad, dq_dt

    @staticmethod
    def _forced(g, ts, k, nu, pr, slopes):
        """Forced-convection coefficient [W/(m2 K)] of group ``g`` at surface temperatures
        ``ts`` with film properties ``k``, ``nu``, ``pr``; its d ln h/dT_s [1/K] (None
        unless ``slopes``, the film's d ln nu, d ln Pr and d ln k per kelvin of T_s, are
        given); and the dimensionless groups its published range is about."""
        slope = slopes is not None
        if g.free is not None:
            # Whitaker: free-stream Re, Pr and k; mu_s at the surface temperature, held
            # inside the air-property range (a surface beyond it is flagged).
            re, pr_free, k_free, mu_free = g.free
            held = np.clip(ts, AIR_T_MIN, AIR_T_MAX)
            mu_s = dynamic_viscosity_tabulated(held, with_derivative=slope)
            if slope:
                mu_s, d_mu_s = mu_s
                d_mu_s = np.where(held == ts, d_mu_s, 0.0)
            ratio = mu_free / mu_s
            out = _WHITAKER(re, pr_free, ratio, with_slopes=slope)
            nu_f = out[0] if slope else out
            h_f = nu_f * k_free * g.inv_lf
            # A surface beyond the air-property range counts as outside the ratio's range.
            groups = {"Re": re, "Pr": pr_free,
                      "mu_inf/mu_s": np.where(held == ts, ratio, -np.inf)}
            if not slope:
                return h_f, None, groups
            return h_f, -out[3] * d_mu_s / mu_s, groups
        re = g.speed_length / nu
        out = g.forced(re, pr, with_slopes=slope)
        nu_f = out[0] if slope else out
        h_f = nu_f * k * g.inv_lf
        groups = {"Re": re, "Pr": pr, "Re Pr": re * pr}
        if not slope:
            return h_f, None, groups
        _, s_re, s_pr = out
        p_nu, p_pr, p_k = slopes
        return h_f, -s_re * p_nu + s_pr * p_pr + p_k, groups

    @staticmethod
    def _flag(bits, rows, where, function, groups):
        """Set in ``bits`` (at ``rows`` where ``where``) the flag of each published range of
        ``function`` that ``groups`` (quantity -> values) leave."""
        found = np.zeros(where.shape, np.int64)
        for validity, bit in _FLAGS[function]:
            found[where & validity.outside(groups[validity.quantity])] |= bit
        bits[rows] |= found


# ----------------------------------------------------------------------------------------
# model "iso12241-simplified"

ISO12241_SLOPE_HORIZONTAL = 0.05
"""Slope of the simplified coefficient for horizontal pipes [W/(m2 K2)]."""
ISO12241_SLOPE_VERTICAL = 0.09
"""Slope of the simplified coefficient for vertical pipes and walls [W/(m2 K2)]."""


def coefficient_iso12241_simplified(surface_temp, air_temp, c_a, c_b, horizontal):
    r"""Simplified total surface coefficient of ISO 12241 (convection and radiation).

    .. math::
        h = C_A + 0.05\,|\Delta T| \quad\text{(horizontal pipes)}, \qquad
        h = C_B + 0.09\,|\Delta T| \quad\text{(vertical pipes and walls)}

    with :math:`\Delta T = T_s - T_a`.

    Parameters
    ----------
    surface_temp : float or array_like
        Outer surface temperature [K].
    air_temp : float or array_like
        Ambient air temperature [K].
    c_a : float or array_like
        Constant C_A of the surface finish, for horizontal pipes [W/(m2 K)].
    c_b : float or array_like
        Constant C_B of the surface finish, for vertical pipes and walls [W/(m2 K)].
    horizontal : bool or array_like of bool
        True for horizontal pipes, False for vertical pipes and walls [-].

    Returns
    -------
    numpy.ndarray
        Total surface coefficient h [W/(m2 K)]; the heat flux is h (T_s - T_a),
        radiation included.

    Notes
    -----
    The form and the slopes 0.05 and 0.09 W/(m2 K2) are quoted from memory of
    ISO 12241:2008 (simplified calculation of the surface coefficient, for
    installations inside buildings, still air, surroundings at air
    temperature); no public text of the standard could be checked.  The
    constants C_A, C_B depend on the surface finish and come from the rules.
    The magnitude |dT| makes the coefficient the same for hot and cold
    surfaces (the standard states it for hot ones); the flux then still
    follows the sign of dT and grows monotonically with T_s.

    References
    ----------
    ISO 12241:2008. Thermal insulation for building equipment and industrial
    installations - Calculation rules. ISO, Geneva.
    """
    dt = np.abs(np.asarray(surface_temp, dtype=float) - np.asarray(air_temp, dtype=float))
    return np.where(horizontal, c_a + ISO12241_SLOPE_HORIZONTAL * dt,
                    c_b + ISO12241_SLOPE_VERTICAL * dt)


def _build_iso12241_simplified(kind, *, air_temp, iso_ca, iso_cb, **_unused):
    """Horizontal cylinders get the C_A form; every other kind the C_B form.

    Spheres and horizontal plates are outside the simplified method's scope
    (:data:`ISO12241_OUTSIDE_SCOPE`); the wall form is the nearer stand-in for
    them: large vessel heads and flat surfaces are closer to walls than to
    small horizontal pipes.
    """
    if iso_ca is None or iso_cb is None:
        raise EngineInputError(
            "the iso12241-simplified surface model needs the constants C_A and C_B",
            column="iso_ca" if iso_ca is None else "iso_cb",
            expected="iso_ca and iso_cb arrays [W/(m2 K)]")
    horizontal = kind == HORIZONTAL_CYLINDER
    _require(~horizontal | (np.isfinite(iso_ca) & (iso_ca >= 0)), "iso_ca", iso_ca,
             ">= 0 W/(m2 K) for horizontal cylinders")
    _require(horizontal | (np.isfinite(iso_cb) & (iso_cb >= 0)), "iso_cb", iso_cb,
             ">= 0 W/(m2 K) for vertical and other surfaces")
    return _Iso12241Flux(air_temp, np.where(horizontal, iso_ca, iso_cb),
                         np.where(horizontal, ISO12241_SLOPE_HORIZONTAL, ISO12241_SLOPE_VERTICAL))


class _Iso12241Flux:
    """``flux(T_s)`` of the "iso12241-simplified" model: h = c0 + c1 |dT|, radiation lumped."""

    def __init__(self, t_air, c0, c1):
        self.t_air, self.c0, self.c1 = t_air, c0, c1

    def take(self, rows):
        """The same model for the surfaces ``rows`` (positions) only, not validated again."""
        return _Iso12241Flux(self.t_air[rows], self.c0[rows], self.c1[rows])

    def __call__(self, surface_temp, slope=False):
        n = self.t_air.size
        dt = _rows("surface_temp", surface_temp, n) - self.t_air
        rise = self.c1 * np.abs(dt)
        h = self.c0 + rise
        if not slope:
            return h * dt, np.zeros(n)
        return h * dt, np.zeros(n), h + rise

    def outside_validity(self, surface_temp):
        """No published range of a correlation to leave: zeros (see the correlations model)."""
        return np.zeros(self.t_air.size, np.int64)


# ----------------------------------------------------------------------------------------
# registry

SURFACE_MODELS: dict[str, SurfaceModel] = {m.name: m for m in (
    SurfaceModel(
        "correlations",
        "natural convection per surface kind (Churchill & Chu cylinder and vertical plate, "
        "Churchill sphere, McAdams horizontal plates on A/P), forced convection in wind "
        "(Churchill & Bernstein cylinder, Whitaker sphere, flat plate laminar/mixed), "
        "combined as (h_n^3 + h_f^3)^(1/3), air properties at the film temperature (Whitaker: "
        "free stream, with (mu_inf/mu_s)^(1/4)); plus "
        "grey-body radiation to the surroundings",
        True,
        "see audit.engine.convection and audit.engine.radiation",
        _build_correlations),
    SurfaceModel(
        "iso12241-simplified",
        "total surface coefficient h = C_A + 0.05 dT (horizontal pipes) or C_B + 0.09 dT "
        "(vertical pipes, walls; also used here for spheres and horizontal plates, which "
        "the standard does not cover), radiation included, wind and surroundings ignored",
        False,
        "ISO 12241:2008, simplified surface coefficient (form quoted from memory)",
        _build_iso12241_simplified),
)}
"""Every surface model by name."""


def available_surface_models() -> tuple[SurfaceModel, ...]:
    """The registered surface models, each with its description and reference.

    Returns
    -------
    tuple of SurfaceModel
        In registration order; the first is the default.
    """
    return tuple(SURFACE_MODELS.values())


def get_surface_model(name: str) -> SurfaceModel:
    """The surface model registered under ``name``.

    Parameters
    ----------
    name : str
        One of :func:`available_surface_models`.

    Returns
    -------
    SurfaceModel

    Raises
    ------
    EngineInputError
        For an unknown name; the message lists the available ones.
    """
    try:
        return SURFACE_MODELS[name]
    except (KeyError, TypeError):
        raise EngineInputError("unknown surface model", value=name,
                               expected="one of " + ", ".join(SURFACE_MODELS)) from None


def surface_model_separates_radiation(name: str) -> bool:
    """Whether model ``name`` returns radiation separately from convection.

    Parameters
    ----------
    name : str
        Surface model name.

    Returns
    -------
    bool
        False for models that lump radiation into q_conv and return q_rad = 0.
    """
    return get_surface_model(name).separates_radiation
