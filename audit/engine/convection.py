"""Published Nusselt-number correlations for the outer surfaces of plant items.

One pure, vectorised function per correlation, named
``nusselt_<regime>_<geometry>_<authors>``; natural-convection functions take the
Rayleigh and Prandtl numbers, forced-convection functions the Reynolds and
Prandtl numbers.  Inputs may be scalars, numpy arrays or anything numpy turns
into an array (a pandas Series, say); outputs are numpy arrays or numpy
scalars.  Fluid properties belong at the film temperature unless a
function says otherwise.

Every correlation is registered in :data:`CORRELATIONS`; list them with
:func:`available_correlations` and fetch one by its short name with
:func:`get_correlation`.

The correlations are used as written also outside the ranges their authors
tested (e.g. Ra below the lower limit as a surface approaches the air
temperature, where they go smoothly to their conduction limits): the validity
ranges are stated in each docstring and registered with each correlation
(:class:`Validity`), and the surface model flags the surfaces that left them.
"""

from __future__ import annotations

from decimal import Decimal
from typing import Callable, NamedTuple

import numpy as np

from audit.errors import EngineInputError

_RA_JOIN_PLATE_UP = (0.54 / 0.15) ** 12
"""Rayleigh number where 0.54 Ra^(1/4) and 0.15 Ra^(1/3) are equal, about 4.7e6."""


def _pow(base, exponent):
    """``base ** exponent`` for bases >= 0 (0 gives 0), as exp(exponent ln base): within a few
    ulps of numpy's power at a quarter of its time, which the solver's sweeps feel."""
    with np.errstate(divide="ignore"):
        return np.exp(exponent * np.log(base))


