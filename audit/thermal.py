"""From the item table and the rules to engine arrays, and the engine's answers back to a table.

This is the one place where register names (materials, jackets, sites) meet the engine's
index arrays.  Names are looked up exactly as written (after the reader's normalisation to
lower case with hyphens): an unknown name rejects the row with a reason, never a guess.

Conditions for each item: a value on the item's own row (``ambient``, ``wind``, ``rh``,
``surroundings``, ``emissivity``) wins; else the site condition being evaluated (a check's
scenario), else the item's ``location``, else the rules' default site.  The surroundings an
item radiates to: the row's ``surroundings``; else, where the row gives its own ``ambient``,
that air temperature (the row describes a place of its own, and a site's surroundings go with
the site's air; ``warnings`` says so where the site's differ); else the site's
``surroundings``; else the air temperature.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from audit.engine import ConductivityTables, ItemBatch, solve_items
from audit.engine.batch import surfaces
from audit.engine.items import HEAD_CODES, ORIENTATION_CODES, SHAPE_CODES
from audit.pipe_sizes import NOMINAL_PIPE_SIZES
from audit.problems import Problem, append_texts, problems_of, records, words
from audit.repeats import map_values, per_distinct, tuples_of
from audit.rules import Rules

ZERO_CELSIUS = 273.15
_OD_OF_NPS = {value: mm / 1000.0 for _, value, _, mm in NOMINAL_PIPE_SIZES}


def resolve_names(table: pd.DataFrame, rules: Rules, *, notes: bool = True) -> pd.DataFrame:
    """Reject rows whose names the rules do not define, or whose condition lacks data.

    Returns a copy of ``table`` with ``status`` and ``reason`` updated, and the problems
    recorded (:func:`audit.problems.problems_of`); rows already rejected keep their reasons and
    gain any new ones.  Each distinct combination of the cells involved is judged once (a
    register repeats a few hundred of them).  With ``notes``, ``warnings`` also says where a
    row falls back on a default of the rules (an internal copy that is only solved, never
    reported, can skip that).
    """
    out = table.copy()
    count = {c: fittings_of(out, c) > 0 for c in ("valves", "flanges")}
    # A damaged share the reader could not read is its reason already, not "empty" here.
    damaged_given = (out["raw:damaged"].fillna("").astype(str).str.strip() != "").to_numpy() \
        if "raw:damaged" in out else np.zeros(len(out), bool)
    found = per_distinct(
        lambda *key: tuple(_name_problems(key, rules)),
        out["layer_materials"].to_numpy(object), out["condition"].fillna("").to_numpy(object),
        out["jacket"].fillna("").to_numpy(object), np.isfinite(out["emissivity"].to_numpy(float)),
        out["location"].fillna("").to_numpy(object), out["material"].fillna("").to_numpy(object),
        count["valves"], count["flanges"],
        np.isfinite(out["damaged_pct"].to_numpy(float)) | damaged_given, table_surfaces(out)[1])
    has = np.fromiter((len(f) > 0 for f in found), dtype=bool, count=len(found))
    rows = np.repeat(np.flatnonzero(has), [len(f) for f in found[has]])
    parts = [p for f in found[has] for p in f]
    recorded = [_recorded(out, "reject", rows, parts)]
    out.loc[has, "status"] = "rejected"
    fluid_rows, fluid_parts = _fluid_problems(out, rules)
    recorded.append(_recorded(out, "reject", fluid_rows, fluid_parts))
    out.iloc[fluid_rows, out.columns.get_loc("status")] = "rejected"
    # Imported here: audit.coldweather builds on this module.
    from audit.coldweather import input_problems
    for severity, rows, column, problem in input_problems(out, rules):
        if severity == "reject" or notes:
            recorded.append(_recorded(out, severity, rows, [(column, None, problem)] * len(rows)))
        if severity == "reject":
            out.iloc[rows, out.columns.get_loc("status")] = "rejected"
    if notes:
        recorded += _note_defaults(out, rules)
    out.attrs["problems"] = problems_of(out).plus(pd.concat(recorded, ignore_index=True))
    return out


def _recorded(out: pd.DataFrame, severity: str, rows: np.ndarray,
              parts: list[tuple]) -> pd.DataFrame:
    """Add ``(column, value, problem)`` of each of ``rows`` (positions) to its ``reason`` or
    ``warnings``, and return them as problem records."""
    texts = np.array([words(*p) for p in parts], dtype=object)
    column = "reason" if severity == "reject" else "warnings"
    target = out[column].fillna("").to_numpy(dtype=object, copy=True)
    append_texts(target, rows, texts)
    out[column] = pd.Series(target, index=out.index, dtype="str")
    field = lambda i: np.array([p[i] for p in parts], dtype=object)  # noqa: E731
    return records(out.index.to_numpy()[rows], field(0), np.array(
        [p[2].code for p in parts], dtype=object), field(1), np.array(
        [p[2].expected for p in parts], dtype=object), severity, texts)


def fluid_column(table: pd.DataFrame) -> np.ndarray:
    """Per row, the fluid it names ("" if none, or if the table has no fluid column)."""
    if "fluid" not in table:
        return np.full(len(table), "", dtype=object)
    return table["fluid"].fillna("").to_numpy(object)


def _fluid_problems(table: pd.DataFrame, rules: Rules) -> tuple[np.ndarray, list[tuple]]:
    """Rows (positions) and ``(column, value, problem)`` of each: a fluid the rules do not
    define, or a boiling liquid hotter than its boiling point (a liquid at 1 atm cannot be;
    one under pressure needs a fluid of its own)."""
    fluid = fluid_column(table)
    fluids = rules.fluids
    unknown = per_distinct(lambda name: bool(name) and name not in fluids, fluid).astype(bool)
    listing = _listing(fluids)
    found = [(i, ("fluid", fluid[i], Problem(
        "not-in-rules", "is not in the rules",
        f"one of {listing} (or add a [fluid.{fluid[i]}] to a rule file)")))
        for i in np.flatnonzero(unknown)]
    boiling = map_values(fluid, {n: f.boiling_point for n, f in fluids.items()
                                 if f.boiling_liquid}, np.nan)
    temp = table["temp_K"].to_numpy(float)
    with np.errstate(invalid="ignore"):
        hotter = np.flatnonzero(temp > boiling)
    found += [(i, ("temp", None, Problem(
        "above-boiling-point",
        f"{temp[i] - ZERO_CELSIUS:.1f} degC is above the boiling point of {fluid[i]} at 1 atm "
        f"({boiling[i] - ZERO_CELSIUS:.1f} degC), a boiling liquid of the rules",
        "its temperature at or below that, or a fluid of the rules for the liquid under "
        "pressure"))) for i in hotter]
    found.sort(key=lambda f: f[0])
    return np.array([i for i, _ in found], dtype=np.intp), [p for _, p in found]


def _name_problems(key, rules: Rules) -> list[tuple]:
    """What is wrong with one combination of a row's names and condition: ``(column, value,
    problem)`` each."""
    layers, condition, jacket, has_eps, location, metal, valves, flanges, has_damage, bare_part = key
    materials, jackets, sites, metals = rules.materials, rules.jackets, rules.sites, rules.metals
    problems = []
    names = layers if isinstance(layers, tuple) else ()
    for name in dict.fromkeys(names):
        if name not in materials:
            problems.append(("layers", None, Problem(
                "not-in-rules", f'material "{name}" is not in the rules',
                f"one of {_listing(materials)} (or add it to a rule file)")))
        elif condition == "wet" and not np.isfinite(materials[name].wet_factor):
            problems.append(("condition", None, Problem(
                "rules-missing", f'"wet" but material "{name}" has no wet_factor in the rules; '
                "add wet_factor and wet_source to it")))
    if jacket and jacket not in jackets:
        problems.append(("jacket", jacket, Problem(
            "not-in-rules", "is not in the rules",
            f"one of {_listing(jackets)}, or give an emissivity (0-1)")))
    elif names and not jacket and not has_eps and "jacket" not in rules.defaults:
        problems.append(("jacket", None, Problem(
            "empty", "empty and no emissivity on the row",
            "a jacket name or an emissivity, or [defaults] jacket in the rules")))
    if location and location not in sites:
        problems.append(("location", location, Problem(
            "not-in-rules", "is not a site condition in the rules", f"one of {_listing(sites)}")))
    if metal and metal not in metals:
        problems.append(("material", None, Problem(
            "not-in-rules", f'metal "{metal}" is not in the rules', f"one of {_listing(metals)}")))
    if bare_part and not has_eps and not metal and "metal" not in rules.defaults:
        problems.append(("material", None, Problem(
            "empty", "needed for the bare-metal emissivity",
            "a metal name, an emissivity on the row, or [defaults] metal in the rules")))
    for given, column, fitting in ((valves, "valves", "valve"), (flanges, "flanges", "flange")):
        if given and fitting not in rules.fittings:
            problems.append((column, None, Problem(
                "rules-missing", "uninsulated fittings given but the rules define no "
                f"[fitting.{fitting}] equivalent length; add one to a rule file")))
    if condition == "damaged" and not has_damage:
        problems.append(("damaged", None, Problem(
            "empty", 'empty but condition is "damaged"',
            "the share of the length without insulation, in %")))
    return problems


def _note_defaults(table: pd.DataFrame, rules: Rules) -> list[pd.DataFrame]:
    """Say in ``warnings`` where a row falls back on a default of the rules; the records."""
    insulated, bare_part = table_surfaces(table)
    no_eps = ~np.isfinite(table["emissivity"].to_numpy(float))
    notes = []
    defaults = rules.defaults
    if "jacket" in defaults:
        notes.append((insulated & (table["jacket"].fillna("") == "") & no_eps, "jacket", Problem(
            "rules-default", f'empty, "{defaults["jacket"]}" assumed (rules default)')))
    if "metal" in defaults:
        notes.append((bare_part & (table["material"].fillna("") == "") & no_eps, "material",
                      Problem("rules-default", f'empty, "{defaults["metal"]}" assumed for bare '
                              "metal (rules default)")))
    if "site" in defaults:
        notes.append((table["location"].fillna("") == "", "location", Problem(
            "rules-default", f'empty, site "{defaults["site"]}" assumed (rules default)')))
    notes.append((_own_air_hides_site_surroundings(table, rules), "surroundings", Problem(
        "own-air-surroundings", "empty; the row's own ambient is used for radiation too, not "
        "its site's surroundings (give surroundings to say otherwise)")))
    for column, fitting in (("valves", "valve"), ("flanges", "flange")):
        has = pd.Series(fittings_of(table, column) > 0, index=table.index)
        notes.append((has & (table["shape"] != "pipe"), column, Problem(
            "fittings-not-counted", "counted on pipes only; not included in this item's heat loss")))
        rule = rules.fittings.get(fitting)
        if rule is None:
            continue
        sizes = [_OD_OF_NPS.get(nps) for nps, _ in rule.equivalent_length]
        sizes = [x for x in sizes if x is not None]
        od = table["od_m"].astype(float)
        beyond = has & (table["shape"] == "pipe") & ((od < min(sizes)) | (od > max(sizes)))
        notes.append((beyond, column, Problem(
            "beyond-fitting-table", "pipe size beyond the fitting table of the rules; its "
            "nearest entry used")))
    recorded = []
    for mask, column, problem in notes:
        rows = np.flatnonzero(np.asarray(mask, dtype=bool))
        recorded.append(_recorded(table, "warning", rows, [(column, None, problem)] * len(rows)))
    return recorded


def _own_air_hides_site_surroundings(table: pd.DataFrame, rules: Rules) -> pd.Series:
    """Rows that give their own ``ambient`` but no ``surroundings`` while their own site gives
    surroundings other than its air."""
    site = table["location"].fillna("").replace("", rules.defaults.get("site", ""))
    differs = {name: np.isfinite(s.surroundings) and s.surroundings != s.ambient
               for name, s in rules.sites.items()}
    return (pd.Series(np.isfinite(_given(table, "ambient_K")), index=table.index)
            & ~np.isfinite(_given(table, "surroundings_K"))
            & site.map(lambda name: differs.get(name, False)).astype(bool))


def has_layers(table: pd.DataFrame) -> np.ndarray:
    """Per row of the item table: whether it lists at least one insulation layer."""
    return per_distinct(lambda m: isinstance(m, tuple) and len(m) > 0,
                        table["layer_materials"].to_numpy(object)).astype(bool)


def table_surfaces(table: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Per row of the item table, whether it has an insulated outer surface and whether it has
    bare metal: the engine's rule (:func:`audit.engine.batch.surfaces`) read from the table.

    Fittings count on pipes only, as the engine counts them; a damaged share not known counts
    as bare (the row is rejected for it anyway, and needs what bare metal needs).
    """
    condition = table["condition"].fillna("").to_numpy(object)
    damaged = table["damaged_pct"].to_numpy(float) / 100.0
    bare_fraction = np.select([condition == "missing", condition == "damaged"],
                              [1.0, np.where(np.isnan(damaged), 1.0, damaged)], 0.0)
    fittings = (table["shape"] == "pipe").to_numpy() & (
        (fittings_of(table, "valves") > 0) | (fittings_of(table, "flanges") > 0))
    return surfaces(has_layers(table), bare_fraction, fittings)


