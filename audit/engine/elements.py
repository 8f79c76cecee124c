"""Whole items (pipes, vessels, spheres, flat surfaces) from wall elements: build, solve, sum.

An item is split into wall elements that the solver handles alike:

* a pipe: its run, a cylinder per metre (horizontal, or vertical with its run as height);
* a vessel: its shell, a cylinder per metre of tangent-to-tangent length, plus its two heads:
  hemispherical heads are the two halves of one sphere of the vessel's radius; 2:1
  ellipsoidal heads are solved as hemispheres of equal area
  (:func:`~audit.engine.geometry.equivalent_hemisphere_radius_ellipsoidal_head`); flat heads
  are plane walls (facing up and down on a vertical vessel, vertical on a horizontal one);
* a sphere: one spherical wall;
* a flat surface: a plane wall per square metre, vertical or facing up or down.

Damaged insulation splits each element into its intact share and a bare share; missing
insulation leaves only the bare share.  Uninsulated valves and flanges add bare pipe of the
same size, as an equivalent length that the caller takes from a sourced table.  Heat rates
add up over an item's elements; the item's surface temperature is that of its worst element
(the farthest from the air temperature, on the side of the process).
Equal wall elements are solved once (:mod:`audit.engine.distinct`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from audit.engine import geometry, surface
from audit.engine.batch import (ELLIPSOIDAL, FACING_DOWN, FACING_UP, FLAT, FLAT_HEADS,
                                HEMISPHERICAL, HORIZONTAL_VESSEL, PIPE, SPHERE_ITEM, VERTICAL,
                                VERTICAL_VESSEL, ItemBatch, ItemStates, rows_of)
from audit.engine.conduction import ConductivityTables
from audit.engine.distinct import WORTH_SHARING, distinct_rows, may_repeat
from audit.engine.geometry import CYLINDER, PLANE, SPHERE
from audit.engine.solver import solve_walls

# Element roles within an item.
MAIN, HEAD, FITTING = range(3)


def solve_valid_items(b: ItemBatch, reasons: np.ndarray, tables: ConductivityTables,
                      surface_model: str) -> ItemStates:
    """Solve the items of ``b`` whose ``reasons`` (from :func:`audit.engine.validation.invalid_reasons`)
    are empty: split into wall elements, solve each distinct element once, sum per item.  The
    others keep their reasons and NaN results."""
    elements = _build_elements(b, np.flatnonzero(reasons == ""))
    walls = _wall_geometry(elements)
    solution = _solve_distinct(b, elements, walls, tables, surface_model)
    return _aggregate(b, tables, elements, walls, solution, reasons, len(b),
                      surface.surface_model_separates_radiation(surface_model))


@dataclass
class _Elements:
    item: np.ndarray
    role: np.ndarray
    insulated: np.ndarray
    weight: np.ndarray          # basis units per element: m, m2 or spheres
    geometry: np.ndarray
    kind: np.ndarray            # surface kind
    r_metal: np.ndarray
    length: np.ndarray          # characteristic length for natural convection
    flow_length: np.ndarray     # length along the wind, for plates
    layer_table: np.ndarray
    layer_thickness: np.ndarray
    layer_factor: np.ndarray
    emissivity: np.ndarray
    iso_ca: np.ndarray
    iso_cb: np.ndarray


def _build_elements(b: ItemBatch, items: np.ndarray) -> _Elements:
    blocks = []
    radius = b.od / 2.0
    shape, orient = b.shape, b.orientation
    insulatable = (b.layer_table >= 0).any(axis=1)

    def add(idx, role, weight, geometry_code, kind, r_metal, length, flow_length=None):
        """Add an intact element and a bare one for each item in ``idx``, where they weigh > 0."""
        if idx.size == 0:
            return
        flow_length = length if flow_length is None else flow_length
        share_bare = np.where(insulatable[idx], b.bare_fraction[idx], 1.0)
        for insulated, share in ((True, 1.0 - share_bare), (False, share_bare)):
            w = weight * share
            keep = w > 0
            blocks.append((idx[keep], role, insulated, w[keep], geometry_code, kind[keep],
                           r_metal[keep], length[keep], flow_length[keep]))

    def kinds(value, idx):
        return np.full(idx.size, value)

    pipes = items[shape[items] == PIPE]
    vertical_pipe = orient[pipes] == VERTICAL
    add(pipes, MAIN, b.length[pipes], CYLINDER,
        np.where(vertical_pipe, surface.VERTICAL_CYLINDER, surface.HORIZONTAL_CYLINDER),
        radius[pipes], b.length[pipes])

    vessels = items[np.isin(shape[items], [VERTICAL_VESSEL, HORIZONTAL_VESSEL])]
    upright = shape[vessels] == VERTICAL_VESSEL
    add(vessels, MAIN, b.length[vessels], CYLINDER,
        np.where(upright, surface.VERTICAL_CYLINDER, surface.HORIZONTAL_CYLINDER),
        radius[vessels], b.length[vessels])
    heads = b.heads[vessels]
    domed = vessels[np.isin(heads, [HEMISPHERICAL, ELLIPSOIDAL])]
    r_head = np.where(b.heads[domed] == HEMISPHERICAL, radius[domed],
                      geometry.equivalent_hemisphere_radius_ellipsoidal_head(radius[domed]))
    add(domed, HEAD, np.ones(domed.size), SPHERE, kinds(surface.SPHERE, domed), r_head,
        2.0 * r_head)
    flat_heads = vessels[heads == FLAT_HEADS]
    disc = np.pi * radius[flat_heads] ** 2
    up_right = shape[flat_heads] == VERTICAL_VESSEL
    top, side = flat_heads[up_right], flat_heads[~up_right]
    # A disc's area over its perimeter is R/2; wind crosses its diameter.
    add(top, HEAD, disc[up_right], PLANE, kinds(surface.HORIZONTAL_PLATE_UP, top), radius[top],
        radius[top] / 2.0, 2.0 * radius[top])
    add(top, HEAD, disc[up_right], PLANE, kinds(surface.HORIZONTAL_PLATE_DOWN, top), radius[top],
        radius[top] / 2.0, 2.0 * radius[top])
    add(side, HEAD, 2.0 * disc[~up_right], PLANE, kinds(surface.VERTICAL_PLATE, side),
        radius[side], 2.0 * radius[side])

    spheres = items[shape[items] == SPHERE_ITEM]
    add(spheres, MAIN, np.ones(spheres.size), SPHERE, kinds(surface.SPHERE, spheres),
        radius[spheres], b.od[spheres])

    flats = items[shape[items] == FLAT]
    side_length = np.sqrt(b.area[flats])
    facing = orient[flats]
    flat_kind = np.select([facing == FACING_UP, facing == FACING_DOWN],
                          [surface.HORIZONTAL_PLATE_UP, surface.HORIZONTAL_PLATE_DOWN],
                          surface.VERTICAL_PLATE)
    # Height of a vertical wall and A/P of a horizontal one, taking the area as a square.
    flat_length = np.where(flat_kind == surface.VERTICAL_PLATE, side_length, side_length / 4.0)
    add(flats, MAIN, b.area[flats], PLANE, flat_kind, np.ones(flats.size), flat_length, side_length)

    fitted = pipes[b.fitting_length[pipes] > 0]
    if fitted.size:
        kind = np.where(orient[fitted] == VERTICAL, surface.VERTICAL_CYLINDER,
                        surface.HORIZONTAL_CYLINDER)
        blocks.append((fitted, FITTING, False, b.fitting_length[fitted], CYLINDER, kind,
                       radius[fitted], b.length[fitted], b.length[fitted]))

    keys = ("item", "role", "insulated", "weight", "geometry", "kind", "r_metal", "length",
            "flow_length")
    parts = {k: [] for k in keys}
    for idx, role, insulated, weight, geometry_code, kind, r_metal, length, flow in blocks:
        m = idx.size
        for key, value in zip(keys, (idx, np.full(m, role), np.full(m, insulated), weight,
                                     np.full(m, geometry_code), kind, r_metal, length, flow)):
            parts[key].append(np.asarray(value))
    cat = {k: (np.concatenate(v) if v else np.empty(0)) for k, v in parts.items()}
    item = cat["item"].astype(int)
    insulated = cat["insulated"].astype(bool)
    # Layers of each element: its item's, or none (an extra last row) for bare metal.
    layers = np.where(insulated, item, len(b))
    present = b.layer_table >= 0

    def layer_slots(values, fill):
        """Each element's row of ``values``; ``fill`` in slots without a layer."""
        rows = np.full((len(b) + 1, values.shape[1]), fill, values.dtype)
        np.copyto(rows[:-1], values, where=present)
        return rows[layers]

    return _Elements(
        item=item, role=cat["role"].astype(int), insulated=insulated, weight=cat["weight"],
        geometry=cat["geometry"].astype(int), kind=cat["kind"].astype(int),
        r_metal=cat["r_metal"], length=cat["length"], flow_length=cat["flow_length"],
        layer_table=layer_slots(b.layer_table, -1),
        layer_thickness=layer_slots(b.layer_thickness, 0.0),
        layer_factor=layer_slots(b.layer_factor, 1.0),
        emissivity=np.where(insulated, b.emissivity[item], b.bare_emissivity[item]),
        iso_ca=np.where(insulated, b.iso_ca[item], b.bare_iso_ca[item]),
        iso_cb=np.where(insulated, b.iso_cb[item], b.bare_iso_cb[item]),
    )


