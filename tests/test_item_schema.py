"""The item-table schema (audit/schema.py) and the modules that read it agree.

No physics here: these tests hold the reader, the selector, ``calc`` and DEVELOPERS.md to the
one declaration of the register's columns.
"""

import argparse
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from audit import calc, schema
from audit.io.readers import read_rows
from audit.io.readers.headers import Lookup, load_aliases, match_headers
from audit.rules.selector import parse_selector

ROOT = Path(__file__).resolve().parents[1]

#: A valid cell for every register column, in register notation (the demo plant's style).
GOOD_CELLS = {
    "tag": "P-101", "shape": "pipe", "nps": "4", "od": "", "length": "12 m", "area": "3",
    "heads": "", "orientation": "horizontal", "temp": "180", "layers": "mineral-wool 50",
    "insulation": "", "thickness": "", "jacket": "aluminium-oxidised", "emissivity": "",
    "location": "outdoor", "service": "heat-conservation", "material": "carbon-steel",
    "area_code": "U-200", "condition": "damaged", "ambient": "15", "wind": "2", "rh": "70",
    "surroundings": "10", "damaged": "5", "hours": "8000", "accessible": "yes", "valves": "2",
    "flanges": "4", "fluid": "steam", "elevation": "6.5 m", "install_year": "1978",
    "tracing": "electric 2x15 W/m", "maintain": "40", "flow": "2.5", "schedule": "80",
    "wall": "6 mm",
}
#: numpy kinds each declared dtype may be held as in the item table.
DTYPE_KINDS = {"str": "OU", "float": "f", "bool": "b", "int": "iu"}


def test_schema_entries_are_consistent():
    names = [c.name for c in schema.SCHEMA]
    assert len(names) == len(set(names)), "a register column declared twice"
    assert len(schema.ITEM_COLUMNS) == len(set(schema.ITEM_COLUMNS))
    for column in schema.SCHEMA:
        assert column.parse in schema.PARSERS, column.name
        assert (column.default_unit is None) == (column.si_unit is None), column.name
        if column.si_unit or column.parse == "count":
            assert column.numeric, f"{column.name} holds numbers: decimal comma must apply"
        if column.parse == "quantity":
            assert column.what and column.si_unit, column.name
        if column.parse != "special":
            assert len(column.item) == 1, f"a plain column writes one item column: {column.name}"
    assert set(GOOD_CELLS) == set(schema.REGISTER_COLUMNS)


def test_every_register_column_is_matched_by_the_reader():
    header_map = match_headers(list(schema.REGISTER_COLUMNS),
                               Lookup.from_aliases(load_aliases()))
    assert list(header_map.columns) == list(schema.REGISTER_COLUMNS)
    assert not header_map.extras


def test_reader_writes_the_declared_columns_and_dtypes():
    table = read_rows(list(GOOD_CELLS), [list(GOOD_CELLS.values())], name="schema")
    assert table.loc[0, "status"] == "ok", table.loc[0, "reason"]
    assert tuple(table.columns[:len(schema.ITEM_COLUMNS)]) == schema.ITEM_COLUMNS
    declared = {i.name: i.dtype for c in schema.SCHEMA for i in c.item}
    declared.update({i.name: i.dtype for i in schema.BOOKKEEPING})
    for name, dtype in declared.items():
        value = table.loc[0, name]
        if dtype.startswith("tuple"):
            assert isinstance(value, tuple), name
        else:
            assert np.asarray(value).dtype.kind in DTYPE_KINDS[dtype], (name, type(value))
    # Every column given on the row was read into the item table: nothing left as default.
    assert table.loc[0, "hours_h"] == 8000.0 and table.loc[0, "valves"] == 2
    assert table.loc[0, "area_code"] == "U-200" and bool(table.loc[0, "accessible"])


@pytest.mark.parametrize("column", [c for c in schema.SCHEMA if c.selectable],
                         ids=lambda c: c.name)
