"""The corpus of messy registers (tests/data/registers, written by make_corpus.py): one test per
real-world shape, asserting the parsed values and reasons, and a row count on every file.

Expected values: outside diameters from ASME B36.10M via the fluids package
(fluids.piping.nearest_pipe); unit conversions from pint's own definitions (a fresh
pint.UnitRegistry); Celsius to kelvin by NIST SP 811 (2008) 4.2.1.1 (T = t + 273.15 K).
Float tolerances are round-off only (rel 1e-12) unless a comment says otherwise.
"""

import csv
import math
from pathlib import Path

import openpyxl
import pint
import pytest
from fluids.piping import nearest_pipe

from audit.io.readers import read_register
from audit.io.readers.table import ITEM_COLUMNS

CORPUS = Path(__file__).parents[2] / "data" / "registers"
UREG = pint.UnitRegistry()
ROUND_OFF = 1e-12


def od(nps):
    """Outside diameter [m] of an NPS, from fluids (ASME B36.10M)."""
    return nearest_pipe(NPS=nps, schedule="40")[2]


def kelvin(value, unit="degC"):
    return UREG.Quantity(value, unit).to("kelvin").magnitude


def metres(value, unit):
    return UREG.Quantity(value, unit).to("m").magnitude


def read(name, **kwargs):
    return read_register(CORPUS / name, **kwargs).set_index("tag", drop=False)


def approx(value):
    return pytest.approx(value, rel=ROUND_OFF)


# --- row counts ------------------------------------------------------------------------------

# header line (1-based) of each CSV: the files' title rows are known from make_corpus.py
CSV_HEADER_LINE = {"title_rows.csv": 4}
READABLE = sorted(p.name for p in CORPUS.glob("*.csv")
                  if p.name not in ("header_only.csv", "no_tag_column.csv"))


def _csv_rows_in(path):
    """Data rows of a CSV by the csv module: below the header, blank rows at the end dropped."""
    raw = path.read_bytes()
    for encoding in ("utf-8-sig", "cp1252"):
        try:
            text = raw.decode(encoding)
            break
        except UnicodeDecodeError:
            continue
    delimiter = ";" if text.splitlines()[0].count(";") > text.splitlines()[0].count(",") else ","
    rows = list(csv.reader(text.splitlines(), delimiter=delimiter))
    rows = rows[CSV_HEADER_LINE.get(path.name, 1):]
    while rows and not any(c.strip() for c in rows[-1]):
        rows.pop()
    return rows


@pytest.mark.parametrize("name", READABLE)
def test_csv_rows_in_equal_rows_out(name):
    rows_in = _csv_rows_in(CORPUS / name)
    table = read_register(CORPUS / name)
    assert len(table) == len(rows_in)
    assert list(table["tag"]) == [r[0].strip() for r in rows_in]  # tag is column 1 in each
    header_line = CSV_HEADER_LINE.get(name, 1)
    assert list(table["source"]) == [f"{name}::{header_line + 1 + i}" for i in range(len(rows_in))]
    assert list(table.index) == list(range(len(table)))


@pytest.mark.parametrize("name, header_rows", [
    ("merged_headers.xlsx", {"Register": 4}),
    ("multi_sheet.xlsx", {"Lines": 1, "Vessels": 1}),  # the Notes sheet has no header row
])
def test_xlsx_rows_in_equal_rows_out(name, header_rows):
    # Rows in by openpyxl (an independent reader): rows below the header, blank rows at the
    # end dropped (the formatted blank rows of multi_sheet.xlsx:Lines among them).
    book = openpyxl.load_workbook(CORPUS / name, read_only=True, data_only=True)
    table = read_register(CORPUS / name)
    expected_sources = []
    for sheet, header_row in header_rows.items():
        rows = list(book[sheet].iter_rows(min_row=header_row + 1, values_only=True))
        while rows and all(v in (None, "") for v in rows[-1]):
            rows.pop()
        out = table[table["source"].str.startswith(f"{name}:{sheet}:")]
        assert list(out["tag"]) == [r[0] for r in rows]
        expected_sources += [f"{name}:{sheet}:{header_row + 1 + i}" for i in range(len(rows))]
    assert list(table["source"]) == expected_sources  # every row once, in order, nothing else


