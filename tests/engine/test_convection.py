"""Nusselt correlations against the ht package (test-only oracle) and published facts."""

import ht
import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.engine import convection as cv
from audit.errors import EngineInputError, LagauditError

# Same published formula evaluated by ht: only floating-point rounding may differ.
SAME_FORMULA = 1e-12


def grid(ra_or_re, prandtl):
    """All pairs of the two axes, flattened."""
    a, p = np.meshgrid(ra_or_re, prandtl)
    return a.ravel(), p.ravel()


def ht_natural(function, ra, pr, **kw):
    # ht takes the Grashof number; Gr = Ra / Pr.
    return np.array([function(Pr=p, Gr=r / p, **kw) for r, p in zip(ra, pr)])


def ht_forced(function, re, pr):
    return np.array([function(Re=r, Pr=p) for r, p in zip(re, pr)])


PR_AIR = [0.7, 0.71, 0.75, 0.8, 0.9, 1.0]


def test_horizontal_cylinder_matches_ht():
    # Churchill & Chu: 1e-5 <= Ra <= 1e12, any Pr.
    ra, pr = grid(np.logspace(-2, 12, 57), PR_AIR + [0.01, 7.0, 100.0])
    np.testing.assert_allclose(cv.nusselt_natural_horizontal_cylinder_churchill_chu(ra, pr),
                               ht_natural(ht.Nu_horizontal_cylinder_Churchill_Chu, ra, pr),
                               rtol=SAME_FORMULA)


def test_vertical_plate_matches_ht():
    # Churchill & Chu all-Ra form: 1e-1 <= Ra <= 1e12, any Pr.
    ra, pr = grid(np.logspace(-1, 12, 53), PR_AIR + [0.01, 7.0, 100.0])
    np.testing.assert_allclose(cv.nusselt_natural_vertical_plate_churchill_chu(ra, pr),
                               ht_natural(ht.Nu_vertical_plate_Churchill, ra, pr),
                               rtol=SAME_FORMULA)


def test_sphere_natural_matches_ht():
    # Churchill (HEDH): Pr >= 0.7, Ra up to 1e11 at least.
    ra, pr = grid(np.logspace(-2, 11, 53), PR_AIR + [7.0, 100.0])
    np.testing.assert_allclose(cv.nusselt_natural_sphere_churchill(ra, pr),
                               ht_natural(ht.Nu_sphere_Churchill, ra, pr), rtol=SAME_FORMULA)


def test_horizontal_plate_up_matches_ht_mcadams_outside_the_join():
    # McAdams hot facing up, 1e4..1e11; the piecewise published form and our
    # continuous join differ only for (0.54/0.15)^12 < Ra <= 1e7 (tested below).
    ra = np.logspace(4, 11, 71)
    ra = ra[(ra <= (0.54 / 0.15) ** 12) | (ra > 1e7)]
    ra, pr = grid(ra, PR_AIR)
    np.testing.assert_allclose(cv.nusselt_natural_horizontal_plate_up_mcadams(ra, pr),
                               ht_natural(ht.Nu_horizontal_plate_McAdams, ra, pr, buoyancy=True),
                               rtol=SAME_FORMULA)
    # Nu_free_horizontal_plate with Method='McAdams' is the same oracle by another door.
    assert float(cv.nusselt_natural_horizontal_plate_up_mcadams(1e8, 0.7)) == pytest.approx(
        ht.Nu_free_horizontal_plate(0.7, 1e8 / 0.7, buoyancy=True, Method="McAdams"),
        rel=SAME_FORMULA)


def test_horizontal_plate_up_join_is_continuous_and_bounded():
    ra = np.logspace(np.log10(4.7e6), 7, 50)
    ours = cv.nusselt_natural_horizontal_plate_up_mcadams(ra, 0.7)
    published = ht_natural(ht.Nu_horizontal_plate_McAdams, ra, np.full(ra.size, 0.7),
                           buoyancy=True)
    # The join takes the larger law, so it is >= the published value and, at Ra = 1e7
    # where the published laws switch, at most 0.15*1e7^(1/3) / (0.54*1e7^(1/4)) - 1 = 6.4 % above.
    assert np.all(ours >= published * (1 - SAME_FORMULA))
    assert np.all(ours <= published * 1.0645)
    # Continuity: both sides of the join agree to rounding.
    join = (0.54 / 0.15) ** 12
    below, above = cv.nusselt_natural_horizontal_plate_up_mcadams([join * (1 - 1e-12),
                                                                   join * (1 + 1e-12)], 0.7)
    assert above == pytest.approx(below, rel=1e-9)