def _listing(named: dict) -> str:
    return ", ".join(sorted(named)) or "(none defined)"


def conductivity_tables(rules: Rules) -> tuple[ConductivityTables, dict[str, int]]:
    """All rule materials as one :class:`ConductivityTables`, and the name -> index map."""
    names = sorted(rules.materials)
    tables = ConductivityTables([rules.materials[n].k for n in names], names,
                                [rules.materials[n].below_data == "hold" for n in names])
    return tables, {n: i for i, n in enumerate(names)}


@dataclass
class PreparedItems:
    """The engine inputs of a table's accepted rows that no site condition changes: the one
    trial object of the audit.

    Looked up once per table: the checks solve one table under several sites, and the
    remedy search, the specification reference, the repairs and the economic-thickness
    search derive trial items from it (:meth:`take`, :meth:`reinsulated`, :meth:`repaired`)
    without going back to names and text.  A trial also knows its item table
    (:meth:`table`, built on first use from the table prepared and the trial's edits), so a
    check evaluated on it reads the same items the engine solves.
    """

    accepted: np.ndarray        #: bool per table row: status "ok"
    index: dict                 #: material name -> conductivity-table index
    fixed: dict                 #: ItemBatch fields of the accepted rows, site-independent
    own_site: np.ndarray        #: each accepted row's site (location, else the default), as
                                #: a position in ``site_names``
    site_names: tuple           #: the distinct own sites
    row_air: np.ndarray         #: ambient given on the row [K] (NaN: the site's)
    row_wind: np.ndarray        #: wind given on the row [m/s]
    row_rh: np.ndarray          #: relative humidity given on the row [%]
    row_surroundings: np.ndarray  #: surroundings temperature given on the row [K]
    temp: np.ndarray            #: process temperature [K]
    at_ambient: np.ndarray      #: process temperature given as ambient
    listed_layers: np.ndarray   #: conductivity-table index per layer slot as the row lists
                                #: them, also where the insulation is missing, (n, L)
    source: pd.DataFrame | None = None   #: the item table prepared (read, never written)
    source_rows: np.ndarray | None = None  #: each row's position in ``source`` (None: all)
    edits: dict = field(default_factory=dict)  #: column -> values per row (or one for all),
                                               #: over ``source``'s
    #: column -> one value per row, made into one-layer tuples only when the table is built:
    #: ``layer_materials`` (conductivity-table indices), ``layer_thicknesses_m`` [m]
    one_layer: dict = field(default_factory=dict)
    _table: pd.DataFrame | None = field(default=None, repr=False)

    _ROW_ARRAYS = ("own_site", "row_air", "row_wind", "row_rh", "row_surroundings", "temp",
                   "at_ambient", "listed_layers")

    def table(self) -> pd.DataFrame:
        """The item table of these rows as the trial has them (index 0, 1, ... for a subset).

        The register's raw cells (``raw:`` columns) stay out of a trial's table: no check
        reads them, and no rule selector can name them.
        """
        if self._table is None:
            if self.source is None:
                raise ValueError("PreparedItems.table: prepared without its table")
            if self.source_rows is None and not self.edits and not self.one_layer:
                self._table = self.source
            else:
                keep = [i for i, c in enumerate(self.source.columns) if not str(c).startswith("raw:")]
                rows = slice(None) if self.source_rows is None else self.source_rows
                table = self.source.iloc[rows, keep].reset_index(drop=True)  # a copy
                for column, values in self.edits.items():
                    table[column] = values
                for column, values in self.one_layer.items():
                    table[column] = self._one_layer(column, values)
                self._table = table
        return self._table

    def _one_layer(self, column, values) -> np.ndarray:
        """A one-layer trial's cells of ``column``: 1-tuples of its material names (from
        their conductivity-table indices) or of its thicknesses [m]."""
        if column == "layer_materials":
            names = np.array([*sorted(self.index, key=self.index.get), ""], dtype=object)
            return per_distinct(lambda m: (m,), names[np.asarray(values)])
        return per_distinct(lambda t: (float(t),), np.asarray(values, float))

    def _with(self, accepted, fixed, at=slice(None), *, rows=None, edits=None, one_layer=None,
              keep_edits=True, **changed) -> PreparedItems:
        """A trial of the rows ``at`` of the accepted rows; ``rows`` (positions in this
        table), ``edits`` and ``one_layer`` (new table cells of those rows, over this trial's
        unless not ``keep_edits``) keep its table in step."""
        arrays = {name: getattr(self, name)[at] for name in self._ROW_ARRAYS}
        arrays.update(changed)

        def kept(edits):
            if not keep_edits:
                return {}
            if rows is None:
                return dict(edits)
            return {column: values if np.ndim(values) == 0 else np.asarray(values)[rows]
                    for column, values in edits.items()}

        source_rows = self.source_rows if rows is None else \
            rows if self.source_rows is None else self.source_rows[rows]
        return PreparedItems(accepted=accepted, index=self.index, fixed=fixed,
                             site_names=self.site_names, source=self.source,
                             source_rows=source_rows, edits={**kept(self.edits), **(edits or {})},
                             one_layer={**kept(self.one_layer), **(one_layer or {})}, **arrays)

    def take(self, rows: np.ndarray) -> PreparedItems:
        """The rows ``rows`` (positions in the table, all accepted) as a table of their own."""
        rows = np.asarray(rows, int)
        if not self.accepted[rows].all():
            raise ValueError("PreparedItems.take: only accepted rows can be taken")
        at = (np.cumsum(self.accepted) - 1)[rows]
        return self._with(np.ones(rows.size, bool),
                          {name: value[at] for name, value in self.fixed.items()}, at, rows=rows)

    def measured(self, factor) -> PreparedItems:
        """Every row with its layers' conductivity multiplied by ``factor`` [-] (one per
        table row; NaN: as it is), the condition a field survey measured
        (:func:`audit.survey.item_factors`); a repair or new insulation drops it again."""
        factor = np.asarray(factor, float)[self.accepted]
        fixed = dict(self.fixed)
        fixed["layer_factor"] = self.fixed["layer_factor"] * np.where(
            np.isfinite(factor), factor, 1.0)[:, None]
        return self._with(self.accepted, fixed)

    def reinsulated(self, materials, thickness_m, *, cover_fittings: bool = True) -> PreparedItems:
        """Every row insulated with one intact layer of ``materials`` [name, or its index in
        ``self.index``] and ``thickness_m`` [m] instead of what it has (not wet, not damaged);
        its uninsulated fittings covered too, unless ``cover_fittings`` is False."""
        if not self.accepted.all():
            raise ValueError("PreparedItems.reinsulated: take the accepted rows first")
        n = self.accepted.size
        fixed = dict(self.fixed)
        materials = np.asarray(materials)
        table = materials if materials.dtype.kind in "iu" else \
            map_values(materials, self.index, -1, dtype=int)
        table = np.broadcast_to(table, n).reshape(n, 1)
        thickness = np.broadcast_to(np.asarray(thickness_m, float), n)
        fixed["layer_table"] = table
        fixed["layer_thickness"] = thickness.reshape(n, 1)
        fixed["layer_factor"] = np.ones((n, 1))
        fixed["bare_fraction"] = np.zeros(n)
        edits = {"condition": "intact", "damaged_pct": np.nan}
        if cover_fittings:
            fixed["fitting_length"] = np.zeros(n)
            edits.update(valves=0, flanges=0)
        return self._with(self.accepted, fixed, edits=edits, listed_layers=table, one_layer={
            "layer_materials": table[:, 0], "layer_thicknesses_m": thickness})

    def repaired(self, insulate, to_spec, spec_material, thickness_m, covers) -> PreparedItems:
        """Every row repaired; the rows with nothing to repair drop out (not accepted).

        Parameters (arrays aligned with the rows):
        ``insulate`` (bool) the insulation is made good: intact and dry, what the row lists
        (also where it is missing); ``to_spec`` (bool) instead one layer of ``spec_material``
        [name] of ``thickness_m`` [m]; ``covers`` (bool) its uninsulated fittings covered.
        """
        insulate, to_spec, covers = (np.asarray(x, bool) for x in (insulate, to_spec, covers))
        accepted = self.accepted & (insulate | covers)
        at = (np.cumsum(self.accepted) - 1)[accepted]
        fixed = {name: value[at] for name, value in self.fixed.items()}
        ins, spec, cover = insulate[accepted], to_spec[accepted], covers[accepted]
        listed = self.listed_layers[at]
        spec_table = map_values(np.asarray(spec_material, dtype=object)[accepted], self.index, -1,
                                dtype=int)
        one_layer = np.where(np.arange(listed.shape[1]) == 0, spec_table[:, None], -1)
        layers = np.where(spec[:, None], one_layer, np.where(ins[:, None], listed,
                                                             fixed["layer_table"]))
        thick = np.where(spec[:, None] & (np.arange(listed.shape[1]) == 0),
                         np.asarray(thickness_m, float)[accepted][:, None],
                         np.where(spec[:, None], 0.0, fixed["layer_thickness"]))
        # As few layer slots as the rows listing the most layers need, as a fresh look-up has.
        width = max(1, int(((layers >= 0) | (np.where(spec[:, None], -1, listed) >= 0))
                           .any(axis=0).nonzero()[0].max(initial=-1)) + 1)
        fixed["layer_table"] = layers[:, :width]
        fixed["layer_thickness"] = thick[:, :width]
        fixed["layer_factor"] = np.where(ins[:, None], 1.0, fixed["layer_factor"])[:, :width]
        fixed["bare_fraction"] = np.where(ins, 0.0, fixed["bare_fraction"])
        fixed["fitting_length"] = np.where(cover, 0.0, fixed["fitting_length"])
        edits = {"status": np.where(accepted, "ok", "rejected").astype(object)}
        if self.source is not None:
            base = self.table()
            materials = base["layer_materials"].to_numpy(object).copy()
            thicknesses = base["layer_thicknesses_m"].to_numpy(object).copy()
            every_spec = to_spec & accepted
            materials[every_spec] = tuples_of(np.asarray(spec_material, dtype=object)[every_spec])
            thicknesses[every_spec] = tuples_of(np.asarray(thickness_m, float)[every_spec])
            fix = insulate & accepted
            gone = covers & accepted
            edits.update(
                layer_materials=materials, layer_thicknesses_m=thicknesses,
                condition=np.where(fix, "intact", base["condition"].to_numpy(object)),
                damaged_pct=np.where(fix, np.nan, base["damaged_pct"].to_numpy(float)),
                valves=np.where(gone, 0, base["valves"].to_numpy(object)),
                flanges=np.where(gone, 0, base["flanges"].to_numpy(object)))
        listed = np.where(spec[:, None], one_layer, listed)[:, :width]
        # Its table's cells are worked out from this trial's table: they replace its edits.
        return self._with(accepted, fixed, at, edits=edits, keep_edits=self.source is None,
                          listed_layers=listed)