@dataclass
class _WallGeometry:
    present: np.ndarray       # layer slots holding a layer, (m, L)
    radii: np.ndarray         # metal face, then each layer's outer radius [m], (m, L + 1)
    conductance: np.ndarray   # geometric factor times conductivity multiplier, (m, L)
    outer_area: np.ndarray    # outer surface per basis, (m,)


def _wall_geometry(e: _Elements) -> _WallGeometry:
    b_item = e.item
    present = e.layer_table >= 0
    thickness = np.where(present, e.layer_thickness, 0.0)
    radii = e.r_metal[:, None] + np.concatenate(
        [np.zeros((b_item.size, 1)), np.cumsum(thickness, axis=1)], axis=1)
    if np.any(e.geometry == PLANE):
        # Plane walls count their "radius" from the metal face.
        radii = np.where((e.geometry == PLANE)[:, None], radii - e.r_metal[:, None], radii)
    g = np.empty(e.layer_factor.shape)
    for code in (PLANE, CYLINDER, SPHERE):
        rows = np.flatnonzero(e.geometry == code)
        g[rows] = geometry.conductance_factor(code, radii[rows, :-1], radii[rows, 1:])
    conductance = g * e.layer_factor
    r_out = radii[:, -1]
    outer_area = geometry.outer_area_factor(e.geometry, r_out)
    return _WallGeometry(present, radii, conductance, outer_area)


