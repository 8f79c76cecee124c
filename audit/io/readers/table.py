"""Building the item table (see DEVELOPERS.md) from one raw sheet.

Each recognised column is parsed once per distinct cell text (``pd.factorize``), then the
answers are spread back over the rows with numpy indexing; rows are never parsed one by one.
A cell that cannot be read rejects its row with a reason; the raw cell is kept as
``raw:<column>``.  A bad cell in a column that does not apply to the row's shape (an ``area``
on a pipe) is not a rejection: it is ignored with a warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from audit.errors import RegisterError
from audit.io.readers import cells
from audit.io.readers.ambiguous import decide_ambiguous, design_temperature
from audit.io.readers.column import Column, RowNotes
from audit.io.readers.sheet import MAX_CELL_CHARS, RawSheet
from audit.io.readers.headers import DN_UNIT, HeaderMap, Lookup, match_headers
from audit.io.readers.insulation import insulation_layers
from audit.io.readers.plant import PlantRules
from audit.io.readers.tracing import tracing as tracing_cell
from audit.io.readers.words import NAME_COLUMNS, translate_layers, translate_names
from audit.pipe_sizes import OD_MM_BY_NPS
from audit.problems import Problem
from audit.schema import BY_NAME, ITEM_COLUMNS, REGISTER_COLUMNS, SCHEMA, STRING_COLUMNS
from audit.units import UnitParseError, _describe, parse_quantity

SHAPES, HEADS = BY_NAME["shape"].words, BY_NAME["heads"].words
ORIENTATIONS, CONDITIONS = BY_NAME["orientation"].words, BY_NAME["condition"].words
_SHAPE_SYNONYMS = (("piping", "pipe"), ("line", "pipe"), ("vessel-vertical", "vertical-vessel"),
                   ("vessel-horizontal", "horizontal-vessel"), ("plate", "flat"))
_HEADS_SYNONYMS = (("hemispheric", "hemispherical"), ("hemi", "hemispherical"),
                   ("elliptical", "ellipsoidal"), ("2:1-ellipsoidal", "ellipsoidal"))
_ORIENTATION_SYNONYMS = (("horiz", "horizontal"), ("h", "horizontal"), ("vert", "vertical"),
                         ("v", "vertical"), ("facing-up", "up"), ("facing-down", "down"))
_CONDITION_SYNONYMS = (("good", "intact"),)
SCHEDULES = BY_NAME["schedule"].words
_SCHEDULE_SYNONYMS = tuple((f"{prefix}{s}", s) for s in SCHEDULES
                           for prefix in ("sch", "sch-", "sch.-", "schedule-", "s"))
#: Spellings the reader accepts itself, beside the rules' names (not a plant's words).
_OWN_SPELLINGS = {c: tuple(k for k, _ in pairs) for c, pairs in (
    ("shape", _SHAPE_SYNONYMS), ("heads", _HEADS_SYNONYMS), ("condition", _CONDITION_SYNONYMS))}
VESSELS = ("vertical-vessel", "horizontal-vessel")
SMALLEST_OD_M = OD_MM_BY_NPS["1/8"] / 1000.0
SIZED = ("pipe", *VESSELS, "sphere")
IGNORED_FOR_SHAPE = " (ignored for this shape)"

# column -> (default unit, target unit, what, low, high, low excluded): the schema's quantities
QUANTITIES = {c.name: (c.default_unit, c.si_unit, c.what, *c.bounds) for c in SCHEMA if c.what}
# Columns whose header unit is checked against this target, and their default unit.
UNIT_TARGETS = {c.name: (c.default_unit, c.si_unit) for c in SCHEMA if c.si_unit}
NUMERIC = frozenset(c.name for c in SCHEMA if c.numeric)
# The columns parsed from the schema alone, in its order (the order of their reasons).
PLAIN = tuple(c.name for c in SCHEMA if c.parse != "special")
_PER_YEAR = ("yr", "year", "a", "annum")


def _per_year_stripped(text: str) -> str:
    """``"8000 h/yr"`` -> ``"8000 h"``: a trailing ``/yr``, ``/year``, ``/a`` or ``/annum``
    taken off (found by its end, not by a pattern searched from every position)."""
    trimmed = text.rstrip()
    lower = trimmed.lower()
    for word in _PER_YEAR:
        if lower.endswith(word):
            head = trimmed[:-len(word)].rstrip()
            if head.endswith("/"):
                return head[:-1].rstrip()
    return text


@dataclass
class SheetInfo:
    """What was read from one sheet, for the data-quality summary."""

    file: str
    sheet: str
    header_row: int
    rows: int
    recognised: dict[str, str]
    ignored: list[str]
    shadowed: list[tuple[str, str]]
    units_assumed: dict[str, tuple[str, int]] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    #: plant words: column -> {"mapped": {word: [name, rows]}, "unknown": {text: [hints, rows]}}
    words: dict = field(default_factory=dict)
    #: how headers that could mean two things were read (``Area``, a design temperature)
    decisions: list[str] = field(default_factory=list)


def _check_header_units(raw: RawSheet, header_map: HeaderMap) -> None:
    for column, unit in header_map.units.items():
        if unit is None:
            continue
        if column == "nps":
            if unit not in (DN_UNIT, "mm", "in", "inch"):
                raise RegisterError(f"header {header_map.headers[column]!r}: unit {unit!r} is "
                                    "not a nominal-size unit", file=raw.path,
                                    sheet=raw.sheet or None, column=header_map.headers[column],
                                    expected="[in] for NPS or [DN] (or [mm]) for DN")
            continue
        if column not in UNIT_TARGETS:
            continue
        if column == "hours":
            unit = _per_year_stripped(unit) or "h"
        try:
            parse_quantity(f"1 {unit}", unit, UNIT_TARGETS[column][1])
        except UnitParseError as exc:
            raise RegisterError(f"header {header_map.headers[column]!r}: {unit!r} is not a unit "
                                f"of {_describe(UNIT_TARGETS[column][1])}",
                                file=raw.path, sheet=raw.sheet or None,
                                column=header_map.headers[column],
                                expected="a pint unit in square brackets, e.g. "
                                         "temp [degF], thickness [in], od [mm]") from exc


def build_sheet(raw: RawSheet, lookup: Lookup, tag_aliases: list[str],
                plant: PlantRules | None = None) -> tuple[pd.DataFrame, SheetInfo, pd.DataFrame]:
    """The item table of one sheet, what was read (for the summary) and its row problems
    (:mod:`audit.problems`; ``row`` is the position in the sheet's table); a plant's words
    (``plant``) translated to the rules' names."""
    header_map = match_headers(raw.header, lookup, raw.groups)
    if "tag" not in header_map.columns:
        raise RegisterError("missing the required tag column", file=raw.path,
                            sheet=raw.sheet or None, row=raw.header_row,
                            expected="a column named tag or " + ", ".join(tag_aliases))
    _check_header_units(raw, header_map)
    decisions = decide_ambiguous(raw, header_map, lookup)
    n = len(raw.data)
    data = raw.data
    col = {c: Column(c, raw.stripped[header_map.columns[c]] if c in header_map.columns else None,
                      n,
                      header_map.units.get(c), raw.decimal_comma and c in NUMERIC)
           for c in REGISTER_COLUMNS}
    notes = RowNotes(n)
    blank = raw.blank
    out: dict[str, object] = {}
    info = SheetInfo(raw.file, raw.sheet, raw.header_row, n, dict(header_map.headers), [],
                     header_map.shadowed, notes=list(raw.notes), decisions=decisions)
    everyone = np.ones(n, dtype=bool)
    _long_cells(raw, header_map, notes)
    for c in NAME_COLUMNS:
        if c in col:
            translate_names(col[c], plant, info.words, _OWN_SPELLINGS.get(c, ()))

    tag = col["tag"]
    out["tag"] = tag.uniques[tag.codes]
    notes.reject(~tag.given, "tag", Problem("empty", "empty", "an item identifier"))

    shape = _choice(col["shape"], SHAPES, _SHAPE_SYNONYMS, "pipe", notes, everyone)
    out["shape"] = shape
    sized, vessel = np.isin(shape, SIZED), np.isin(shape, VESSELS)
    flat, lengthy = shape == "flat", np.isin(shape, ("pipe", *VESSELS))

    _geometry(col, shape, sized, lengthy, flat, notes, out, info)
    _orientation(col, shape, vessel, flat, notes, out)
    heads = _choice(col["heads"], HEADS, _HEADS_SYNONYMS, "", notes, vessel)
    out["heads"] = np.where(heads != "", heads, _words(vessel, "ellipsoidal", "none"))
    _temperature(col["temp"], notes, out, info)
    _design_temperature(header_map, col["temp"], plant, notes, info)
    condition = _choice(col["condition"], CONDITIONS, _CONDITION_SYNONYMS, "intact", notes,
                        everyone)
    out["condition"] = condition
    materials, out["layer_thicknesses_m"] = insulation_layers(col, condition, notes)
    out["layer_materials"] = translate_layers(materials, "layers", plant, info.words)
    _surface(col, notes, out, info)
    for c in PLAIN:
        out[BY_NAME[c].item[0].name] = _plain(col[c], BY_NAME[c].parse, notes, info)
    _tracing(col["tracing"], notes, out)
    out["schedule"] = _choice(col["schedule"], SCHEDULES, _SCHEDULE_SYNONYMS, "", notes, everyone)
    notes.warn((condition == "damaged") & ~col["damaged"].given, "damaged",
               Problem("share-unknown",
                       "empty for a damaged item; share of the length bare not known"))

    # A blank row in the middle of a sheet stays an (empty) input row: rejected, one reason.
    notes.blank(blank)
    found = notes.records()
    reason, warning = notes.texts(found)
    out["source"] = np.char.add(f"{raw.file}:{raw.sheet}:",
                                raw.row_numbers.astype(str)).astype(object)
    out["status"] = _words(reason == "", "ok", "rejected")
    out["reason"], out["warnings"] = reason, warning
    table = pd.DataFrame({c: out[c] for c in ITEM_COLUMNS})
    for c in STRING_COLUMNS:
        table[c] = table[c].astype("str")
    for c, position in header_map.columns.items():
        table[f"raw:{c}"] = data[position].astype("str").to_numpy()
    table = _extras(table, data, header_map, info)
    return table, info, found


def _words(mask: np.ndarray, yes: str, no: str) -> np.ndarray:
    """``yes`` where ``mask``, else ``no``, as an object array sharing the two strings (a
    fixed-width text array would become one new string per row of a million-row register)."""
    return np.array([no, yes], dtype=object)[mask.astype(np.intp)]


def _plain(column: Column, parse: str, notes: RowNotes, info: SheetInfo) -> np.ndarray:
    """A column parsed from its schema entry alone; a bad cell rejects its row."""
    everyone = np.ones(len(column.codes), dtype=bool)
    if parse == "quantity":
        return _quantity(column, notes, everyone, info)
    if parse == "name":
        return column.spread(column.parse(cells.name, empty=""))
    if parse == "text":
        return column.uniques[column.codes]
    parser, empty, dtype = {"yes_no": (cells.yes_no, (False, None), bool),
                            "count": (cells.count, (0, None), np.int64)}[parse]
    answers = column.parse(parser, empty=empty)
    notes.cells("reject", everyone, column, [a[1] for a in answers])
    return column.spread(answers, 0, dtype=dtype)


def _choice(column: Column, allowed, synonyms, default, notes: RowNotes, applies) -> np.ndarray:
    answers = column.parse(cells.choice, allowed, synonyms, empty=(default, None))
    notes.cells("reject", applies, column, [a[1] for a in answers])
    return column.spread(answers, 0)


def _quantity(column: Column, notes: RowNotes, applies, info: SheetInfo,
              ignored_for: np.ndarray | None = None) -> np.ndarray:
    """A number with a unit; its header unit, else its default unit, for bare numbers."""
    default, target, what, low, high, low_open = QUANTITIES[column.name]
    unit = column.unit or default
    if column.name == "hours":
        unit = _per_year_stripped(unit) or "h"
        answers = column.parse(lambda t: cells.quantity(_per_year_stripped(t), unit, target,
                                                        what, low, high, low_open),
                               empty=(math.nan, None))
    else:
        answers = column.parse(cells.quantity, unit, target, what, low, high, low_open,
                               empty=(math.nan, None))
    problems = [a[1] for a in answers]
    notes.cells("reject", applies, column, problems)
    if ignored_for is not None:
        notes.cells("warning", ignored_for, column, problems, after=IGNORED_FOR_SHAPE)
    _note_units(column, unit, info, notes)
    return column.spread(answers, 0, dtype=float)


def _note_units(column: Column, unit: str, info: SheetInfo, notes: RowNotes) -> None:
    """Record bare numbers read in the default unit; warn per row when the column mixes."""
    if column.unit is not None or unit == "dimensionless":
        return
    bare = np.array([cells.is_unit_free(u) for u in column.uniques])
    with_unit = np.array([cells.has_unit(u) for u in column.uniques])
    rows = bare[column.codes]
    if rows.any():
        info.units_assumed[column.name] = (unit, int(rows.sum()))
    if bare.any() and with_unit.any():
        assumed = Problem("unit-assumed", f"has no unit; {unit} assumed")
        notes.cells("warning", rows, column, [assumed if b else None for b in bare])


def _geometry(col, shape, sized, lengthy, flat, notes: RowNotes, out, info: SheetInfo) -> None:
    nps, od = col["nps"], col["od"]
    answers = nps.parse(cells.pipe_size, nps.unit if nps.unit != "mm" else DN_UNIT,
                        empty=("", math.nan, None))
    nps_text, nps_od = nps.spread(answers, 0), nps.spread(answers, 1, dtype=float) / 1000.0
    nps_problems = [a[2] for a in answers]
    notes.cells("reject", sized, nps, nps_problems)
    notes.cells("warning", ~sized, nps, nps_problems, after=IGNORED_FOR_SHAPE)
    od_m = _quantity(od, notes, sized, info, ignored_for=~sized)
    notes.reject(sized & ~nps.given & ~od.given, "nps", Problem(
        "empty", "empty", "a nominal pipe size (nps) or an outside diameter (od)"))
    # Inch and metric tables of one size differ by rounding only (273.0 vs 273.1 mm).
    disagree = nps.given & od.given & (np.abs(od_m - nps_od) > 0.01 * nps_od)
    notes.warn(disagree & sized, "od", Problem(
        "od-differs", "differs from the nominal size's outside diameter; od used"))
    # Below the smallest steel pipe (NPS 1/8, 10.3 mm): an NPS in inches written as an od?
    small = Problem("od-below-smallest-pipe", "is smaller than any steel pipe (10.3 mm); an "
                    "NPS in inches in the od column? read as written")
    notes.cells("warning", sized & (od_m < SMALLEST_OD_M), od,
                [None if u == "" else small for u in od.uniques])
    out["od_m"] = np.where(od.given, od_m, nps_od)
    out["nps"] = nps_text
    out["length_m"] = _quantity(col["length"], notes, lengthy, info, ignored_for=~lengthy)
    notes.reject(lengthy & ~col["length"].given, "length", Problem(
        "empty", "empty", "the run length or tangent-to-tangent length (m)"))
    out["area_m2"] = _quantity(col["area"], notes, flat, info, ignored_for=~flat)
    notes.reject(flat & ~col["area"].given, "area",
                 Problem("empty", "empty", "the surface area (m2)"))


def _tracing(column: Column, notes: RowNotes, out) -> None:
    """The ``tracing`` cell (:mod:`audit.io.readers.tracing`): its kind, electric output, steam
    tracer size and steam temperature; a cell that cannot be read rejects its row."""
    answers = column.parse(tracing_cell, empty=("", math.nan, math.nan, math.nan, None))
    notes.cells("reject", np.ones(len(column.codes), dtype=bool), column, [a[4] for a in answers])
    out["tracing"] = column.spread(answers, 0)
    for k, name in enumerate(("tracing_W_per_m", "tracer_nps", "tracing_steam_K"), start=1):
        out[name] = column.spread(answers, k, dtype=float)


def _orientation(col, shape, vessel, flat, notes: RowNotes, out) -> None:
    column = col["orientation"]
    answers = column.parse(cells.choice, ORIENTATIONS, _ORIENTATION_SYNONYMS,
                           empty=("", None))
    given = column.spread(answers, 0)
    notes.cells("reject", np.ones(len(shape), dtype=bool), column, [a[1] for a in answers])
    by_shape = _words(shape == "vertical-vessel", "vertical", "horizontal")
    contradicts = vessel & (given != "") & (given != by_shape)
    problems = np.full(len(shape), None, dtype=object)
    problems[contradicts] = [Problem("contradicts-shape", f"contradicts shape {s}",
                                     f"{b} or empty")
                             for s, b in zip(shape[contradicts], by_shape[contradicts])]
    notes.reject(contradicts, "orientation", problems, value=given)
    notes.reject(~flat & np.isin(given, ("up", "down")), "orientation", Problem(
        "contradicts-shape", "up/down apply to flat items only", "horizontal or vertical"))
    notes.reject(flat & (given == "horizontal"), "orientation", Problem(
        "contradicts-shape", "is ambiguous for a flat item",
        "vertical, up (hot face below, heat rising) or down"), value="horizontal")
    notes.warn(flat & (given == ""), "orientation",
               Problem("orientation-assumed", "empty for a flat item; vertical assumed"))
    default = np.where(flat, _words(flat, "vertical", ""), by_shape)
    out["orientation"] = np.where(given != "", given, default)


def _temperature(column: Column, notes: RowNotes, out, info: SheetInfo) -> None:
    unit = column.unit or "degC"
    answers = column.parse(cells.temperature, unit,
                           empty=(math.nan, math.nan, False, None, None))
    out["temp_K"] = column.spread(answers, 0, dtype=float)
    out["temp_max_K"] = column.spread(answers, 1, dtype=float)
    out["temp_is_ambient"] = column.spread(answers, 2, dtype=bool)
    everyone = np.ones(len(column.codes), dtype=bool)
    notes.cells("reject", everyone, column, [a[3] for a in answers])
    notes.reject(~column.given, "temp", Problem(
        "empty", "empty", f"the operating temperature ({unit} if no unit), AMB or normal/max"))
    notes.cells("warning", everyone, column, [a[4] for a in answers])
    _note_units(column, unit, info, notes)


def _design_temperature(header_map: HeaderMap, column: Column, plant: PlantRules | None,
                        notes: RowNotes, info: SheetInfo) -> None:
    """A design temperature standing in for the operating one: a warning on every row it
    feeds, or, where the rules refuse it, a reason."""
    header = design_temperature(header_map)
    if header is None:
        return
    if plant is not None and plant.design_temp == "refuse":
        info.decisions.append(f"header {header!r} is a design temperature and no operating "
                              'temperature is given: refused ([defaults] design_temp = "refuse")')
        notes.reject(np.ones(len(column.codes), dtype=bool), "temp", Problem(
            "design-temperature-refused", f'only a design temperature (header "{header}") and '
            'the rules refuse it ([defaults] design_temp = "refuse")', "an operating temperature"))
        return
    info.decisions.append(f"header {header!r} is a design temperature, read as the operating "
                          "temperature: no operating temperature is given (a warning on each row)")
    notes.warn(column.given, "temp", Problem(
        "design-temperature", f'design temperature (header "{header}") used as the operating '
        "temperature; the register gives no operating temperature"))


def _surface(col, notes: RowNotes, out, info: SheetInfo) -> None:
    """Jacket name, or an emissivity written in the jacket column; the emissivity column wins."""
    jacket = col["jacket"]
    numeric = np.array([u != "" and cells.is_bare_number(u) for u in jacket.uniques])
    answers = [cells.quantity(u, "dimensionless", "dimensionless", "an emissivity", 0.0, 1.0,
                              True) if is_number else (math.nan, None)
               for u, is_number in zip(jacket.uniques, numeric)]
    notes.cells("reject", np.ones(len(jacket.codes), dtype=bool), jacket,
                [a[1] for a in answers])
    names = [("" if u.lower() in cells.BARE_WORDS or is_number else cells.name(u))
             for u, is_number in zip(jacket.uniques, numeric)]
    out["jacket"] = jacket.spread(names)
    emissivity = _quantity(col["emissivity"], notes, np.ones(len(jacket.codes), dtype=bool), info)
    out["emissivity"] = np.where(col["emissivity"].given, emissivity,
                                 jacket.spread(answers, 0, dtype=float))


def _long_cells(raw: RawSheet, header_map: HeaderMap, notes: RowNotes) -> None:
    """Reject rows with a cell longer than a spreadsheet cell holds (any column)."""
    names = {position: column for column, position in header_map.columns.items()}
    for position, (codes, uniques) in enumerate(raw.stripped):
        lengths = np.fromiter((len(u) for u in uniques), dtype=np.int64, count=len(uniques))
        if not len(codes) or lengths.max(initial=0) <= MAX_CELL_CHARS:
            continue
        label = names.get(position) or raw.header[position] or f"column {position + 1}"
        too_long = lengths[codes] > MAX_CELL_CHARS
        problems = np.array([Problem("cell-too-long", f"cell of {n} characters, above the limit "
                                     f"of {MAX_CELL_CHARS}", f"at most {MAX_CELL_CHARS} characters")
                             if n > MAX_CELL_CHARS else None for n in lengths], dtype=object)
        notes.reject(too_long, label, problems[codes])


def _extras(table: pd.DataFrame, data: pd.DataFrame, header_map: HeaderMap,
            info: SheetInfo) -> pd.DataFrame:
    """``table`` with the unknown columns carried through under their header (blank headers
    named by position), added in one step."""
    taken = {str(c).lower() for c in table.columns}
    extra = {}
    for position, header in header_map.extras:
        values = data[position].astype("str")
        if not header and not values.str.strip().ne("").any():
            continue
        label = header or f"column {position + 1}"
        if label.lower() in taken or label.startswith("raw:"):
            label = f"extra:{label}"
        base, k = label, 2
        while label.lower() in taken:
            label, k = f"{base} ({k})", k + 1
        taken.add(label.lower())
        extra[label] = values.to_numpy()
        info.ignored.append(label)
    if not extra:
        return table
    return pd.concat([table, pd.DataFrame(extra, index=table.index)], axis=1)
