"""A batch of items as numpy arrays in SI units, and the per-item answers of the engine.

The shape, head and orientation codes; :class:`ItemBatch` (inputs) and :class:`ItemStates`
(answers); and the facts of a batch that several parts of the engine and its callers read: its
rows (:func:`take_items`) and which items have an insulated outer surface and which have bare
metal (:func:`item_surfaces`).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

# Item shapes.
PIPE, VERTICAL_VESSEL, HORIZONTAL_VESSEL, SPHERE_ITEM, FLAT = range(5)
SHAPE_CODES = {"pipe": PIPE, "vertical-vessel": VERTICAL_VESSEL,
               "horizontal-vessel": HORIZONTAL_VESSEL, "sphere": SPHERE_ITEM, "flat": FLAT}
# Vessel heads.
HEMISPHERICAL, ELLIPSOIDAL, FLAT_HEADS, NO_HEADS = range(4)
HEAD_CODES = {"hemispherical": HEMISPHERICAL, "ellipsoidal": ELLIPSOIDAL, "flat": FLAT_HEADS,
              "none": NO_HEADS}
# Orientation: pipes horizontal or vertical; flat surfaces vertical, facing up or down.
HORIZONTAL, VERTICAL, FACING_UP, FACING_DOWN = range(4)
ORIENTATION_CODES = {"horizontal": HORIZONTAL, "vertical": VERTICAL, "up": FACING_UP,
                     "down": FACING_DOWN}


@dataclass
class ItemBatch:
    """n items as numpy arrays in SI units; L is the most layers any item has.

    Layers are packed innermost first; a slot with ``layer_table < 0`` holds no layer.
    NaN in ``wall_thickness`` or ``inner_film`` means none (the hot face then sits at the
    process temperature: conservative, common practice).
    """

    shape: np.ndarray              #: item shape code (SHAPE_CODES)
    od: np.ndarray                 #: outside diameter of the metal [m]
    length: np.ndarray             #: pipe run or vessel tangent length [m]
    area: np.ndarray               #: flat surface area [m2]
    heads: np.ndarray              #: vessel head code (HEAD_CODES)
    orientation: np.ndarray        #: ORIENTATION_CODES
    t_process: np.ndarray          #: process temperature [K]
    t_air: np.ndarray              #: ambient air temperature [K]
    t_surroundings: np.ndarray     #: radiant surroundings temperature [K]
    wind: np.ndarray               #: wind speed [m/s]
    emissivity: np.ndarray         #: outer surface emissivity of the insulated part [-]
    bare_emissivity: np.ndarray    #: emissivity of the bare metal [-]
    layer_table: np.ndarray        #: conductivity-table index per layer, (n, L)
    layer_thickness: np.ndarray    #: [m], (n, L)
    layer_factor: np.ndarray       #: conductivity multiplier per layer (wet insulation) [-], (n, L)
    bare_fraction: np.ndarray      #: share of the surface without insulation [-]
    fitting_length: np.ndarray     #: bare pipe equivalent of uninsulated fittings [m]
    wall_thickness: np.ndarray = None    #: metal wall [m]
    wall_conductivity: np.ndarray = None  #: metal wall [W/(m K)]
    inner_film: np.ndarray = None  #: inside film coefficient [W/(m2 K)]
    iso_ca: np.ndarray = None      #: simplified surface constant, horizontal pipes [W/(m2 K)]
    iso_cb: np.ndarray = None      #: simplified surface constant, vertical surfaces [W/(m2 K)]
    bare_iso_ca: np.ndarray = None  #: the same for bare metal [W/(m2 K)]
    bare_iso_cb: np.ndarray = None  #: the same for bare metal [W/(m2 K)]

    def __len__(self) -> int:
        return len(self.shape)


@dataclass
class ItemStates:
    """Per-item answers of :func:`solve_items`, numpy arrays in SI units."""

    surface_temp: np.ndarray            #: worst element's outer surface [K]
    surface_temp_insulated: np.ndarray  #: the insulated main element's surface [K] (NaN if bare)
    interface_temps: np.ndarray         #: insulated main element, hot face ... surface [K], (n, L+1)
    heat_loss: np.ndarray               #: whole item incl. damage and fittings [W]
    heat_loss_per_m: np.ndarray         #: heat_loss over the run length (pipes, else NaN) [W/m]
    heat_flux: np.ndarray               #: at the main element's outer surface [W/m2]
    q_conv: np.ndarray                  #: convective part of heat_flux [W/m2]
    q_rad: np.ndarray                   #: radiative part of heat_flux [W/m2] (0 if lumped)
    outer_area: np.ndarray              #: outer surface of the whole item [m2]
    convective_share: np.ndarray        #: share of heat_loss leaving by convection [-]
    radiative_share: np.ndarray         #: share of heat_loss leaving by radiation [-]
    converged: np.ndarray               #: bool
    reason: np.ndarray                  #: why an item was not computed, else ""
    warnings: np.ndarray                #: "; "-joined warnings, else ""
    balance_error: np.ndarray = field(default=None)  #: worst element's relative heat-balance error


def take_items(batch: ItemBatch, rows: np.ndarray) -> ItemBatch:
    """The items ``rows`` of ``batch`` (positions, repeats allowed) as a batch of their own."""
    return rows_of(batch, rows)


def rows_of(arrays, rows):
    """A dataclass of per-row arrays (items, elements, answers) holding the rows ``rows``
    (positions, repeats allowed: a copy; or a slice: views); fields that are not arrays are
    kept as they are."""
    return type(arrays)(**{name: (np.asarray(value)[rows] if isinstance(value, np.ndarray | list)
                                  else value) for name, value in vars(arrays).items()})


def surfaces(covered, bare_fraction, fitting_length) -> tuple[np.ndarray, np.ndarray]:
    """Per item, whether it has an insulated outer surface, and whether it has bare metal.

    The one statement of that rule: the engine's validation and sharing key, the look-up of
    names and defaults (``audit.thermal.table_surfaces``) and the checks' bare parts all read
    it from here.

    Parameters
    ----------
    covered : array_like of bool
        The item lists at least one layer of insulation
    bare_fraction : array_like
        Share of its surface without insulation (damaged or missing) [-]
    fitting_length : array_like
        Bare pipe equivalent of its uninsulated fittings [m] (any value > 0: it has some)

    Returns
    -------
    has_cover, has_bare : numpy.ndarray of bool
        An insulated part (listed layers, not all bare); a bare part (no layers, a bare
        share, or uninsulated fittings).
    """
    covered = np.asarray(covered, bool)
    bare_fraction = np.asarray(bare_fraction, float)
    return (covered & (bare_fraction < 1),
            (bare_fraction > 0) | ~covered | (np.asarray(fitting_length, float) > 0))


def item_surfaces(batch: ItemBatch) -> tuple[np.ndarray, np.ndarray]:
    """:func:`surfaces` of the items of ``batch``."""
    return surfaces((np.asarray(batch.layer_table) >= 0).any(axis=1), batch.bare_fraction,
                    batch.fitting_length)


def complete(batch: ItemBatch) -> ItemBatch:
    """Fill the optional arrays, so the rest never tests for None."""
    n = len(batch)
    nan = np.full(n, np.nan)
    filled = {}
    for name in ("wall_thickness", "wall_conductivity", "inner_film", "iso_ca", "iso_cb",
                 "bare_iso_ca", "bare_iso_cb"):
        value = getattr(batch, name)
        filled[name] = nan if value is None else np.asarray(value, float)
    arrays = {name: np.asarray(getattr(batch, name)) for name in batch.__dataclass_fields__
              if name not in filled}
    arrays["layer_table"] = np.atleast_2d(arrays["layer_table"]).astype(int).reshape(n, -1)
    for name in ("layer_thickness", "layer_factor"):
        arrays[name] = np.asarray(arrays[name], float).reshape(n, -1)
    return ItemBatch(**arrays, **filled)