def test_horizontal_plate_down_matches_ht_mcadams():
    # McAdams hot facing down: 1e5 <= Ra <= 1e10 (ht switches law above 1e10, off-range).
    ra, pr = grid(np.logspace(5, 10, 41), PR_AIR)
    np.testing.assert_allclose(cv.nusselt_natural_horizontal_plate_down_mcadams(ra, pr),
                               ht_natural(ht.Nu_horizontal_plate_McAdams, ra, pr, buoyancy=False),
                               rtol=SAME_FORMULA)


def test_cylinder_crossflow_matches_ht():
    # Churchill & Bernstein: Re Pr >= 0.2, which the whole grid satisfies.
    re, pr = grid(np.logspace(0, 6, 49), PR_AIR + [7.0, 100.0])
    np.testing.assert_allclose(cv.nusselt_forced_cylinder_churchill_bernstein(re, pr),
                               ht_forced(ht.Nu_cylinder_Churchill_Bernstein, re, pr),
                               rtol=SAME_FORMULA)


def test_cylinder_crossflow_worked_example():
    # Bergman et al., Introduction to Heat Transfer 6th ed., Example 7.3, as cited by
    # ht's docstring of Nu_cylinder_Churchill_Bernstein ("matches"; ht gives 40.637):
    # Re = 6071, Pr = 0.7 -> Nu = 40.6.
    assert float(cv.nusselt_forced_cylinder_churchill_bernstein(6071, 0.7)) == pytest.approx(
        40.6, abs=0.05)  # the textbook rounds to 3 figures


def test_sphere_whitaker_formula_structure():
    # ht has no Whitaker sphere and no textbook worked value could be verified here,
    # so this is a formula-structure check only: the published expression
    # Nu = 2 + (0.4 Re^1/2 + 0.06 Re^2/3) Pr^0.4 (mu/mu_s)^1/4 (Whitaker 1972,
    # AIChE J. 18, 361) evaluated by hand at the corners of its range.
    for re, pr, ratio in [(3.5, 0.71, 1.0), (7.6e4, 0.71, 1.0), (1e3, 380.0, 3.2),
                          (1e4, 0.7, 1.0)]:
        expected = 2 + (0.4 * re ** 0.5 + 0.06 * re ** (2 / 3)) * pr ** 0.4 * ratio ** 0.25
        assert float(cv.nusselt_forced_sphere_whitaker(re, pr, ratio)) == pytest.approx(
            expected, rel=SAME_FORMULA)
    # Conduction limit of a sphere in still fluid: Nu = 2 exactly (analytical).
    assert float(cv.nusselt_forced_sphere_whitaker(0.0, 0.7)) == 2.0
    # The viscosity ratio defaults to 1 (gases).
    assert cv.nusselt_forced_sphere_whitaker(500.0, 0.7) == cv.nusselt_forced_sphere_whitaker(
        500.0, 0.7, 1.0)


def test_flat_plate_laminar_matches_ht_baehr():
    # 0.664 Re^1/2 Pr^1/3 is ht's Baehr laminar branch for 0.05 <= Pr < 10; stay
    # below 4.9e5, clear of the join with the mixed form just under Re = 5e5.
    re, pr = grid(np.logspace(0, np.log10(4.9e5), 41), PR_AIR + [5.0])
    np.testing.assert_allclose(cv.nusselt_forced_flat_plate_mixed_incropera(re, pr),
                               ht_forced(ht.Nu_horizontal_plate_laminar_Baehr, re, pr),
                               rtol=SAME_FORMULA)