def _inner_resistance(b: ItemBatch, e: _Elements) -> np.ndarray:
    """Inner film plus metal wall, per basis [K/W]; zero where neither is given."""
    item = e.item
    t_wall = b.wall_thickness[item]
    k_wall = b.wall_conductivity[item]
    h_in = b.inner_film[item]
    has_wall = np.isfinite(t_wall)
    r_out = np.where(e.geometry == PLANE, 0.0, e.r_metal)
    r_in = np.where(has_wall, np.where(e.geometry == PLANE, 0.0, r_out - t_wall), r_out)
    with np.errstate(divide="ignore", invalid="ignore"):
        g_wall = geometry.conductance_factor(e.geometry, np.where(e.geometry == PLANE, 0.0, r_in),
                                             np.where(e.geometry == PLANE, t_wall, r_out))
        wall = np.where(has_wall, 1.0 / (k_wall * g_wall), 0.0)
        film_area = geometry.outer_area_factor(e.geometry, np.where(e.geometry == PLANE, 1.0, r_in))
        film = np.where(np.isfinite(h_in), 1.0 / (h_in * film_area), 0.0)
    return wall + film


def _solve_distinct(b: ItemBatch, e: _Elements, w: _WallGeometry, tables, surface_model):
    """Solve each distinct element once (see :mod:`audit.engine.distinct`) and share the answer.

    The key holds every input of the solver; lengths only where the surface models use them
    (vertical cylinders and plates: natural-convection height; plates: the wind's run).
    """
    item = e.item
    r_inner = _inner_resistance(b, e)
    if not may_repeat([b.t_process[item], w.radii[:, -1]]):
        return _solve(b, e, w, tables, surface_model, r_inner)
    uses_length = ~np.isin(e.kind, [surface.HORIZONTAL_CYLINDER, surface.SPHERE])
    plate = np.isin(e.kind, [surface.VERTICAL_PLATE, surface.HORIZONTAL_PLATE_UP,
                             surface.HORIZONTAL_PLATE_DOWN])
    key = [b.t_process[item], b.t_air[item], b.t_surroundings[item], b.wind[item], e.kind,
           e.emissivity, e.iso_ca, e.iso_cb, r_inner, w.outer_area, w.radii[:, -1],
           np.where(uses_length, e.length, 0.0), np.where(plate, e.flow_length, 0.0),
           *w.conductance.T, *np.where(w.present, e.layer_table, -1).T]
    first, group = distinct_rows(key)
    if first.size > WORTH_SHARING * item.size:
        return _solve(b, e, w, tables, surface_model, r_inner)
    sol = _solve(b, rows_of(e, first), rows_of(w, first), tables, surface_model, r_inner[first])
    return rows_of(sol, group)