def thermal_states(table: pd.DataFrame, rules: Rules, *, site: str | None = None,
                   surface_model: str = "correlations", tables=None,
                   prepared: PreparedItems | None = None) -> pd.DataFrame:
    """Solve every accepted row of ``table`` under one set of conditions.

    Parameters
    ----------
    table : pandas.DataFrame
        The item table after :func:`resolve_names`.
    rules : Rules
        Materials, jackets, metals, sites, fittings.
    site : str, optional
        Evaluate under this site condition instead of each item's own location.
    surface_model : str
        Outer-surface model of the engine.
    tables : tuple, optional
        :func:`conductivity_tables` of ``rules``, if the caller has them already.
    prepared : PreparedItems, optional
        :func:`prepare_items` of ``table``, if the caller has it already.

    Returns
    -------
    pandas.DataFrame
        Same index as ``table``; SI columns (kelvin, W, W/m, W/m2) with NaN for rows that
        were rejected; ``computed`` (bool), ``engine_reason`` and ``engine_warnings``.
    """
    if tables is None:
        tables = conductivity_tables(rules)
    if prepared is None:
        prepared = prepare_items(table, rules, tables[1])
    if prepared.accepted.size != len(table):
        raise ValueError("thermal_states: the prepared items belong to another table")
    return prepared_states(prepared, rules, site=site, surface_model=surface_model,
                           tables=tables, index=table.index)