def test_flat_plate_mixed_constant_and_continuity():
    # The published constant is A = 0.037 Re_c^0.8 - 0.664 Re_c^0.5 with Re_c = 5e5
    # (Bergman et al., mixed boundary layer), rounded there to 871.
    assert 0.037 * 5e5 ** 0.8 - 0.664 * 5e5 ** 0.5 == pytest.approx(871, abs=0.5)
    below, above = cv.nusselt_forced_flat_plate_mixed_incropera(
        [5e5 * (1 - 1e-9), 5e5 * (1 + 1e-9)], 0.7)
    assert above == pytest.approx(below, rel=1e-3)  # the rounding of 871 leaves < 0.1 %
    re = np.logspace(5, 8, 301)
    nu = cv.nusselt_forced_flat_plate_mixed_incropera(re, 0.7)
    assert np.all(np.diff(nu) > 0)


def test_flat_plate_mixed_tends_to_fully_turbulent_average():
    # At Re = 1e8 the laminar leading part is negligible and the average approaches the
    # all-turbulent 0.037 Re^0.8 Pr^1/3; ht's Kreith form uses 0.036, so the two agree
    # within the 2.8 % between the constants (plus 0.04 % for the 871 offset).
    nu = float(cv.nusselt_forced_flat_plate_mixed_incropera(1e8, 0.7))
    assert nu == pytest.approx(ht.Nu_horizontal_plate_turbulent_Kreith(1e8, 0.7), rel=0.03)


def test_combine_nusselt():
    # Churchill (1977): (a^n + b^n)^(1/n); reduces to either when the other is 0.
    assert float(cv.combine_nusselt(3.0, 4.0)) == pytest.approx((27 + 64) ** (1 / 3), rel=1e-15)
    assert float(cv.combine_nusselt(3.0, 4.0, n=2)) == pytest.approx(5.0, rel=1e-15)
    assert float(cv.combine_nusselt(7.5, 0.0)) == pytest.approx(7.5, rel=1e-15)
    assert float(cv.combine_nusselt(0.0, 7.5)) == pytest.approx(7.5, rel=1e-15)


NUSSELT = st.one_of(st.just(0.0), st.floats(1e-6, 1e4))  # cubes underflow only below ~1e-100


@settings(max_examples=100, deadline=None)
@given(NUSSELT, NUSSELT)
def test_combine_nusselt_bounds(a, b):
    # The combination is never below the larger part nor above their sum.
    c = float(cv.combine_nusselt(a, b))
    assert max(a, b) * (1 - 1e-12) <= c <= (a + b) * (1 + 1e-12)


ALL = [c.function for c in cv.available_correlations()]


@pytest.mark.parametrize("function", ALL, ids=[c.name for c in cv.available_correlations()])
def test_accepts_scalars_arrays_and_series(function):
    # Same numbers whatever the container.
    x = [1e2, 1e5, 1e8]
    expected = function(np.array(x), np.array([0.71] * 3))
    scalars = [float(function(v, 0.71)) for v in x]
    series = function(pd.Series(x), pd.Series([0.71] * 3))
    np.testing.assert_allclose(scalars, expected, rtol=1e-15)
    np.testing.assert_allclose(np.asarray(series), expected, rtol=1e-15)


def test_registry_lists_every_correlation():
    names = [c.name for c in cv.available_correlations()]
    assert len(names) == len(set(names))
    # Every correlation function of the module is registered (a new one needs no count here).
    defined = {f for n, f in vars(cv).items() if n.startswith("nusselt_") and callable(f)}
    assert {c.function for c in cv.available_correlations()} == defined and len(defined) >= 8
    for c in cv.available_correlations():
        assert c.regime in ("natural", "forced")
        assert c.geometry and c.reference
        assert cv.get_correlation(c.name) is c.function
        assert c.function.__name__.startswith(f"nusselt_{c.regime}_")


def test_unknown_correlation_names_the_available_ones():
    with pytest.raises(EngineInputError) as info:
        cv.get_correlation("cylinder-hilpert")
    assert isinstance(info.value, LagauditError)
    for name in cv.CORRELATIONS:
        assert name in str(info.value)


NATURAL = [c.function for c in cv.available_correlations() if c.regime == "natural"]


@pytest.mark.parametrize("function", NATURAL,
                         ids=[c.name for c in cv.available_correlations() if c.regime == "natural"])
