"""Wall geometries: conductance factors of layers and areas of outer surfaces.

Three one-dimensional geometries cover a plant: the plane wall (flat walls, tank roofs,
flat vessel heads), the cylindrical wall (pipes, vessel shells) and the spherical wall
(storage spheres, hemispherical heads).  A layer between radii r1 < r2 with constant
conductivity k carries Q = k * G * (T1 - T2), with the conductance factor G:

=========  =====================  ======================
geometry   G                      heat rate Q is per
=========  =====================  ======================
plane      1 / (r2 - r1)          square metre of wall
cylinder   2 pi / ln(r2 / r1)     metre of length
sphere     4 pi / (1/r1 - 1/r2)   whole sphere
=========  =====================  ======================

(Incropera, F.P., DeWitt, D.P., Bergman, T.L., Lavine, A.S. (2007), Fundamentals of Heat
and Mass Transfer, 6th ed., Wiley, sections 3.1, 3.3 and 3.4, Table 3.3.)  With a
conductivity that varies with temperature the same factor multiplies the conductivity
integral (:mod:`audit.engine.conduction`).  For a plane wall "radius" is the distance from
the metal face.
"""

from __future__ import annotations

import numpy as np

PLANE = 0
CYLINDER = 1
SPHERE = 2

#: Area of a 2:1 semi-ellipsoidal head per square of its diameter.  The exact surface of
#: half an oblate spheroid with semi-axes R and R/2 (eccentricity sqrt(3)/2) is
#: pi R^2 [1 + (1 - e^2)/(2 e) ln((1 + e)/(1 - e))] = 1.0842 D^2.
ELLIPSOIDAL_HEAD_AREA_PER_D2 = (np.pi / 4.0) * (
    1.0 + (0.25 / (2.0 * np.sqrt(0.75))) * np.log((1.0 + np.sqrt(0.75)) / (1.0 - np.sqrt(0.75))))


def conductance_factor(geometry, r1, r2):
    """Geometric conductance factor G of a wall layer between ``r1`` and ``r2``.

    Parameters
    ----------
    geometry : array_like of int
        :data:`PLANE`, :data:`CYLINDER` or :data:`SPHERE`.
    r1, r2 : array_like of float
        Inner and outer radius [m] (distance from the metal face for a plane), r2 >= r1 > 0
        (r1 may be 0 for a plane).

    Returns
    -------
    numpy.ndarray
        G [1/m for a plane, - for a cylinder per metre, m for a sphere]; ``inf`` for a layer
        of zero thickness, which then carries heat with no temperature drop.

    Examples
    --------
    A 50 mm layer on a 100 mm-diameter pipe carries 2 pi / ln 2 per metre:

    >>> round(float(conductance_factor(CYLINDER, 0.05, 0.10)), 4)
    9.0647
    >>> conductance_factor([PLANE, SPHERE], [0.0, 0.5], [0.05, 0.55]).round(2)
    array([20.  , 69.12])
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        if np.ndim(geometry) == 0:
            # One geometry for all (the engine's call): its form everywhere, no masks; a zero
            # thickness divides by an exact zero.
            r1, r2 = np.broadcast_arrays(np.asarray(r1, float), np.asarray(r2, float))
            return np.where(r2 == r1, np.inf, _FORMS[_code(geometry)](r1, r2))
        geometry, r1, r2 = np.broadcast_arrays(np.asarray(geometry), np.asarray(r1, float),
                                               np.asarray(r2, float))
        g = np.full(r1.shape, np.inf)
        layer = r2 != r1
        codes = _code(geometry)
        # Each form only where it applies: the logarithm is the costly part.
        for code, form in _FORMS.items():
            at = layer & (codes == code)
            g[at] = form(r1[at], r2[at])
    return g


# The forms of the table in the module docstring; any other code counts as a sphere.
_FORMS = {PLANE: lambda r1, r2: 1.0 / (r2 - r1),
          CYLINDER: lambda r1, r2: 2.0 * np.pi / np.log(r2 / r1),
          SPHERE: lambda r1, r2: 4.0 * np.pi / (1.0 / r1 - 1.0 / r2)}


def _code(geometry):
    geometry = np.asarray(geometry)
    return np.where((geometry == PLANE) | (geometry == CYLINDER), geometry, SPHERE)[()]


def outer_area_factor(geometry, r_out):
    """Area of the outer surface per unit of heat-rate basis.

    Parameters
    ----------
    geometry : array_like of int
        :data:`PLANE`, :data:`CYLINDER` or :data:`SPHERE`.
    r_out : array_like of float
        Outer radius [m] (ignored for a plane).

    Returns
    -------
    numpy.ndarray
        1 for a plane [m2/m2], 2 pi r for a cylinder [m2/m], 4 pi r^2 for a sphere [m2].

    Examples
    --------
    >>> outer_area_factor([PLANE, CYLINDER, SPHERE], 0.1).round(4)
    array([1.    , 0.6283, 0.1257])
    """
    geometry = np.asarray(geometry)
    r_out = np.asarray(r_out, float)
    return np.select([geometry == PLANE, geometry == CYLINDER],
                     [np.ones_like(r_out), 2.0 * np.pi * r_out], 4.0 * np.pi * r_out ** 2)


def equivalent_hemisphere_radius_ellipsoidal_head(radius):
    """Radius [m] of the hemisphere whose area equals a 2:1 ellipsoidal head's.

    A 2:1 ellipsoidal head is solved as a hemispherical wall of the same metal-surface area.
    Why: the heat through a thin layer on a doubly curved surface depends first on the area
    and only second on the curvature; a 2:1 head's curvature runs from a crown radius of
    about 0.9 D to a knuckle of about 0.17 D, and a sphere of equal area sits between
    those, so the insulation's curvature correction is of the right size while the area,
    which carries most of the heat, is exact.

    Parameters
    ----------
    radius : array_like of float
        Outside radius of the vessel's metal [m].

    Returns
    -------
    float or numpy.ndarray
        Radius of the equal-area hemisphere [m].

    Examples
    --------
    >>> round(float(equivalent_hemisphere_radius_ellipsoidal_head(1.0)), 4)
    0.8307
    """
    area = ELLIPSOIDAL_HEAD_AREA_PER_D2 * (2.0 * np.asarray(radius, float)) ** 2
    return np.sqrt(area / (2.0 * np.pi))