def prepared_states(prepared: PreparedItems, rules: Rules, *, site: str | None = None,
                    surface_model: str = "correlations", tables=None, index=None) -> pd.DataFrame:
    """:func:`thermal_states` of prepared items, for callers that have no table of them (a
    trial derived with :meth:`PreparedItems.take` and :meth:`PreparedItems.reinsulated`);
    ``index`` labels the rows (default 0, 1, ...)."""
    tables = conductivity_tables(rules)[0] if tables is None else tables[0]
    ok = prepared.accepted
    batch, conditions = site_batch(prepared, rules, site)
    states = solve_items(batch, tables, surface_model=surface_model) if ok.any() else None
    n_layers = batch.layer_table.shape[1]
    out = {}

    def put(name, values, fill=np.nan):
        column = np.full(ok.size, fill, dtype=object if isinstance(fill, str) else float)
        column[ok] = values
        out[name] = column

    for name, values in conditions.items():
        put(name, values, "" if values.dtype == object else np.nan)
    if states is None:
        for name in ("surface_temp_K", "surface_temp_insulated_K", "heat_loss_W", "heat_loss_W_per_m",
                     "heat_flux_W_m2", "outer_area_m2", "convective_share", "radiative_share",
                     "balance_error"):
            put(name, np.empty(0))
        put("engine_reason", np.empty(0, object), "")
        put("engine_warnings", np.empty(0, object), "")
        out["computed"] = np.zeros(ok.size, bool)
        return pd.DataFrame(out, index=index)
    put("surface_temp_K", states.surface_temp)
    put("surface_temp_insulated_K", states.surface_temp_insulated)
    for j in range(n_layers + 1):
        put(f"interface_{j}_K", states.interface_temps[:, j])
    put("heat_loss_W", states.heat_loss)
    put("heat_loss_W_per_m", states.heat_loss_per_m)
    put("heat_flux_W_m2", states.heat_flux)
    put("outer_area_m2", states.outer_area)
    put("convective_share", states.convective_share)
    put("radiative_share", states.radiative_share)
    put("balance_error", states.balance_error)
    put("engine_reason", states.reason, "")
    put("engine_warnings", states.warnings, "")
    computed = np.zeros(ok.size, bool)
    computed[ok] = states.converged
    out["computed"] = computed
    return pd.DataFrame(out, index=index)