def test_columns_and_types_follow_developers_md():
    table = read_register(CORPUS / "other_columns.csv")
    assert tuple(table.columns[:len(ITEM_COLUMNS)]) == ITEM_COLUMNS
    assert str(table["tag"].dtype) == "str" and table["od_m"].dtype == float
    assert table["accessible"].dtype == bool and table["temp_is_ambient"].dtype == bool
    assert table["valves"].dtype == "int64" and table["flanges"].dtype == "int64"
    assert isinstance(table.loc[0, "layer_materials"], tuple)
    assert [c for c in table.columns if c.startswith("raw:")] == [
        f"raw:{c}" for c in ("tag", "nps", "length", "temp", "layers", "jacket", "location",
                             "ambient", "wind", "rh", "accessible", "condition", "damaged",
                             "service", "material", "area_code", "valves", "flanges", "hours")]


# --- one test per shape ----------------------------------------------------------------------

def test_semicolon_and_decimal_comma():
    t = read("semicolon_decimal_comma.csv")
    assert list(t["status"]) == ["ok"] * 3
    assert t.loc["K-001", "length_m"] == 12.5 and t.loc["K-002", "length_m"] == 3.25
    assert t.loc["K-001", "temp_K"] == approx(kelvin(180.5))
    assert t.loc["K-003", "temp_K"] == approx(kelvin(-20.5))
    assert t.loc["K-002", "emissivity"] == 0.85 and t.loc["K-001", "jacket"] == "aluminium"
    assert t.loc["K-002", "od_m"] == approx(od(1.5)) and t.loc["K-003", "nps"] == "3"
    assert t.loc["K-003", "layer_thicknesses_m"] == (0.04, 0.04)
    assert t.loc["K-002", "raw:length"] == "3,25"  # the raw cell as written
    assert t.attrs["register"]["sheets"][0]["notes"] == [
        "read as UTF-8 text, separator ';', decimal comma"]


def test_windows_1252():
    t = read("windows1252.csv")
    assert t.loc["W-010", "Remarks"] == "Pumpe – Zulauf" and t.loc["W-011", "Remarks"] == "Ø 60"
    assert t.loc["W-010", "temp_K"] == approx(kelvin(120))
    assert t.loc["W-010", "od_m"] == approx(od(3))
    assert t.loc["W-011", "layer_thicknesses_m"] == (0.04,)
    assert t.attrs["register"]["sheets"][0]["notes"] == [
        "read as Windows-1252 text, separator ',', decimal point"]


def test_utf8_bom():
    t = read("bom_utf8.csv")
    assert "raw:tag" in t.columns and list(t["tag"]) == ["B-1", "B-2"]
    assert t.loc["B-2", "layer_materials"] == ("calcium-silicate", "mineral-wool")
    assert t.loc["B-2", "layer_thicknesses_m"] == (0.05, 0.05)
    assert t.loc["B-1", "od_m"] == approx(od(6))
    assert t.attrs["register"]["sheets"][0]["notes"][0].startswith("read as UTF-8 with BOM")


def test_title_rows_blank_rows_inside_and_at_the_end():
    t = read_register(CORPUS / "title_rows.csv")
    assert list(t["source"]) == ["title_rows.csv::5", "title_rows.csv::6", "title_rows.csv::7"]
    assert list(t["status"]) == ["ok", "rejected", "ok"]
    assert t.loc[1, "reason"] == "row is blank"
    assert t.loc[2, "temp_K"] == approx(kelvin(160)) and t.loc[2, "nps"] == "4"


def test_mixed_units_in_cells():
    t = read("mixed_units.csv")
    assert list(t["status"]) == ["ok"] * 5
    for tag in ("M-1", "M-2", "M-3"):  # 4.5 in, 114.3 mm, 11.43 cm: one outside diameter
        assert t.loc[tag, "od_m"] == pytest.approx(0.1143, rel=1e-12)
    assert t.loc["M-1", "length_m"] == approx(metres(30, "ft"))
    assert t.loc["M-1", "temp_K"] == approx(kelvin(300, "degF"))
    assert t.loc["M-2", "temp_K"] == approx(kelvin(65))
    assert t.loc["M-3", "temp_K"] == approx(kelvin(120))
    assert t.loc["M-4", "temp_K"] == 400.0
    assert t.loc["M-1", "layer_thicknesses_m"] == (approx(metres(2, "inch")),)
    assert t.loc["M-3", "layer_thicknesses_m"] == (approx(metres(1.5, "inch")),)
    assert t.loc["M-1", "wind_m_s"] == approx(UREG.Quantity(5, "km/h").to("m/s").magnitude)
    assert t.loc["M-1", "ambient_K"] == approx(kelvin(25))
    assert t.loc["M-5", "warnings"] == ('od: "60.3" has no unit; mm assumed; length: "5" has no '
                                        'unit; m assumed; temp: "150" has no unit; degC assumed')
    assert t.loc["M-1", "warnings"] == ""


