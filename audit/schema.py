"""The item table's one declaration: every register column, what it becomes, and who uses it.

Header matching (:mod:`audit.io.readers.headers`), the reader's parsing of plain columns
(:mod:`audit.io.readers.table`), the selector's columns (:mod:`audit.rules.selector`), the
``calc`` flags (:mod:`audit.calc`) and the item table's column list all read :data:`SCHEMA`.
Adding a plain column (a name, a number with a unit, a count, yes/no, free text) is one entry
here; a column that needs its own parsing also needs a few lines in the reader (see
DEVELOPERS.md, "Adding things").  (The rule files' keys are checked by audit/rules/keys.py.)

The order of :data:`SCHEMA` is the order of the item table's columns, and, for the plain
columns, the order in which the reader parses them, hence the order of a row's reasons.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: How the reader parses a column: ``special`` (its own code in the reader), or one of the
#: plain kinds the reader parses from this declaration alone.
PARSERS = ("special", "quantity", "name", "text", "yes_no", "count")


@dataclass(frozen=True)
class ItemColumn:
    """One column of the item table."""

    name: str      #: column name, SI unit in the name (``temp_K``)
    dtype: str     #: str, float, bool, int, tuple[str] or tuple[float]
    meaning: str   #: one line for DEVELOPERS.md


@dataclass(frozen=True)
class RegisterColumn:
    """One register column (header name, ``calc`` flag and selector name alike)."""

    name: str
    item: tuple[ItemColumn, ...]  #: what the reader writes for it (empty: feeds another column)
    parse: str = "special"        #: one of :data:`PARSERS`
    default_unit: str | None = None  #: unit of a bare number in a cell or a selector
    si_unit: str | None = None       #: unit of the item table's magnitude
    what: str = ""                #: a quantity's description in reasons ("a wind speed")
    bounds: tuple[float, float, bool] = (-math.inf, math.inf, False)  #: low, high, low excluded
    words: tuple[str, ...] = ()   #: the allowed words, where they are fixed
    numeric: bool = False         #: cells hold numbers: a decimal comma is read as a point
    selectable: bool = False      #: may appear in a rule's ``applies_to``
    select_by: str | None = None  #: item column a selector compares, if not the first
    calc_flag: bool = True        #: ``lagaudit calc --<name>``
    echo: bool = False            #: results echo it as understood, ``name [default unit]``

    @property
    def select_kind(self) -> str:
        """How a selector compares it: ``text``, ``bool``, ``temperature`` or ``number``."""
        dtype = self.item[0].dtype if self.item else "str"
        if dtype == "str" and self.select_by is None:
            return "text"
        if dtype == "bool":
            return "bool"
        return "temperature" if self.si_unit == "kelvin" else "number"


def _item(name: str, dtype: str, meaning: str) -> tuple[ItemColumn, ...]:
    return (ItemColumn(name, dtype, meaning),)


def _quantity(name: str, item: str, meaning: str, default_unit: str, si_unit: str, what: str,
              bounds: tuple[float, float, bool], **more) -> RegisterColumn:
    """A plain number-with-unit column, parsed from its entry alone."""
    return RegisterColumn(name, _item(item, "float", meaning), parse="quantity",
                          default_unit=default_unit, si_unit=si_unit, what=what, bounds=bounds,
                          numeric=True, **more)


_POSITIVE = (0.0, math.inf, True)
_NOT_NEGATIVE = (0.0, math.inf, False)
_PERCENT = (0.0, 100.0, False)

#: Columns the reader writes that come from no register column, after ``tag``.
BOOKKEEPING = (
    ItemColumn("source", "str", "`file:sheet:row` (row is the 1-based spreadsheet/CSV line "
                                "number; sheet empty for CSV)"),
    ItemColumn("status", "str", "`ok` or `rejected`"),
    ItemColumn("reason", "str", "empty when ok; `; `-joined reasons naming column, raw value "
                                "and what was expected"),
    ItemColumn("warnings", "str", "`; `-joined warnings (a value assumed, a cell ignored)"),
)

SCHEMA: tuple[RegisterColumn, ...] = (
    RegisterColumn("tag", _item("tag", "str", "as read (stripped)"), selectable=True,
                   calc_flag=False),
    RegisterColumn("shape", _item("shape", "str", "`pipe`, `vertical-vessel`, "
                                  "`horizontal-vessel`, `sphere`, `flat`"),
                   words=("pipe", "vertical-vessel", "horizontal-vessel", "sphere", "flat"),
                   selectable=True, echo=True),
    RegisterColumn("nps", _item("nps", "str", "nominal pipe size as NPS text (`1-1/2`), empty "
                                "if not given"),
                   numeric=True, selectable=True, select_by="od_m", echo=True),  # compared as its od
    RegisterColumn("od", _item("od_m", "float", "outside diameter of the metal"),
                   default_unit="mm", si_unit="m", what="a diameter", bounds=_POSITIVE,
                   numeric=True, selectable=True, echo=True),
    RegisterColumn("length", _item("length_m", "float", "pipe run length, vessel "
                                   "tangent-to-tangent length/height"),
                   default_unit="m", si_unit="m", what="a length", bounds=_POSITIVE,
                   numeric=True, selectable=True, echo=True),
    RegisterColumn("area", _item("area_m2", "float", "flat items"),
                   default_unit="m**2", si_unit="m**2", what="an area", bounds=_POSITIVE,
                   numeric=True, selectable=True, echo=True),
    RegisterColumn("heads", _item("heads", "str", "`hemispherical`, `ellipsoidal`, `flat`, "
                                  "`none`"),
                   words=("hemispherical", "ellipsoidal", "flat", "none"), selectable=True),
    RegisterColumn("orientation", _item("orientation", "str", "`horizontal`, `vertical` "
                                        "(flat items: also `up`, `down`)"),
                   words=("horizontal", "vertical", "up", "down"), selectable=True),
    RegisterColumn("temp", (
        ItemColumn("temp_K", "float", "operating temperature (`AMB` gives NaN here and "
                                      "`temp_is_ambient` True)"),
        ItemColumn("temp_is_ambient", "bool", "the item runs at ambient"),
        ItemColumn("temp_max_K", "float", "maximum temperature when given as `normal/max`"),
    ), default_unit="degC", si_unit="kelvin", numeric=True, selectable=True, echo=True),
    RegisterColumn("layers", (
        ItemColumn("layer_materials", "tuple[str]", "insulation materials, innermost first; "
                                                    "`()` for bare"),
        ItemColumn("layer_thicknesses_m", "tuple[float]", "same length as `layer_materials`"),
    ), default_unit="mm", si_unit="m", numeric=True, echo=True),
    RegisterColumn("insulation", (), calc_flag=False),  # one-layer form of layers
    RegisterColumn("thickness", (), default_unit="mm", si_unit="m", numeric=True,
                   calc_flag=False),
    RegisterColumn("jacket", _item("jacket", "str", "jacket name, empty if none/not given"),
                   numeric=True, selectable=True),  # may hold an emissivity instead
    RegisterColumn("emissivity", _item("emissivity", "float", "emissivity given on the row "
                                       "(NaN if not)"),
                   default_unit="dimensionless", si_unit="dimensionless", what="an emissivity",
                   bounds=(0.0, 1.0, True), numeric=True),
    RegisterColumn("location", _item("location", "str", "site condition name, empty for the "
                                     "rules' default"), parse="name", selectable=True, echo=True),
    RegisterColumn("service", _item("service", "str", "insulation purpose, empty if not given"),
                   parse="name", selectable=True, echo=True),
    RegisterColumn("material", _item("material", "str", "metal name, empty if not given"),
                   parse="name", selectable=True),
    RegisterColumn("area_code", _item("area_code", "str", "plant area, as read"), parse="text",
                   selectable=True, calc_flag=False, echo=True),
    RegisterColumn("condition", _item("condition", "str", "`intact`, `damaged`, `wet`, "
                                      "`missing`"),
                   words=("intact", "damaged", "wet", "missing"), selectable=True, echo=True),
    _quantity("ambient", "ambient_K", "air temperature of the item (NaN: the site's)",
              "degC", "kelvin", "a temperature", _NOT_NEGATIVE),
    _quantity("wind", "wind_m_s", "wind speed at the item (NaN: the site's)",
              "m/s", "m/s", "a wind speed", _NOT_NEGATIVE),
    _quantity("rh", "rh_pct", "relative humidity at the item (NaN: the site's)",
              "percent", "percent", "a relative humidity", _PERCENT),
    _quantity("surroundings", "surroundings_K", "temperature of the surfaces it radiates to "
              "(NaN: the site's)", "degC", "kelvin", "a temperature", _NOT_NEGATIVE),
    _quantity("damaged", "damaged_pct", "share of the length bare when damaged",
              "percent", "percent", "a share of the length", _PERCENT, selectable=True),
    _quantity("hours", "hours_h", "operating hours per year (NaN if not given)",
              "h", "h", "hours per year", (0.0, 8784.0, False), selectable=True,
              calc_flag=False),
    _quantity("elevation", "elevation_m", "height above grade or the nearest platform (NaN if "
              "not given)", "m", "m", "a height", _NOT_NEGATIVE, selectable=True, calc_flag=False),
    _quantity("install_year", "install_year", "year the insulation was installed (NaN if not "
              "given)", "dimensionless", "dimensionless", "a calendar year", (1800.0, 2200.0, False),
              selectable=True, calc_flag=False),
    RegisterColumn("accessible", _item("accessible", "bool", "within the personnel reach "
                                       "zone"), parse="yes_no", selectable=True, echo=True),
    RegisterColumn("valves", _item("valves", "int", "uninsulated valves on the run"),
                   parse="count", numeric=True, selectable=True),
    RegisterColumn("flanges", _item("flanges", "int", "uninsulated flanges on the run"),
                   parse="count", numeric=True, selectable=True),
    RegisterColumn("fluid", _item("fluid", "str", "what the item holds, a `[fluid.NAME]` of "
                                  "the rules; empty if not given"), parse="name",
                   selectable=True),
    # Heat tracing, freeze protection and flow (issue 20): audit/coldweather.py reads them.
    RegisterColumn("tracing", (
        ItemColumn("tracing", "str", "`none`, `electric`, `steam`; empty if not given"),
        ItemColumn("tracing_W_per_m", "float", "electric tracing's output, rating times cables "
                                               "(NaN if not electric)"),
        ItemColumn("tracer_nps", "float", "steam tracer tube size, inches (NaN if not steam)"),
        ItemColumn("tracing_steam_K", "float", "steam temperature the cell gives (NaN: the "
                                               "rules')"),
    ), selectable=True, calc_flag=False),
    _quantity("maintain", "maintain_K", "temperature the tracing or the process must hold (NaN "
              "if not given)", "degC", "kelvin", "a temperature", _NOT_NEGATIVE, selectable=True,
              echo=True),
    _quantity("flow", "flow_kg_s", "mass flow in the line (NaN if not given; 0: stagnant)",
              "kg/s", "kg/s", "a mass flow", _NOT_NEGATIVE, selectable=True, echo=True),
    RegisterColumn("schedule", _item("schedule", "str", "pipe wall schedule of ASME B36.10M "
                                     "(`40`, `80`), empty if not given"),
                   words=("40", "80"), numeric=True, selectable=True, calc_flag=False),
    _quantity("wall", "wall_m", "pipe wall thickness (NaN if not given: from the schedule)",
              "mm", "m", "a wall thickness", _POSITIVE, calc_flag=False),
)

BY_NAME = {column.name: column for column in SCHEMA}
#: Register column names, as headers, aliases and flags name them.
REGISTER_COLUMNS = tuple(BY_NAME)
#: The item table's leading columns, in order (carried-through input columns follow).
ITEM_COLUMNS = ("tag", *(c.name for c in BOOKKEEPING),
                *(i.name for column in SCHEMA[1:] for i in column.item))
#: Item-table columns held as text.
STRING_COLUMNS = tuple(i.name for i in (*SCHEMA[0].item, *BOOKKEEPING,
                                        *(i for c in SCHEMA[1:] for i in c.item))
                       if i.dtype == "str")


def item_table_markdown() -> str:
    """The item table as a Markdown table (DEVELOPERS.md holds a copy, checked by a test)."""
    rows = ["| column | type | register column | meaning |", "|---|---|---|---|"]
    for register, items in (("tag", SCHEMA[0].item), ("", BOOKKEEPING),
                            *((c.name, c.item) for c in SCHEMA[1:])):
        for i in items:
            rows.append(f"| `{i.name}` | {i.dtype} | {f'`{register}`' if register else ''} "
                        f"| {i.meaning} |")
    return "\n".join(rows)