def prepare_items(table: pd.DataFrame, rules: Rules, index: dict[str, int] | None = None) -> PreparedItems:
    """Look up, once, everything about ``table``'s accepted rows that no site changes."""
    if index is None:
        index = conductivity_tables(rules)[1]
    accepted = (table["status"] == "ok").to_numpy(bool)
    rows = table.loc[accepted]
    n = len(rows)
    default_site = rules.defaults.get("site")
    own_site, site_names = pd.factorize(
        rows["location"].fillna("").replace("", default_site).to_numpy(object), use_na_sentinel=False)

    jacket_names = rows["jacket"].fillna("").replace("", rules.defaults.get("jacket", "")).to_numpy(object)
    metal_names = rows["material"].fillna("").replace("", rules.defaults.get("metal", "")).to_numpy(object)
    row_eps = rows["emissivity"].to_numpy(float)
    jackets = _attributes(jacket_names, rules.jackets, ("emissivity", "iso12241_ca", "iso12241_cb"))
    metals = _attributes(metal_names, rules.metals, ("emissivity", "iso12241_ca", "iso12241_cb"))

    layer_names = rows["layer_materials"].to_numpy(object)
    layer_thick = rows["layer_thicknesses_m"].to_numpy(object)
    n_layers = max([len(x) for x in layer_names if isinstance(x, tuple)] + [1])
    table_idx = np.full((n, n_layers), -1, int)
    thickness = np.zeros((n, n_layers))
    factor = np.ones((n, n_layers))
    wet = (rows["condition"] == "wet").to_numpy()
    codes, uniques = pd.factorize(pd.Series(list(zip(layer_names, layer_thick)), dtype=object))
    for code, (names, thicks) in enumerate(uniques):
        sel = codes == code
        for j, (name, t) in enumerate(zip(names or (), thicks or ())):
            table_idx[sel, j] = index[name]
            thickness[sel, j] = t
            wf = rules.materials[name].wet_factor
            factor[sel & wet, j] = wf
    condition = rows["condition"].to_numpy(object)
    damaged = rows["damaged_pct"].to_numpy(float) / 100.0
    bare_fraction = np.select([condition == "missing", condition == "damaged"], [1.0, damaged], 0.0)
    listed = table_idx.copy()
    table_idx[condition == "missing"] = -1

    fixed = dict(
        shape=map_values(rows["shape"], SHAPE_CODES, dtype=int),
        od=rows["od_m"].to_numpy(float), length=rows["length_m"].to_numpy(float),
        area=rows["area_m2"].to_numpy(float),
        heads=map_values(rows["heads"], HEAD_CODES, HEAD_CODES["none"], dtype=int),
        orientation=map_values(rows["orientation"], ORIENTATION_CODES, 0, dtype=int),
        emissivity=np.where(np.isfinite(row_eps), row_eps, jackets["emissivity"]),
        bare_emissivity=np.where(np.isfinite(row_eps), row_eps, metals["emissivity"]),
        layer_table=table_idx, layer_thickness=thickness, layer_factor=factor,
        bare_fraction=bare_fraction,
        fitting_length=_fitting_length(rows, rules),
        iso_ca=jackets["iso12241_ca"], iso_cb=jackets["iso12241_cb"],
        bare_iso_ca=metals["iso12241_ca"], bare_iso_cb=metals["iso12241_cb"],
    )
    return PreparedItems(accepted=accepted, index=index, fixed=fixed, own_site=own_site,
                         site_names=tuple(site_names), row_air=rows["ambient_K"].to_numpy(float),
                         row_wind=rows["wind_m_s"].to_numpy(float), row_rh=rows["rh_pct"].to_numpy(float),
                         row_surroundings=_given(rows, "surroundings_K"),
                         temp=rows["temp_K"].to_numpy(float),
                         at_ambient=rows["temp_is_ambient"].to_numpy(bool), listed_layers=listed,
                         source=table)