def test_tba_amb_and_normal_max_temperatures():
    t = read("temperatures.csv")
    assert t.loc["A-1", "reason"] == ('temp: "TBA" is not a temperature; expected a number with '
                                      'an optional unit (degC if none), AMB, or normal/max')
    for tag in ("A-2", "A-3"):
        assert t.loc[tag, "status"] == "ok" and t.loc[tag, "temp_is_ambient"]
        assert math.isnan(t.loc[tag, "temp_K"]) and t.loc[tag, "layer_materials"] == ()
    assert (t.loc["A-4", "temp_K"], t.loc["A-4", "temp_max_K"]) == (approx(kelvin(120)),
                                                                    approx(kelvin(150)))
    # the column mixes cells with units (250/300 F) and without: the assumption is warned
    assert t.loc["A-4", "warnings"] == ('temp: "120/150" normal/max given; normal used; '
                                        'temp: "120/150" has no unit; degC assumed')
    assert t.loc["A-5", "temp_K"] == approx(kelvin(250, "degF"))
    assert t.loc["A-5", "temp_max_K"] == approx(kelvin(300, "degF"))
    assert t.loc["A-6", "reason"] == ('temp: "150/120" has a maximum below the normal '
                                      'temperature; expected normal/max')
    assert t.loc["A-7", "reason"] == ('temp: "-300" is below absolute zero; expected a '
                                      'temperature above -273.15 degC')
    assert t.loc["A-8", "reason"].startswith("temp: empty; expected the operating temperature")
    assert t.loc["A-9", "temp_K"] == approx(kelvin(-196))
    assert list(t["status"]) == ["rejected", "ok", "ok", "ok", "ok", "rejected", "rejected",
                                 "rejected", "ok"]


def test_thickness_forms_layers_and_bare():
    t = read("thickness_forms.csv")
    expect = {
        "H-1": (("calcium-silicate", "mineral-wool"), (0.05, metres(2, "inch"))),
        "H-2": (("mineral-wool",), (0.05,)),
        "H-3": (("mineral-wool",) * 2, (0.04, 0.04)),
        "H-4": ((), ()),
        "H-7": (("mineral-wool",) * 2, (0.05, 0.05)),
        "H-8": (("calcium-silicate",) * 2, (0.05, 0.04)),
        "H-9": (("mineral-wool",) * 2, (metres(2, "inch"),) * 2),
        "H-10": ((), ()),   # condition missing: bare
        "H-11": ((), ()),   # insulation "None": bare
    }
    for tag, (materials, thickness) in expect.items():
        assert t.loc[tag, "status"] == "ok", tag
        assert t.loc[tag, "layer_materials"] == materials
        assert t.loc[tag, "layer_thicknesses_m"] == pytest.approx(thickness, rel=ROUND_OFF)
    assert t.loc["H-5", "reason"] == ("layers: empty; expected insulation layers "
                                      "(e.g. mineral-wool 50mm), or none for bare metal")
    assert t.loc["H-6", "reason"] == ("thickness: empty; expected the insulation thickness "
                                      "(mm if no unit)")
    assert t.loc["H-12", "reason"].startswith('layers: "mineral-wool fifty" is not a list of '
                                              'layers; expected')
    assert t.loc["H-10", "condition"] == "missing"


def test_duplicate_tags_extra_columns_and_shadowed_headers():
    t = read_register(CORPUS / "duplicates_extras.csv")
    # A tag on differing rows is audited on each and warned; the fifth row repeats the third
    # in every recognised cell (its carried-through cells differ), so it is rejected: audited
    # twice it would be ordered and counted twice.
    assert list(t["status"]) == ["ok"] * 4 + ["rejected"]
    dup = 'tag: "D-1" is duplicated (2 rows; first at duplicates_extras.csv::2)'
    assert list(t["warnings"]) == [dup, "", dup, "", ""]
    assert t["reason"].iloc[4] == (
        'tag: "D-1" is a duplicate of row duplicates_extras.csv::4 (every recognised cell '
        "equal); expected one row per item")
    assert list(t["temp_K"]) == [approx(kelvin(150))] * 2 + [approx(kelvin(160))] * 3  # op temp
    assert list(t["Design Temp"]) == ["200"] * 5
    assert list(t["P&ID"]) == ["PID-0301"] * 2 + ["PID-0302"] * 3
    assert list(t["extra:Status"]) == ["in service", "in service", "spare", "", ""]
    assert list(t["column 9"]) == ["note a", "", "note b", "", ""]