def _solve(b: ItemBatch, e: _Elements, w: _WallGeometry, tables, surface_model, r_inner):
    item = e.item
    t_process = b.t_process[item]
    t_air = b.t_air[item]
    t_sur = b.t_surroundings[item]
    diameter = 2.0 * w.radii[:, -1]
    wind = b.wind[item]

    model = surface.surface_flux_function(
        surface_model, e.kind, diameter, e.length, wind, t_air, t_sur, e.emissivity,
        iso_ca=e.iso_ca, iso_cb=e.iso_cb, flow_length=e.flow_length)
    t_low = np.minimum(np.minimum(t_process, t_air), t_sur)
    t_high = np.maximum(np.maximum(t_process, t_air), t_sur)
    sol = solve_walls(t_process, t_air, t_low, t_high, w.conductance,
                      np.where(w.present, e.layer_table, 0), w.present, tables,
                      r_inner, w.outer_area, model.take)
    sol.validity = model.outside_validity(sol.surface_temp)
    return sol


def _aggregate(b, tables, e: _Elements, w: _WallGeometry, sol, reasons, n,
               separates_radiation: bool) -> ItemStates:
    item = e.item
    t_air = b.t_air[item]
    outer_area = w.outer_area
    n_layers = e.layer_table.shape[1]
    weight = e.weight
    heat = weight * sol.heat_rate
    heat_loss = np.bincount(item, weights=heat, minlength=n)
    area = np.bincount(item, weights=weight * outer_area, minlength=n)
    conv = np.bincount(item, weights=weight * outer_area * sol.q_conv, minlength=n)
    rad = np.bincount(item, weights=weight * outer_area * sol.q_rad, minlength=n)

    # Worst element: farthest from the air on the process side.
    side = np.sign(b.t_process - b.t_air)
    excess = (sol.surface_temp - t_air) * side[item]
    most = np.full(n, -np.inf)
    np.maximum.at(most, item, excess)
    worst = np.full(n, item.size)
    at_most = np.flatnonzero(excess == most[item])
    np.minimum.at(worst, item[at_most], at_most)
    worst[worst == item.size] = -1

    main_insulated = np.full(n, -1)
    sel = np.flatnonzero((e.role == MAIN) & e.insulated)
    main_insulated[item[sel]] = sel
    main_any = main_insulated.copy()
    sel_bare = np.flatnonzero((e.role == MAIN) & ~e.insulated)
    fill = main_any[item[sel_bare]] < 0
    main_any[item[sel_bare][fill]] = sel_bare[fill]

    def pick(values, index, fill_value=np.nan):
        out = np.full(n, fill_value, dtype=float)
        has = index >= 0
        out[has] = values[index[has]]
        return out

    interfaces = np.full((n, n_layers + 1), np.nan)
    has = main_insulated >= 0
    interfaces[has] = sol.interface_temps[main_insulated[has]]

    element_ok = sol.converged
    item_ok = np.bincount(item, weights=~element_ok, minlength=n) == 0
    balance = np.full(n, np.nan)
    np.fmax.at(balance, item, sol.balance_error)

    reason = reasons.copy()
    failed = ~item_ok & (reason == "")
    if failed.any():
        reason[failed] = _failure_reasons(np.flatnonzero(failed), e, sol, tables)
    computed = (reason == "")
    warnings = _warnings(n, e, sol, tables, w.present)

    length = np.where(b.shape == PIPE, b.length, np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        per_m = heat_loss / length
        conv_share = np.where(heat_loss != 0, conv / heat_loss, np.nan)
        rad_share = np.where(heat_loss != 0, rad / heat_loss, np.nan)
    if not separates_radiation:
        conv_share = np.full(n, np.nan)
        rad_share = np.full(n, np.nan)
    flux_main = sol.q_conv + sol.q_rad

    def mask(x):
        return np.where(computed, x, np.nan)

    return ItemStates(
        surface_temp=mask(pick(sol.surface_temp, worst)),
        surface_temp_insulated=mask(pick(sol.surface_temp, main_insulated)),
        interface_temps=np.where(computed[:, None], interfaces, np.nan),
        heat_loss=mask(heat_loss),
        heat_loss_per_m=mask(per_m),
        heat_flux=mask(pick(flux_main, main_any)),
        q_conv=mask(pick(sol.q_conv, main_any)),
        q_rad=mask(pick(sol.q_rad, main_any)),
        outer_area=mask(area),
        convective_share=mask(conv_share),
        radiative_share=mask(rad_share),
        converged=computed,
        reason=reason,
        warnings=warnings,
        balance_error=mask(balance),
    )


def _failure_reasons(items, e, sol, tables) -> list[str]:
    """Why each of ``items`` did not converge, from its unconverged elements."""
    bad = np.flatnonzero(~sol.converged & np.isin(e.item, items))
    by_item: dict[int, list[int]] = {}
    for element in bad:
        by_item.setdefault(int(e.item[element]), []).append(element)
    out = []
    for i in items:
        elements = by_item[int(i)]
        if np.isnan(sol.interface_temps[elements]).any():
            names = sorted({tables.names[t] for t in e.layer_table[elements].ravel() if t >= 0})
            out.append("conductivity of " + ", ".join(names)
                       + " extrapolates to zero or below within the item's temperature span")
        else:
            worst = np.nanmax(sol.balance_error[elements])
            out.append(f"surface heat balance did not close (relative error {worst:.1e})")
    return out


def _beyond_data_warning(name, low, high, held) -> str:
    """The note for an item with a layer of ``name`` outside its data (``low``..``high`` [K])."""
    span = f"({low - 273.15:g} to {high - 273.15:g} degC)"
    if held:
        return (f"conductivity of {name} beyond its data {span}: below it, held at the "
                f"{low - 273.15:g} degC value (an upper bound: no data there); above it, extended")
    return f"conductivity of {name} extrapolated beyond its data {span}"


def _warnings(n, e, sol, tables, present) -> np.ndarray:
    """Layers whose temperature span leaves their conductivity data, and correlations that
    ran outside their published ranges (:data:`audit.engine.surface.VALIDITY_FLAGS`)."""
    out = np.full(n, "", dtype=object)
    temps = sol.interface_temps
    outside = np.zeros(present.shape, bool)
    for j in range(present.shape[1]):
        col = present[:, j]
        if col.any():
            idx = np.flatnonzero(col)
            outside[idx, j] = tables.outside(e.layer_table[idx, j], temps[idx, j], temps[idx, j + 1])
    rows, cols = np.nonzero(outside)
    ranged = np.flatnonzero(sol.validity)
    if rows.size == 0 and ranged.size == 0:
        return out
    text = np.array([_beyond_data_warning(name, lo, hi, held)
                     for name, lo, hi, held in zip(tables.names, tables.t_min, tables.t_max,
                                                   tables.hold_below)]
                    + [surface.validity_warning(*flag) for flag in surface.VALIDITY_FLAGS],
                    dtype=object)
    # One note per (item, material) and per (item, range left), materials first: each item's
    # set of notes as a row of flags, and each distinct set joined into text once.
    flags = np.zeros((n, text.size), bool)
    flags[e.item[rows], e.layer_table[rows, cols]] = True
    bits = (sol.validity[ranged, None] >> np.arange(len(surface.VALIDITY_FLAGS))) & 1
    at, which_range = np.nonzero(bits)
    flags[e.item[ranged[at]], len(tables) + which_range] = True
    warned = np.flatnonzero(flags.any(axis=1))
    first, which = distinct_rows(_packed_words(flags[warned]))
    joined = np.array(["; ".join(text[flags[warned[i]]]) for i in first], dtype=object)
    out[warned] = joined[which]
    return out


def _packed_words(flags: np.ndarray) -> np.ndarray:
    """Rows of booleans as 64-bit words, one row per word: a key for ``distinct_rows``."""
    packed = np.packbits(flags, axis=1)
    width = -(-packed.shape[1] // 8) * 8
    padded = np.zeros((flags.shape[0], width), np.uint8)
    padded[:, :packed.shape[1]] = packed
    return padded.view(np.uint64).T