def test_every_selectable_column_selects_the_row_by_its_own_value(column):
    table = read_rows(list(GOOD_CELLS), [list(GOOD_CELLS.values())], name="schema")
    kind = column.select_kind
    if kind == "text":
        own, other = f"'{table.loc[0, column.item[0].name]}'", "'no-such-value'"
    elif kind == "bool":
        own, other = "yes", "no"
    else:  # the cell as written: a selector's bare number takes the register's default unit
        own = GOOD_CELLS[column.name] if column.name != "od" else "114.3"  # NPS 4's od [mm]
        other = "1e6" if column.name != "nps" else "48"
    assert parse_selector(f"{column.name} == {own}").mask(table).tolist() == [True]
    assert parse_selector(f"{column.name} == {other}").mask(table).tolist() == [False]


def test_non_selectable_columns_are_refused():
    for column in schema.SCHEMA:
        if not column.selectable:
            with pytest.raises(ValueError, match="expected a column name"):
                parse_selector(f"{column.name} == 1")


def test_calc_flags_are_schema_columns_with_a_flag_each():
    assert set(calc.FLAG_COLUMNS) <= set(schema.REGISTER_COLUMNS)
    assert calc.FLAG_COLUMNS == tuple(c.name for c in schema.SCHEMA if c.calc_flag)
    parser = argparse.ArgumentParser()
    calc.add_calc_arguments(parser)
    flags = {a.dest for a in parser._actions}
    assert set(calc.FLAG_COLUMNS) <= flags


def test_developers_guide_holds_the_schema_table():
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    assert schema.item_table_markdown() in guide, \
        "DEVELOPERS.md's item table differs from audit/schema.py: paste item_table_markdown()"


# One new plain column added to SCHEMA, and nothing else: headers, reader, selector and calc.
NEW_ENTRY = '''    RegisterColumn("paint_system", _item("paint_system", "str", "coating under the insulation"),
                   parse="name", selectable=True),
'''
PROBE = r'''
import json, sys, types
from pathlib import Path
source = Path(sys.argv[1]).read_text(encoding="utf-8")
marker = ")\n\nBY_NAME = "
assert source.count(marker) == 1
module = types.ModuleType("audit.schema")
module.__file__ = sys.argv[1]
sys.modules["audit.schema"] = module
exec(compile(source.replace(marker, sys.argv[2] + marker), sys.argv[1], "exec"), module.__dict__)
import argparse
from audit.io.readers import read_rows
from audit.rules.selector import parse_selector
from audit import calc
table = read_rows(["tag", "temp", "layers", "nps", "length", "Paint System"],
                  [["A", "100", "none", "2", "1", "Epoxy Phenolic"],
                   ["B", "100", "none", "2", "1", "zinc"]], name="probe")
mask = parse_selector("paint_system == epoxy-phenolic").mask(table)
parser = argparse.ArgumentParser()
calc.add_calc_arguments(parser)
flags = {a.dest: a.option_strings for a in parser._actions}
print(json.dumps({"paint": list(table["paint_system"]), "mask": [bool(m) for m in mask],
                  "status": list(table["status"]), "raw": "raw:paint_system" in table.columns,
                  "flag": flags.get("paint_system")}))
'''


def test_a_column_declared_in_the_schema_alone_reaches_reader_selector_and_calc():
    # A fresh interpreter: every module derives its lists from the amended schema on import.
    result = subprocess.run([sys.executable, "-c", PROBE, str(ROOT / "audit" / "schema.py"),
                             NEW_ENTRY], capture_output=True, text=True, cwd=ROOT, check=False)
    assert result.returncode == 0, result.stderr
    got = json.loads(result.stdout.strip().splitlines()[-1])
    assert got == {"paint": ["epoxy-phenolic", "zinc"], "mask": [True, False],
                   "status": ["ok", "ok"], "raw": True,
                   "flag": ["--paint-system"]}  # spelt like the command line's other flags


def test_elevation_and_install_year_are_read_with_units_and_bounds():
    """Planning columns: a height with its unit, a calendar year; out-of-range years rejected."""
    table = read_rows(["tag", "elevation [ft]", "install_year"],
                      [["A", "10", "1978"], ["B", "", ""], ["C", "3", "1066"]], name="planning")
    assert table.loc[0, "elevation_m"] == pytest.approx(3.048)  # 10 ft = 3.048 m exactly (NIST)
    assert table.loc[0, "install_year"] == 1978
    assert np.isnan(table.loc[1, "elevation_m"]) and np.isnan(table.loc[1, "install_year"])
    assert table.loc[2, "status"] == "rejected" and "install_year" in table.loc[2, "reason"]