def test_pipe_size_forms():
    t = read("sizes.csv")
    one_and_a_half = ["S-2", "S-3", "S-4", "S-5", "S-7", "S-8"]
    for tag in one_and_a_half:
        assert (t.loc[tag, "nps"], t.loc[tag, "od_m"]) == ("1-1/2", approx(od(1.5))), tag
    assert (t.loc["S-1", "nps"], t.loc["S-1", "od_m"]) == ("4", approx(od(4)))
    assert (t.loc["S-6", "nps"], t.loc["S-6", "od_m"]) == ("3/4", approx(od(0.75)))
    assert (t.loc["S-9", "nps"], t.loc["S-12", "nps"]) == ("4", "24")
    assert t.loc["S-12", "od_m"] == approx(od(24))
    for tag, raw in (("S-10", "7"), ("S-11", "2026-03-04"), ("S-13", "100 mm")):
        assert t.loc[tag, "reason"] == (
            f'nps: "{raw}" is not a standard pipe size; expected an NPS of ASME B36.10M '
            '(1/8 to 48, e.g. 4, 1-1/2") or a DN (DN6 to DN1200)')


def test_dn_header_reads_bare_numbers_as_dn():
    t = read("sizes_dn_header.csv")
    assert (t.loc["N-1", "nps"], t.loc["N-2", "nps"]) == ("4", "1-1/2")
    assert t.loc["N-1", "od_m"] == approx(od(4))
    assert t.loc["N-3", "status"] == "rejected"  # there is no DN 4


def test_vessels_spheres_and_flat_surfaces():
    t = read("vessels_flat.csv")
    v1 = t.loc["V-1"]
    assert (v1["shape"], v1["od_m"], v1["length_m"], v1["heads"], v1["orientation"]) == \
        ("vertical-vessel", 2.4, 8.5, "hemispherical", "vertical")
    assert (t.loc["V-2", "shape"], t.loc["V-2", "heads"], t.loc["V-2", "orientation"]) == \
        ("horizontal-vessel", "ellipsoidal", "horizontal")  # contract default heads
    assert t.loc["V-3", "reason"] == ('orientation: "horizontal" contradicts shape '
                                      'vertical-vessel; expected vertical or empty')
    assert (t.loc["SP-4", "status"], t.loc["SP-4", "od_m"]) == ("ok", 12.0)
    assert (t.loc["F-5", "area_m2"], t.loc["F-5", "orientation"]) == (12.5, "up")
    assert t.loc["F-6", "orientation"] == "vertical"
    assert "orientation: empty for a flat item; vertical assumed" in t.loc["F-6", "warnings"]
    assert t.loc["F-7", "reason"] == "area: empty; expected the surface area (m2)"
    assert t.loc["P-8", "reason"] == ("orientation: up/down apply to flat items only; "
                                      "expected horizontal or vertical")
    assert t.loc["X-9", "reason"] == ('shape: "tank" is not recognised; expected one of pipe, '
                                      'vertical-vessel, horizontal-vessel, sphere, flat')
    assert t.loc["P-10", "status"] == "ok"  # an area on a pipe does not apply: warned only
    assert 'area: "U-300" is not an area' in t.loc["P-10", "warnings"]
    assert t.loc["F-11", "status"] == "rejected"
    assert t.loc["P-10", "heads"] == "none"


