"""Wall geometries (audit/engine/geometry.py) against their closed forms."""

import numpy as np
import pytest

from audit.engine import geometry
from audit.engine.geometry import CYLINDER, PLANE, SPHERE


def test_conductance_factors_are_the_textbook_resistances():
    # Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Table 3.3:
    # R_plane = L/(k A), R_cyl = ln(r2/r1)/(2 pi L k), R_sphere = (1/r1 - 1/r2)/(4 pi k).
    r1, r2 = 0.1, 0.15
    g = geometry.conductance_factor(np.array([PLANE, CYLINDER, SPHERE]), [0.0, r1, r1], [0.05, r2, r2])
    assert g[0] == pytest.approx(1 / 0.05)
    assert g[1] == pytest.approx(2 * np.pi / np.log(r2 / r1))
    assert g[2] == pytest.approx(4 * np.pi / (1 / r1 - 1 / r2))


def test_thin_curved_layers_tend_to_the_plane_wall():
    # As thickness/radius -> 0 the curved resistances approach the plane wall's (closed form).
    r, t = 10.0, 1e-4
    g = geometry.conductance_factor(np.array([CYLINDER, SPHERE]), [r, r], [r + t, r + t])
    assert g[0] / (2 * np.pi * r) == pytest.approx(1 / t, rel=1e-4)
    assert g[1] / (4 * np.pi * r ** 2) == pytest.approx(1 / t, rel=1e-4)


def test_zero_thickness_conducts_without_drop():
    assert np.isinf(geometry.conductance_factor(np.array([CYLINDER]), [0.05], [0.05]))[0]


def test_outer_area_factors():
    a = geometry.outer_area_factor(np.array([PLANE, CYLINDER, SPHERE]), [0.3, 0.3, 0.3])
    np.testing.assert_allclose(a, [1.0, 2 * np.pi * 0.3, 4 * np.pi * 0.09])


def test_ellipsoidal_head_area():
    # 2:1 semi-ellipsoidal head: area 1.084 D^2 (common practice figure, e.g. vessel-head
    # tables); exact value from the oblate-spheroid surface formula.
    assert geometry.ELLIPSOIDAL_HEAD_AREA_PER_D2 == pytest.approx(1.084, abs=5e-4)
    r = geometry.equivalent_hemisphere_radius_ellipsoidal_head(1.0)
    assert 2 * np.pi * r ** 2 == pytest.approx(1.084 * 4, rel=5e-4)
