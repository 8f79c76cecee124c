"""Per item, every input that makes it impossible to compute, as text.

An item the engine cannot compute comes back with these reasons and NaN results; the rest of
the batch is computed regardless.  Never raise for one bad item, never clamp silently.
"""

from __future__ import annotations

import numpy as np

from audit.engine import surface
from audit.engine.air import T_MAX as AIR_T_MAX
from audit.engine.air import T_MIN as AIR_T_MIN
from audit.engine.batch import (FLAT, HORIZONTAL_VESSEL, PIPE, SHAPE_CODES, VERTICAL_VESSEL,
                                ItemBatch, item_surfaces)
from audit.engine.conduction import ConductivityTables


def invalid_reasons(b: ItemBatch, tables: ConductivityTables, surface_model: str) -> np.ndarray:
    """Per item, every input that makes it impossible to compute, as text ("" when fine)."""
    n = len(b)
    problems: dict[int, list[str]] = {}

    def flag(mask, text):
        for i in np.flatnonzero(mask):
            problems.setdefault(int(i), []).append(text)

    def bad(x):
        return ~np.isfinite(np.asarray(x, float))

    shape = b.shape
    needs_od = shape != FLAT
    flag(~np.isin(shape, list(SHAPE_CODES.values())), "unknown shape")
    flag(needs_od & (bad(b.od) | ~(b.od > 0)), "outside diameter must be above zero")
    flag(np.isin(shape, [PIPE, VERTICAL_VESSEL, HORIZONTAL_VESSEL]) & (bad(b.length) | ~(b.length > 0)),
         "length must be above zero")
    flag((shape == FLAT) & (bad(b.area) | ~(b.area > 0)), "area must be above zero")
    for name, label in (("t_process", "process temperature"), ("t_air", "air temperature"),
                        ("t_surroundings", "surroundings temperature")):
        value = getattr(b, name)
        flag(bad(value) | ~(value > 0) | ~(value < 5000.0),
             f"{label} must be above absolute zero and below 5000 K")
    flag(bad(b.wind) | ~(b.wind >= 0), "wind speed must be zero or more")
    # Film temperatures must stay inside the air-property range of audit.engine.air.
    coldest = np.minimum(np.minimum(b.t_process, b.t_surroundings), b.t_air)
    hottest = np.maximum(np.maximum(b.t_process, b.t_surroundings), b.t_air)
    flag(((coldest + b.t_air) / 2 < AIR_T_MIN) | ((hottest + b.t_air) / 2 > AIR_T_MAX)
         | (b.t_air < AIR_T_MIN) | (b.t_air > AIR_T_MAX),
         f"temperatures leave the air-property range ({AIR_T_MIN:g} to {AIR_T_MAX:g} K at the film)")
    has_cover, bare_part = item_surfaces(b)
    flag(has_cover & (bad(b.emissivity) | ~((b.emissivity >= 0) & (b.emissivity <= 1))),
         "emissivity must be between 0 and 1")
    flag(bare_part & (bad(b.bare_emissivity) | ~((b.bare_emissivity >= 0) & (b.bare_emissivity <= 1))),
         "bare-metal emissivity must be between 0 and 1")
    present = b.layer_table >= 0
    flag((b.layer_table >= len(tables)).any(axis=1), "unknown conductivity table")
    thick = np.where(present, b.layer_thickness, 0.0)
    flag((bad(thick) | (thick < 0)).any(axis=1), "layer thickness must be zero or more")
    factor = np.where(present, b.layer_factor, 1.0)
    flag((bad(factor) | (factor <= 0)).any(axis=1), "conductivity multiplier must be above zero")
    flag(bad(b.bare_fraction) | (b.bare_fraction < 0) | (b.bare_fraction > 1),
         "bare share must be between 0 and 1")
    flag(bad(b.fitting_length) | (b.fitting_length < 0), "fitting length must be zero or more")
    flag((b.fitting_length > 0) & (shape != PIPE), "uninsulated fittings are counted on pipes only")
    wall = np.isfinite(b.wall_thickness)
    flag(wall & ~((b.wall_thickness > 0) & (b.wall_thickness < b.od / 2) & (b.wall_conductivity > 0)),
         "metal wall needs a thickness below the radius and a conductivity above zero")
    flag(np.isfinite(b.inner_film) & ~(b.inner_film > 0), "inner film coefficient must be above zero")
    if surface.get_surface_model(surface_model).name == "iso12241-simplified":
        def missing(ca, cb):
            return ~((ca > 0) & (cb > 0))
        flag(has_cover & missing(b.iso_ca, b.iso_cb),
             "the simplified ISO 12241 surface model needs the jacket's constants C_A and C_B")
        flag(bare_part & missing(b.bare_iso_ca, b.bare_iso_cb),
             "the simplified ISO 12241 surface model needs the bare metal's constants C_A and C_B")
    reasons = np.full(n, "", dtype=object)
    for i, texts in problems.items():
        reasons[i] = "; ".join(texts)
    return reasons