def test_other_columns_good_and_bad():
    t = read("other_columns.csv")
    o1 = t.loc["O-1"]
    assert (o1["jacket"], o1["location"], o1["accessible"], o1["condition"], o1["service"],
            o1["material"], o1["area_code"], o1["valves"], o1["flanges"]) == \
        ("aluminium", "outdoor", True, "damaged", "personnel", "carbon-steel", "U-300", 2, 4)
    assert (o1["ambient_K"], o1["wind_m_s"], o1["rh_pct"], o1["damaged_pct"], o1["hours_h"]) == \
        (approx(kelvin(30)), 2.5, 70.0, 25.0, 8000.0)
    o2 = t.loc["O-2"]
    assert (o2["jacket"], o2["emissivity"], o2["accessible"], o2["service"], o2["hours_h"]) == \
        ("", 0.9, False, "heat-conservation", 8760.0)
    assert t.loc["O-3", "ambient_K"] == approx(kelvin(20, "degF"))
    assert t.loc["O-3", "reason"].split("; expected")[0] == 'condition: "rotten" is not recognised'
    for fragment in ('wind: "-1" is out of range', 'rh: "120" is out of range',
                     'damaged: "150" is out of range', 'hours: "9000" is out of range',
                     'accessible: "maybe" is not yes or no', 'valves: "-1" is not a count',
                     'flanges: "2.5" is not a count'):
        assert fragment in t.loc["O-3", "reason"]
    assert t.loc["O-4", "reason"] == ('jacket: "1.5" is out of range; expected an emissivity '
                                      'above 0 and at most 1')
    assert "damaged: empty for a damaged item" in t.loc["O-4", "warnings"]


def test_merged_header_cells_in_xlsx():
    t = read("merged_headers.xlsx")
    assert list(t["source"]) == [f"merged_headers.xlsx:Register:{r}" for r in (5, 6, 7, 8)]
    p301 = t.loc["P-301"]
    assert (p301["nps"], p301["od_m"], p301["temp_K"], p301["length_m"]) == \
        ("4", approx(od(4)), approx(kelvin(180)), 12.5)
    # "Material" under the merged "Insulation" group is the insulation, not the metal
    assert (p301["layer_materials"], p301["layer_thicknesses_m"], p301["material"]) == \
        (("calcium-silicate",), (0.05,), "")
    assert (p301["valves"], p301["flanges"]) == (2, 4)
    assert t.loc["P-302", "layer_thicknesses_m"] == (0.04, 0.04)
    assert t.loc["P-302", "temp_max_K"] == approx(kelvin(150))
    assert t.loc["P-303", "temp_is_ambient"] and t.loc["P-303", "layer_materials"] == ()
    assert t.loc["P-304", "reason"].startswith('temp: "TBA" is not a temperature')


def test_multiple_sheets_units_in_headers_and_stored_formula_values():
    t = read("multi_sheet.xlsx")
    assert list(t["tag"]) == ["L-101", "L-102", "L-103", "V-201", "V-202", "S-203", "F-204"]
    assert t.attrs["register"]["skipped"] == [
        "multi_sheet.xlsx:Notes: skipped, no header row found in the first 30 rows"]
    l101 = t.loc["L-101"]
    assert l101["od_m"] == approx(metres(4.5, "inch"))
    assert l101["length_m"] == approx(metres(100, "ft"))
    assert l101["temp_K"] == approx(kelvin(350, "degF"))
    assert l101["layer_thicknesses_m"] == (approx(metres(2, "inch")), approx(metres(1, "inch")))
    assert (l101["accessible"], l101["hours_h"], l101["jacket"]) == (True, 8000.0, "aluminium")
    # The stored result (40) is read; the formula (=20*3) is never evaluated.
    assert t.loc["L-103", "length_m"] == approx(metres(40, "ft"))
    assert t.loc["L-103", "jacket"] == "stainless-steel"
    assert t.loc["V-201", "layer_thicknesses_m"] == (approx(metres(3, "inch")),)
    assert t.loc["V-201", "temp_K"] == approx(kelvin(150))
    assert t.loc["V-202", "heads"] == "ellipsoidal"
    assert (t.loc["S-203", "od_m"], t.loc["S-203", "temp_K"]) == (12.0, approx(kelvin(-40)))
    assert t.loc["F-204", "area_m2"] == 14.0
    assert list(t["status"]) == ["ok"] * 7
    assert len(read_register(CORPUS / "multi_sheet.xlsx", sheets=["Vessels"])) == 4


def test_several_files_concatenate_in_order():
    names = ["bom_utf8.csv", "merged_headers.xlsx", "windows1252.csv"]
    t = read_register([CORPUS / n for n in names])
    assert list(t["tag"]) == ["B-1", "B-2", "P-301", "P-302", "P-303", "P-304", "W-010", "W-011"]
    assert list(t.index) == list(range(8))
    assert list(t["Remarks"]) == [""] * 6 + ["Pumpe – Zulauf", "Ø 60"]
    assert t.loc[0, "raw:thickness"] == "" and t.loc[2, "raw:thickness"] == "50"