def site_batch(prepared: PreparedItems, rules: Rules, site: str | None) -> tuple[ItemBatch, dict]:
    """The engine batch of the prepared rows under ``site`` (None: each row's own site), and
    the conditions used (air, surroundings, wind, RH, process temperature, emissivity, and
    ``conditions_from``: the location whose conditions were used, or ``plant``); the
    surroundings as the module docstring says.

    Under a design case ``site``, each row takes its location's own case where the location
    gives one (``[site.LOCATION.design.CASE]``), else the plant-wide ``[site.CASE]``."""
    codes = prepared.own_site
    if site:
        own = [rules.sites[name].design.get(site) if name in rules.sites else None
               for name in prepared.site_names]
        conditions = [case or rules.sites.get(site) for case in own]
        whose = [name if case else "plant" for name, case in zip(prepared.site_names, own)]
    else:
        conditions = [rules.sites.get(name) for name in prepared.site_names]
        whose = list(prepared.site_names)
    site_air, site_wind, site_rh, site_sur = (
        np.array([getattr(c, a) if c is not None else np.nan for c in conditions],
                 dtype=float)[codes]
        for a in ("ambient", "wind", "rh", "surroundings"))
    row_air = prepared.row_air
    t_air = np.where(np.isfinite(row_air), row_air, site_air)
    # The row's surroundings; else its own air where it gives one, else the site's
    # surroundings, else the air (module docstring).
    t_sur = np.where(np.isfinite(prepared.row_surroundings), prepared.row_surroundings,
                     np.where(np.isfinite(row_air) | ~np.isfinite(site_sur), t_air, site_sur))
    wind = np.where(np.isfinite(prepared.row_wind), prepared.row_wind, site_wind)
    rh = np.where(np.isfinite(prepared.row_rh), prepared.row_rh, site_rh)
    t_process = np.where(prepared.at_ambient, t_air, prepared.temp)
    batch = ItemBatch(t_process=t_process, t_air=t_air, t_surroundings=t_sur, wind=wind,
                      **prepared.fixed)
    return batch, {"air_temp_K": t_air, "surroundings_temp_K": t_sur, "wind_m_s": wind,
                   "rh_pct": rh, "process_temp_K": t_process,
                   "emissivity_used": prepared.fixed["emissivity"],
                   "bare_emissivity_used": prepared.fixed["bare_emissivity"],
                   "conditions_from": np.array(whose + [""], dtype=object)[codes]}


