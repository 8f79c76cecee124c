"""One item at a time, for people who script: :func:`solve_item`."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from audit.engine.conduction import ConductivityTables
from audit.engine.items import (HEAD_CODES, ORIENTATION_CODES, SHAPE_CODES, ItemBatch,
                                solve_items)
from audit.errors import EngineInputError


@dataclass(frozen=True)
class ItemResult:
    """Answer of :func:`solve_item`, SI units (temperatures in kelvin)."""

    surface_temp: float             #: worst part's outer surface [K]
    surface_temp_insulated: float   #: insulated part's outer surface [K] (NaN if bare)
    interface_temps: tuple          #: insulated part: hot face of layer 1 ... outer surface [K]
    heat_loss: float                #: whole item [W]; negative for a heat gain
    heat_loss_per_m: float          #: per metre of pipe run [W/m] (NaN for other shapes)
    heat_flux: float                #: at the outer surface [W/m2]
    q_conv: float                   #: convective part of heat_flux [W/m2]
    q_rad: float                    #: radiative part of heat_flux [W/m2]
    outer_area: float               #: [m2]
    convective_share: float         #: of the whole item's heat [-]
    radiative_share: float          #: of the whole item's heat [-]
    balance_error: float            #: relative closure of the surface heat balance [-]
    converged: bool
    reason: str
    warnings: tuple


def solve_item(*, temp: float, ambient: float, od: float = np.nan, shape: str = "pipe",
               length: float = 1.0, area: float = np.nan, heads: str = "ellipsoidal",
               orientation: str = "horizontal", layers: Sequence = (), emissivity: float = 0.9,
               bare_emissivity: float | None = None, wind: float = 0.0,
               surroundings: float | None = None, bare_fraction: float = 0.0,
               fitting_length: float = 0.0, wall_thickness: float = np.nan,
               wall_conductivity: float = np.nan, inner_film: float = np.nan,
               surface_model: str = "correlations", iso_ca: float = np.nan,
               iso_cb: float = np.nan) -> ItemResult:
    """Heat loss and surface temperature of one insulated item.

    Parameters
    ----------
    temp : float
        Process temperature [K].
    ambient : float
        Air temperature [K].
    od : float
        Outside diameter of the metal [m] (pipes, vessels, spheres).
    shape : str
        ``pipe``, ``vertical-vessel``, ``horizontal-vessel``, ``sphere`` or ``flat``.
    length : float
        Pipe run or vessel tangent-to-tangent length [m].
    area : float
        Area of a flat item [m2].
    heads : str
        Vessel heads: ``hemispherical``, ``ellipsoidal``, ``flat`` or ``none``.
    orientation : str
        ``horizontal`` or ``vertical``; flat items also ``up`` or ``down``.
    layers : sequence of (conductivity, thickness)
        Innermost first.  ``conductivity`` is a constant [W/(m K)] or rows of
        (temperature [K], conductivity [W/(m K)]); ``thickness`` [m].  Empty: bare metal.
        A third entry, when given, multiplies the conductivity (wet insulation) [-].
    emissivity : float
        Emissivity of the outer (jacket) surface [-].
    bare_emissivity : float, optional
        Emissivity of bare metal [-]; defaults to ``emissivity``.
    wind : float
        Wind speed [m/s].
    surroundings : float, optional
        Radiant surroundings temperature [K]; defaults to ``ambient``.
    bare_fraction : float
        Share of the surface with no insulation (damaged) [-].
    fitting_length : float
        Bare pipe equivalent of uninsulated fittings [m] (pipes only).
    wall_thickness, wall_conductivity : float
        Metal wall [m], [W/(m K)]; NaN for none.
    inner_film : float
        Inside film coefficient [W/(m2 K)]; NaN for none (hot face at process temperature).
    surface_model : str
        Outer-surface model name (:func:`audit.engine.surface.available_surface_models`).
    iso_ca, iso_cb : float
        Simplified surface constants for the ``iso12241-simplified`` model [W/(m2 K)].

    Returns
    -------
    ItemResult
    """
    for name, table in (("shape", SHAPE_CODES), ("heads", HEAD_CODES),
                        ("orientation", ORIENTATION_CODES)):
        value = locals()[name]
        if value not in table:
            raise EngineInputError(f"unknown {name} {value!r}", value=value,
                                   expected=", ".join(table))
    tables, factors, thicknesses = [], [], []
    for layer in layers:
        if len(layer) not in (2, 3):
            raise EngineInputError("a layer is (conductivity, thickness[, multiplier])", value=layer)
        tables.append(layer[0])
        thicknesses.append(layer[1])
        factors.append(layer[2] if len(layer) == 3 else 1.0)
    n_layers = max(len(tables), 1)
    conductivity = ConductivityTables(tables or [1.0], [f"layer {i + 1}" for i in range(len(tables) or 1)])

    def row(values, fill):
        out = np.full((1, n_layers), fill, dtype=float)
        out[0, :len(values)] = values
        return out

    def one(x):
        return np.array([np.nan if x is None else x], dtype=float)

    batch = ItemBatch(
        shape=np.array([SHAPE_CODES[shape]]), od=one(od), length=one(length), area=one(area),
        heads=np.array([HEAD_CODES[heads]]), orientation=np.array([ORIENTATION_CODES[orientation]]),
        t_process=one(temp), t_air=one(ambient),
        t_surroundings=one(ambient if surroundings is None else surroundings), wind=one(wind),
        emissivity=one(emissivity),
        bare_emissivity=one(emissivity if bare_emissivity is None else bare_emissivity),
        layer_table=row(range(len(tables)), -1).astype(int),
        layer_thickness=row(thicknesses, 0.0), layer_factor=row(factors, 1.0),
        bare_fraction=one(bare_fraction), fitting_length=one(fitting_length),
        wall_thickness=one(wall_thickness), wall_conductivity=one(wall_conductivity),
        inner_film=one(inner_film), iso_ca=one(iso_ca), iso_cb=one(iso_cb),
        bare_iso_ca=one(iso_ca), bare_iso_cb=one(iso_cb),
    )
    s = solve_items(batch, conductivity, surface_model=surface_model)
    interfaces = s.interface_temps[0]
    return ItemResult(
        surface_temp=float(s.surface_temp[0]),
        surface_temp_insulated=float(s.surface_temp_insulated[0]),
        interface_temps=tuple(float(t) for t in interfaces[:len(tables) + 1]) if tables else (),
        heat_loss=float(s.heat_loss[0]), heat_loss_per_m=float(s.heat_loss_per_m[0]),
        heat_flux=float(s.heat_flux[0]), q_conv=float(s.q_conv[0]), q_rad=float(s.q_rad[0]),
        outer_area=float(s.outer_area[0]), convective_share=float(s.convective_share[0]),
        radiative_share=float(s.radiative_share[0]), balance_error=float(s.balance_error[0]),
        converged=bool(s.converged[0]), reason=str(s.reason[0]),
        warnings=tuple(w for w in str(s.warnings[0]).split("; ") if w),
    )