def test_local_exponents_are_the_derivatives_of_the_formula(function):
    # d ln Nu / d ln Ra and d ln Nu / d ln Pr against central differences of the function
    # itself, a step of 1e-5 in ln Ra or ln Pr: truncation error ~1e-10, rounding ~1e-11, so
    # 1e-7 (absolute, on exponents of order 0.1) leaves a wide margin and still catches any
    # wrong factor.  Ra runs over the whole range the solver meets, Pr over air and beyond;
    # the McAdams join at Ra = 4.7e6 is avoided (a kink, no derivative there).
    ra, pr = grid(np.logspace(-3, 13, 33) * 1.37, PR_AIR + [0.05, 7.0])
    nu, s_ra, s_pr = function(ra, pr, with_slopes=True)
    np.testing.assert_array_equal(nu, function(ra, pr))
    step = 1e-5
    d_ra = (np.log(function(ra * np.exp(step), pr)) - np.log(function(ra * np.exp(-step), pr))) / (2 * step)
    d_pr = (np.log(function(ra, pr * np.exp(step))) - np.log(function(ra, pr * np.exp(-step)))) / (2 * step)
    np.testing.assert_allclose(s_ra, d_ra, rtol=0, atol=1e-7)
    np.testing.assert_allclose(s_pr, d_pr, rtol=0, atol=1e-7)


FORCED = [c for c in cv.available_correlations() if c.regime == "forced"]


@pytest.mark.parametrize("correlation", FORCED, ids=[c.name for c in FORCED])
def test_forced_local_exponents_are_the_derivatives_of_the_formula(correlation):
    # As for the natural correlations: d ln Nu / d ln Re and d ln Nu / d ln Pr (and, for
    # Whitaker's sphere, d ln Nu / d ln(mu_inf/mu_s)) against central differences of the
    # function itself, a step of 1e-5 in the logarithm; 1e-7 absolute, as above.  Re runs
    # from 1 to 1e8, avoiding the flat plate's join just below 5e5 (a kink).
    function = correlation.function
    re, pr = grid(np.logspace(0, 8, 33) * 1.37, PR_AIR + [7.0])
    ratio = np.full(re.size, 0.8)
    args = (ratio,) if function is cv.nusselt_forced_sphere_whitaker else ()
    nu, *slopes = function(re, pr, *args, with_slopes=True)
    np.testing.assert_array_equal(nu, function(re, pr, *args))
    step = 1e-5
    inputs = [re, pr, *args]
    for position, slope in enumerate(slopes):
        up, down = list(inputs), list(inputs)
        up[position] = inputs[position] * np.exp(step)
        down[position] = inputs[position] * np.exp(-step)
        central = (np.log(function(*up)) - np.log(function(*down))) / (2 * step)
        np.testing.assert_allclose(slope, central, rtol=0, atol=1e-7)


def test_published_ranges_are_read_at_the_precision_they_are_written():
    # Whitaker (1972) writes 0.71 <= Pr: air at 20 C (Pr 0.709, CoolProp) rounds to 0.71 and is
    # inside; 0.70 is outside.  "1e12" is one significant figure: 1.4e12 rounds to it.
    whitaker = cv.CORRELATIONS["sphere-whitaker"].validity
    pr = next(v for v in whitaker if v.quantity == "Pr")
    assert list(pr.outside([0.7088, 0.70, 380.4, 381.0])) == [False, True, False, True]
    ra = cv.CORRELATIONS["horizontal-cylinder-churchill-chu"].validity[0]
    assert list(ra.outside([1.4e12, 1.6e12, 1e-5, 4e-6, np.nan])) == [False, True, False, True,
                                                                      False]
    assert pr.text() == "0.71 <= Pr <= 380"


def test_every_correlation_registers_the_ranges_of_its_docstring():
    # The registered bounds are the numbers the function's Notes state.
    for c in cv.available_correlations():
        assert c.validity, c.name
        notes = c.function.__doc__.split("Notes")[1].split("References")[0]
        for v in c.validity:
            for bound in (v.low, v.high):
                assert bound is None or bound in notes, (c.name, bound)