def _given(rows: pd.DataFrame, column: str) -> np.ndarray:
    """A numeric item-table column as floats; NaN (not given) for a table made without it."""
    if column not in rows:
        return np.full(len(rows), np.nan)
    return rows[column].to_numpy(float)


def _attributes(names, named: dict, attributes: tuple[str, ...]) -> dict[str, np.ndarray]:
    """``getattr(named[name], a)`` for each of ``names`` and each attribute ``a`` (NaN where
    the name is absent), with one lookup per distinct name."""
    codes, uniques = pd.factorize(np.asarray(names, dtype=object), use_na_sentinel=False)
    return {a: np.array([getattr(named[u], a) if u in named else np.nan for u in uniques],
                        dtype=float)[codes] for a in attributes}


def fittings_of(table: pd.DataFrame, column: str) -> np.ndarray:
    """The ``valves`` or ``flanges`` counts of the item table, as the reader wrote them (a
    whole number per row, 0 if none: see :data:`audit.schema.SCHEMA`), as floats."""
    return table[column].to_numpy(float)


def _fitting_length(rows: pd.DataFrame, rules: Rules) -> np.ndarray:
    """Bare-pipe equivalent [m] of each pipe row's uninsulated valves and flanges.

    Sizes beyond the table take its end value; such rows say so in their warnings (see
    :func:`resolve_names`).  Fittings on other shapes are not counted (also warned).
    """
    pipe = (rows["shape"] == "pipe").to_numpy()
    od = np.where(pipe, rows["od_m"].to_numpy(float), np.nan)
    total = np.zeros(len(rows))
    for column, fitting in (("valves", "valve"), ("flanges", "flange")):
        count = fittings_of(rows, column)
        if not count.any():
            continue
        table = rules.fittings.get(fitting)
        if table is None:
            continue
        sizes = np.array([_OD_OF_NPS.get(nps, np.nan) for nps, _ in table.equivalent_length])
        lengths = np.array([length for _, length in table.equivalent_length])
        keep = np.isfinite(sizes)
        total += np.where(pipe & (count > 0), count * np.interp(od, sizes[keep], lengths[keep]), 0.0)
    return total