def _churchill_chu_all_ra(rayleigh, prandtl, lead, pr_ref, with_slopes):
    """[lead + 0.387 Ra^(1/6) / (1 + (pr_ref / Pr)^(9/16))^(8/27)]^2: the form Churchill & Chu
    (1975) share between the horizontal cylinder and the vertical plate."""
    ra = np.asarray(rayleigh, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    a = _pow(pr_ref / pr, 9.0 / 16.0)
    rising = 0.387 * np.sqrt(np.cbrt(ra)) / _pow(1.0 + a, 8.0 / 27.0)
    term = lead + rising
    nu = term * term
    if not with_slopes:
        return nu
    # d ln Nu = 2 d ln(term); d ln(rising) = d ln Ra / 6 + (1/6) a / (1 + a) d ln Pr.
    slope_ra = rising / (3.0 * term)
    return nu, slope_ra, slope_ra * a / (1.0 + a)


def nusselt_natural_horizontal_cylinder_churchill_chu(rayleigh, prandtl, *, with_slopes=False):
    r"""Natural convection from an isothermal horizontal cylinder (Churchill & Chu).

    .. math::
        Nu_D = \left[0.60 + \frac{0.387\,Ra_D^{1/6}}
               {\left[1 + (0.559/Pr)^{9/16}\right]^{8/27}}\right]^2

    Parameters
    ----------
    rayleigh : float or array_like
        Rayleigh number on the outer diameter, g beta |dT| D^3 / (nu alpha) [-].
    prandtl : float or array_like
        Prandtl number of the fluid [-].
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the diameter, h D / k [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Ra and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: 1e-5 <= Ra_D <= 1e12, all Prandtl numbers.  One expression for
    the laminar and turbulent ranges; tends to 0.36 as Ra -> 0.

    References
    ----------
    Churchill, S. W., Chu, H. H. S. (1975). Correlating equations for laminar
    and turbulent free convection from a horizontal cylinder. Int. J. Heat
    Mass Transfer 18(9), 1049-1053. doi:10.1016/0017-9310(75)90222-7
    """
    return _churchill_chu_all_ra(rayleigh, prandtl, 0.60, 0.559, with_slopes)


def nusselt_natural_vertical_plate_churchill_chu(rayleigh, prandtl, *, with_slopes=False):
    r"""Natural convection from an isothermal vertical plate, all-Ra form (Churchill & Chu).

    .. math::
        Nu_L = \left[0.825 + \frac{0.387\,Ra_L^{1/6}}
               {\left[1 + (0.492/Pr)^{9/16}\right]^{8/27}}\right]^2

    Parameters
    ----------
    rayleigh : float or array_like
        Rayleigh number on the height L, g beta |dT| L^3 / (nu alpha) [-].
    prandtl : float or array_like
        Prandtl number of the fluid [-].
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the height, h L / k [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Ra and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: 1e-1 <= Ra_L <= 1e12, all Prandtl numbers.

    Also used for vertical cylinders with the height as L.  That is accurate
    when the boundary layer is thin against the diameter, the usual criterion
    being D / L >= 35 / Gr_L^(1/4) (Incropera et al.); thinner cylinders
    transfer more heat than this predicts.

    References
    ----------
    Churchill, S. W., Chu, H. H. S. (1975). Correlating equations for laminar
    and turbulent free convection from a vertical plate. Int. J. Heat Mass
    Transfer 18(11), 1323-1329. doi:10.1016/0017-9310(75)90243-4

    Bergman, T. L., Lavine, A. S., Incropera, F. P., DeWitt, D. P. (2011).
    Fundamentals of Heat and Mass Transfer, 7th ed., Wiley, Chapter 9
    (vertical cylinders).
    """
    return _churchill_chu_all_ra(rayleigh, prandtl, 0.825, 0.492, with_slopes)


def nusselt_natural_sphere_churchill(rayleigh, prandtl, *, with_slopes=False):
    r"""Natural convection from an isothermal sphere (Churchill).

    .. math::
        Nu_D = 2 + \frac{0.589\,Ra_D^{1/4}}{\left[1 + (0.469/Pr)^{9/16}\right]^{4/9}}
               \left\{1 + \frac{7.44\times10^{-8}\,Ra_D}
               {\left[1 + (0.469/Pr)^{9/16}\right]^{16/9}}\right\}^{1/12}

    Parameters
    ----------
    rayleigh : float or array_like
        Rayleigh number on the diameter [-].
    prandtl : float or array_like
        Prandtl number of the fluid [-].
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the diameter [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Ra and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: Ra_D <= 1e11, Pr >= 0.7 (as Bergman et al. and Nellis & Klein
    quote it; the Handbook form is said to hold to about 1e13, which the
    registered range does not assume).  Tends to the conduction limit 2 as
    Ra -> 0.

    References
    ----------
    Churchill, S. W. (1983). Free convection around immersed bodies. In
    Schlünder, E. U. (ed.), Heat Exchanger Design Handbook.
    Hemisphere, Washington.
    """
    ra = np.asarray(rayleigh, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    a = _pow(0.469 / pr, 9.0 / 16.0)
    f = 1.0 + a
    f_4_9 = _pow(f, 4.0 / 9.0)
    w = 7.44e-8 * ra / (f_4_9 * f_4_9 * f_4_9 * f_4_9)
    rising = 0.589 * np.sqrt(np.sqrt(ra)) / f_4_9 * _pow(1.0 + w, 1.0 / 12.0)
    nu = 2.0 + rising
    if not with_slopes:
        return nu
    # d ln(rising) = (1/4 + w / (12 (1 + w))) (d ln Ra + a / f d ln Pr).
    slope_ra = rising / nu * (0.25 + w / (12.0 * (1.0 + w)))
    return nu, slope_ra, slope_ra * a / f


def nusselt_natural_horizontal_plate_up_mcadams(rayleigh, prandtl, *, with_slopes=False):
    r"""Natural convection above a hot horizontal plate facing up (McAdams, Lloyd & Moran).

    Also the case of a cold plate facing down: the flow is the same, mirrored.

    .. math::
        Nu_L = \max\left(0.54\,Ra_L^{1/4},\ 0.15\,Ra_L^{1/3}\right)

    Parameters
    ----------
    rayleigh : float or array_like
        Rayleigh number on the characteristic length L = A/P (plate area over
        perimeter) [-].
    prandtl : float or array_like
        Prandtl number of the fluid [-]; not used (the correlation has no
        Prandtl dependence), accepted for a uniform signature.
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on L [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Ra and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: 0.54 Ra^(1/4) for 1e4 <= Ra_L <= 1e7 (Pr >= 0.7), 0.15 Ra^(1/3)
    for 1e7 <= Ra_L <= 1e11 (all Pr).  The published laws switch at Ra = 1e7,
    where Nu jumps by 6 %.  Here they are joined where they cross
    (Ra = (0.54/0.15)^12 = 4.7e6), i.e. the larger of the two is taken: Nu is
    then continuous, which the surface-temperature solver relies on, and it
    exceeds the published piecewise value only for 4.7e6 < Ra < 1e7, by at
    most 6.4 %.  This join is our choice, not part of the references.

    References
    ----------
    McAdams, W. H. (1954). Heat Transmission, 3rd ed., McGraw-Hill, New York.

    Lloyd, J. R., Moran, W. R. (1974). Natural convection adjacent to
    horizontal surface of various planforms. J. Heat Transfer 96(4), 443-447
    (characteristic length A/P).
    """
    ra = np.asarray(rayleigh, dtype=float)
    laminar = ra < _RA_JOIN_PLATE_UP
    nu = np.where(laminar, 0.54 * np.sqrt(np.sqrt(ra)), 0.15 * np.cbrt(ra))
    if not with_slopes:
        return nu
    return nu, np.where(laminar, 0.25, 1.0 / 3.0), np.zeros_like(nu)


def nusselt_natural_horizontal_plate_down_mcadams(rayleigh, prandtl, *, with_slopes=False):
    r"""Natural convection below a hot horizontal plate facing down (McAdams).

    Also the case of a cold plate facing up.

    .. math::
        Nu_L = 0.27\,Ra_L^{1/4}

    Parameters
    ----------
    rayleigh : float or array_like
        Rayleigh number on the characteristic length L = A/P [-].
    prandtl : float or array_like
        Prandtl number of the fluid [-]; not used, accepted for a uniform
        signature.
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on L [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Ra and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: 1e5 <= Ra_L <= 1e10, Pr >= 0.7.

    References
    ----------
    McAdams, W. H. (1954). Heat Transmission, 3rd ed., McGraw-Hill, New York.

    Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007).
    Fundamentals of Heat and Mass Transfer, 6th ed., Wiley, Chapter 9.
    """
    ra = np.asarray(rayleigh, dtype=float)
    nu = 0.27 * np.sqrt(np.sqrt(ra))
    if not with_slopes:
        return nu
    return nu, np.full_like(nu, 0.25), np.zeros_like(nu)


def nusselt_forced_cylinder_churchill_bernstein(reynolds, prandtl, *, with_slopes=False):
    r"""Forced convection from a cylinder in cross-flow (Churchill & Bernstein).

    .. math::
        Nu_D = 0.3 + \frac{0.62\,Re_D^{1/2} Pr^{1/3}}{\left[1 + (0.4/Pr)^{2/3}\right]^{1/4}}
               \left[1 + \left(\frac{Re_D}{282000}\right)^{5/8}\right]^{4/5}

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number on the outer diameter, V D / nu, nu at the film
        temperature [-].
    prandtl : float or array_like
        Prandtl number of the fluid at the film temperature [-].
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the diameter [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Re and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: Re_D Pr >= 0.2, properties at the film temperature (as the
    authors correlated them).  One expression over the whole Re range, the
    laminar, transitional and turbulent wakes included.

    References
    ----------
    Churchill, S. W., Bernstein, M. (1977). A correlating equation for forced
    convection from gases and liquids to a circular cylinder in crossflow.
    J. Heat Transfer 99(2), 300-306. doi:10.1115/1.3450685
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    # Roots instead of powers where the exponent allows: the solver calls this every sweep.
    a = np.cbrt(0.4 / pr)
    a *= a                                   # (0.4/Pr)^(2/3)
    x = re * (1.0 / 282000.0)
    root = np.sqrt(x)
    c = root * np.sqrt(np.sqrt(root))        # (Re/282000)^(5/8)
    rising = (0.62 * np.sqrt(282000.0)) * root * np.cbrt(pr) / np.sqrt(np.sqrt(1.0 + a)) * _pow(
        1.0 + c, 0.8)
    nu = 0.3 + rising
    if not with_slopes:
        return nu
    share = rising / nu
    return nu, share * (0.5 + 0.5 * c / (1.0 + c)), share * (1.0 / 3.0 + a / (6.0 * (1.0 + a)))


def nusselt_forced_sphere_whitaker(reynolds, prandtl, viscosity_ratio=1.0, *, with_slopes=False):
    r"""Forced convection from a sphere (Whitaker).

    .. math::
        Nu_D = 2 + \left(0.4\,Re_D^{1/2} + 0.06\,Re_D^{2/3}\right) Pr^{0.4}
               \left(\mu_\infty/\mu_s\right)^{1/4}

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number on the diameter, properties at the free-stream
        temperature [-].
    prandtl : float or array_like
        Prandtl number at the free-stream temperature [-].
    viscosity_ratio : float or array_like, optional
        Free-stream over surface dynamic viscosity mu_inf/mu_s [-], mu_s at the
        surface temperature.  Defaults to 1.
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the diameter [-].
    numpy.ndarray, numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Re, d ln Nu / d ln Pr and
        d ln Nu / d ln(mu_inf/mu_s) [-], exact derivatives of the formula.

    Notes
    -----
    Validity: 3.5 <= Re_D <= 7.6e4, 0.71 <= Pr <= 380, 1.0 <= mu_inf/mu_s <= 3.2;
    every property at the free-stream temperature except mu_s.  Tends to the
    conduction limit 2 as Re -> 0.  A gas heated by the sphere has
    mu_inf/mu_s < 1 (a gas's viscosity rises with temperature), outside the
    ratios the author tested.

    References
    ----------
    Whitaker, S. (1972). Forced convection heat transfer correlations for flow
    in pipes, past flat plates, single cylinders, single spheres, and for flow
    in packed beds and tube bundles. AIChE J. 18(2), 361-371.
    doi:10.1002/aic.690180219
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    ratio = np.asarray(viscosity_ratio, dtype=float)
    root, two_thirds = np.sqrt(re), np.cbrt(re) ** 2
    wake = 0.4 * root + 0.06 * two_thirds
    rising = wake * _pow(pr, 0.4) * np.sqrt(np.sqrt(ratio))
    nu = 2.0 + rising
    if not with_slopes:
        return nu
    share = rising / nu
    with np.errstate(invalid="ignore"):
        s_re = np.where(wake > 0, (0.2 * root + 0.04 * two_thirds) / wake, 0.5) * share
    return nu, s_re, 0.4 * share, 0.25 * share


_RE_TRANSITION_PLATE = 5e5
_A_MIXED_PLATE = 871.0  # 0.037 Re_c^0.8 - 0.664 Re_c^0.5 at Re_c = 5e5, rounded as published


def nusselt_forced_flat_plate_mixed_incropera(reynolds, prandtl, *, with_slopes=False):
    r"""Average forced convection over an isothermal flat plate, laminar then mixed.

    Named after the textbook (Incropera et al.) that gives the combined form.

    .. math::
        Nu_L = 0.664\,Re_L^{1/2} Pr^{1/3} \quad (Re_L \le 5\times10^5), \qquad
        Nu_L = (0.037\,Re_L^{4/5} - 871)\,Pr^{1/3} \quad (Re_L > 5\times10^5)

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number on the plate length in the flow direction, V L / nu, nu
        at the film temperature [-].
    prandtl : float or array_like
        Prandtl number of the fluid at the film temperature [-].
    with_slopes : bool, optional
        Also return the local exponents of the correlation [-] (see Returns).

    Returns
    -------
    numpy.ndarray
        Average Nusselt number on the flow length [-].
    numpy.ndarray, numpy.ndarray
        Only ``with_slopes``: d ln Nu / d ln Re and d ln Nu / d ln Pr [-], exact
        derivatives of the formula, for the slope of the heat flux in a Newton solver.

    Notes
    -----
    Validity: laminar form 0.6 <= Pr (Pohlhausen); mixed form
    5e5 < Re_L <= 1e8, 0.6 <= Pr <= 60, transition at Re_x,c = 5e5;
    properties at the film temperature.  The
    constant 871 makes the two forms meet at the transition to within 0.1 %;
    the larger of the two is taken, so Nu is continuous in Re (this changes
    the published values by less than 0.1 %, just below Re = 5e5).

    References
    ----------
    Pohlhausen, E. (1921). Der Wärmeaustausch zwischen festen Körpern und
    Flüssigkeiten mit kleiner Reibung und kleiner Wärmeleitung. Z. angew.
    Math. Mech. 1, 115-121 (laminar form).

    Bergman, T. L., Lavine, A. S., Incropera, F. P., DeWitt, D. P. (2011).
    Fundamentals of Heat and Mass Transfer, 7th ed., Wiley, Chapter 7
    (mixed boundary layer).
    """
    re = np.asarray(reynolds, dtype=float)
    cbrt_pr = np.cbrt(np.asarray(prandtl, dtype=float))
    laminar = 0.664 * np.sqrt(re)
    turbulent = 0.037 * _pow(re, 0.8)
    mixed = turbulent - _A_MIXED_PLATE
    # Above the crossing (just below Re = 5e5) the mixed form is the larger one.
    is_mixed = mixed > laminar
    nu = np.where(is_mixed, mixed, laminar) * cbrt_pr
    if not with_slopes:
        return nu
    with np.errstate(invalid="ignore", divide="ignore"):
        s_re = np.where(is_mixed, 0.8 * turbulent / mixed, 0.5)
    return nu, s_re, np.full_like(nu, 1.0 / 3.0)


def combine_nusselt(nu_natural, nu_forced, n=3.0):
    r"""Churchill's combination of natural and forced convection.

    .. math::
        Nu = \left(Nu_n^{\,n} + Nu_f^{\,n}\right)^{1/n}

    Parameters
    ----------
    nu_natural : float or array_like
        Nusselt number (or heat transfer coefficient [W/(m2 K)]) of natural
        convection alone [-].
    nu_forced : float or array_like
        Nusselt number (or coefficient, same unit) of forced convection alone [-].
    n : float, optional
        Exponent [-]; 3 for assisting and transverse flows (the default).

    Returns
    -------
    numpy.ndarray
        Combined Nusselt number (or coefficient) [-].

    Notes
    -----
    Valid for any non-negative inputs.  With different length scales for the
    two regimes, combine the heat transfer coefficients instead of the
    Nusselt numbers (the form is the same).

    References
    ----------
    Churchill, S. W. (1977). A comprehensive correlating equation for
    laminar, assisting, forced and free convection. AIChE J. 23(1), 10-16.
    """
    a = np.asarray(nu_natural, dtype=float)
    b = np.asarray(nu_forced, dtype=float)
    if n == 3.0:
        return np.cbrt(a * a * a + b * b * b)
    return (a ** n + b ** n) ** (1.0 / n)


class Validity(NamedTuple):
    """The range of one dimensionless group over which a correlation was published.

    Bounds are the authors' (or the quoting handbook's) numbers as written, as text; None
    where the correlation has no bound on that side.  A value counts as inside when it
    rounds to within a bound at the precision the bound is written to (Pr >= "0.71" admits
    0.706): the authors' own data for air sit on their bounds.
    """

    quantity: str          #: "Ra", "Re", "Pr", "Re Pr" or "mu_inf/mu_s"
    low: str | None
    high: str | None

    def outside(self, value) -> np.ndarray:
        """Where ``value`` [-] lies outside this range (NaN is never flagged)."""
        value = np.asarray(value, dtype=float)
        out = np.zeros(value.shape, bool)
        if self.low is not None:
            out |= value < float(self.low) - _half_last_digit(self.low)
        if self.high is not None:
            out |= value > float(self.high) + _half_last_digit(self.high)
        return out

    def text(self) -> str:
        """The range in words: ``3.5 <= Re <= 7.6e4``."""
        low = f"{self.low} <= " if self.low is not None else ""
        high = f" <= {self.high}" if self.high is not None else ""
        return f"{low}{self.quantity}{high}"


def _half_last_digit(bound: str) -> float:
    """Half a unit of the last digit written in ``bound`` ("0.71" -> 0.005, "1e12" -> 5e11)."""
    return 0.5 * 10.0 ** Decimal(bound).as_tuple().exponent


class Correlation(NamedTuple):
    """One registered correlation."""

    name: str
    function: Callable
    regime: str    #: "natural" or "forced"
    geometry: str
    reference: str
    validity: tuple[Validity, ...] = ()  #: the published ranges, as in the function's Notes


CORRELATIONS: dict[str, Correlation] = {c.name: c for c in (
    Correlation("horizontal-cylinder-churchill-chu",
                nusselt_natural_horizontal_cylinder_churchill_chu, "natural",
                "horizontal cylinder",
                "Churchill & Chu (1975), Int. J. Heat Mass Transfer 18, 1049",
                (Validity("Ra", "1e-5", "1e12"),)),
    Correlation("vertical-plate-churchill-chu",
                nusselt_natural_vertical_plate_churchill_chu, "natural",
                "vertical plate or vertical cylinder",
                "Churchill & Chu (1975), Int. J. Heat Mass Transfer 18, 1323",
                (Validity("Ra", "1e-1", "1e12"),)),
    Correlation("sphere-churchill", nusselt_natural_sphere_churchill, "natural", "sphere",
                "Churchill (1983), Heat Exchanger Design Handbook",
                (Validity("Ra", None, "1e11"), Validity("Pr", "0.7", None))),
    Correlation("horizontal-plate-up-mcadams", nusselt_natural_horizontal_plate_up_mcadams,
                "natural", "horizontal plate, hot facing up or cold facing down",
                "McAdams (1954); Lloyd & Moran (1974), J. Heat Transfer 96, 443",
                (Validity("Ra", "1e4", "1e11"), Validity("Pr", "0.7", None))),
    Correlation("horizontal-plate-down-mcadams", nusselt_natural_horizontal_plate_down_mcadams,
                "natural", "horizontal plate, hot facing down or cold facing up",
                "McAdams (1954)",
                (Validity("Ra", "1e5", "1e10"), Validity("Pr", "0.7", None))),
    Correlation("cylinder-crossflow-churchill-bernstein",
                nusselt_forced_cylinder_churchill_bernstein, "forced", "cylinder in cross-flow",
                "Churchill & Bernstein (1977), J. Heat Transfer 99, 300",
                (Validity("Re Pr", "0.2", None),)),
    Correlation("sphere-whitaker", nusselt_forced_sphere_whitaker, "forced", "sphere",
                "Whitaker (1972), AIChE J. 18, 361",
                (Validity("Re", "3.5", "7.6e4"), Validity("Pr", "0.71", "380"),
                 Validity("mu_inf/mu_s", "1.0", "3.2"))),
    Correlation("flat-plate-mixed", nusselt_forced_flat_plate_mixed_incropera, "forced",
                "flat plate, parallel flow",
                "Pohlhausen (1921); Bergman et al. (2011), Fundamentals of Heat and Mass "
                "Transfer 7th ed., Chapter 7",
                (Validity("Re", None, "1e8"), Validity("Pr", "0.6", "60"))),
)}
"""Every correlation of this module by its short name."""


def available_correlations() -> tuple[Correlation, ...]:
    """The registered correlations, each with its regime, geometry and reference.

    Returns
    -------
    tuple of Correlation
        In registration order.
    """
    return tuple(CORRELATIONS.values())


def get_correlation(name: str) -> Callable:
    """The correlation function registered under ``name``.

    Parameters
    ----------
    name : str
        Short name, one of :func:`available_correlations`.

    Returns
    -------
    callable
        The Nusselt-number function.

    Raises
    ------
    EngineInputError
        For an unknown name; the message lists the available ones.
    """
    try:
        return CORRELATIONS[name].function
    except (KeyError, TypeError):
        raise EngineInputError("unknown convection correlation", value=name,
                               expected="one of " + ", ".join(CORRELATIONS)) from None
