"""The item table builder (audit/io/readers/table.py) and read_register's row accounting."""

import csv
import io
import math

import openpyxl
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from audit.io.readers import cells, read_register


def _write_csv(path, rows):
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerows(rows)
    path.write_text(buffer.getvalue(), encoding="utf-8")


def test_each_distinct_cell_text_is_parsed_once(tmp_path):
    path = tmp_path / "repeat.csv"
    temps = ["150", "300 F", "AMB"]
    _write_csv(path, [["tag", "nps", "length", "temp", "layers"]] +
               [[f"R-{i}", "2", "5", temps[i % 3], "none"] for i in range(3000)])
    cells.temperature.cache_clear()
    table = read_register(path)
    assert len(table) == 3000 and (table["status"] == "ok").all()
    assert cells.temperature.cache_info().misses == 3  # one parse per distinct text
    assert cells.temperature.cache_info().hits == 0


CELL = st.one_of(st.sampled_from(["", " ", "2", "TBA", "AMB", "1-1/2", "mineral-wool 50mm",
                                  "none", "x;y", '"q"', "DN50", "300 F"]),
                 st.text(alphabet=st.characters(blacklist_categories=("Cs", "Cc")), max_size=8))


@settings(max_examples=40, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(rows=st.lists(st.lists(CELL, min_size=5, max_size=6), min_size=1, max_size=25))
def test_every_row_comes_out_once_in_order(tmp_path, rows):
    path = tmp_path / "random.csv"
    _write_csv(path, [["tag", "nps", "length", "temp", "layers", "note"]] + rows)
    # rows in: what the csv module reads back below the header, blank rows at the end dropped
    written = list(csv.reader(io.StringIO(path.read_text(encoding="utf-8"))))[1:]
    while written and not any(c.strip() for c in written[-1]):
        written.pop()
    if not written:
        return  # header only: a whole-file error, tested elsewhere
    table = read_register(path)
    assert len(table) == len(written)
    assert list(table["raw:tag"]) == [r[0] if r else "" for r in written]
    assert set(table["status"]) <= {"ok", "rejected"}
    rejected = table["status"] == "rejected"
    assert (table.loc[rejected, "reason"] != "").all()
    assert (table.loc[~rejected, "reason"] == "").all()
    assert table["layer_materials"].map(len).equals(table["layer_thicknesses_m"].map(len))


def test_ok_rows_have_what_the_engine_needs():
    # The corpus' ok rows carry a size for sized shapes, a length where needed and a temperature
    corpus = __import__("pathlib").Path(__file__).parents[2] / "data" / "registers"
    table = read_register([corpus / n for n in ("mixed_units.csv", "vessels_flat.csv",
                                                "temperatures.csv", "multi_sheet.xlsx")])
    ok = table[table["status"] == "ok"]
    sized = ok["shape"].isin(["pipe", "vertical-vessel", "horizontal-vessel", "sphere"])
    assert (ok.loc[sized, "od_m"] > 0).all()
    assert (ok.loc[ok["shape"] == "flat", "area_m2"] > 0).all()
    assert (ok["temp_K"].notna() | ok["temp_is_ambient"]).all()


def test_merged_data_cells_are_filled_and_an_empty_sheet_is_zero_rows(tmp_path):
    path = tmp_path / "merged_data.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Lines"
    sheet.append(["tag", "nps", "length", "temp", "layers", "area code"])
    sheet.append(["M-1", 2, 5, 100, "none", "U-100"])
    sheet.append(["M-2", 2, 5, 100, "none", None])
    sheet.merge_cells("F2:F3")
    empty = book.create_sheet("Spare")
    empty.append(["tag", "nps", "temp"])
    book.save(path)
    table = read_register(path)
    assert list(table["area_code"]) == ["U-100", "U-100"]
    assert [s["rows"] for s in table.attrs["register"]["sheets"]] == [2, 0]


def test_length_irrelevant_for_spheres_and_flat(tmp_path):
    path = tmp_path / "shapes.csv"
    _write_csv(path, [["tag", "shape", "od", "area", "temp", "layers"],
                      ["S-1", "sphere", "5000", "", "20", "none"],
                      ["F-1", "flat", "", "2", "20", "none"]])
    table = read_register(path)
    assert list(table["status"]) == ["ok", "ok"]
    assert math.isnan(table.loc[0, "length_m"]) and table.loc[1, "area_m2"] == 2.0


def test_od_and_nps_disagreeing_warns_and_uses_od(tmp_path):
    path = tmp_path / "both.csv"
    _write_csv(path, [["tag", "nps", "od [mm]", "length", "temp", "layers"],
                      ["B-1", "4", "114.3", "1", "20", "none"],
                      ["B-2", "4", "168.3", "1", "20", "none"]])
    table = read_register(path)
    assert list(table["od_m"]) == [pytest.approx(0.1143), pytest.approx(0.1683)]
    assert table.loc[0, "warnings"] == ""
    assert table.loc[1, "warnings"] == ("od: differs from the nominal size's outside diameter; "
                                        "od used")


def test_tiny_od_is_flagged(tmp_path):
    path = tmp_path / "tiny.csv"
    _write_csv(path, [["tag", "diameter", "length", "temp", "layers"],
                      ["T-1", "4", "1", "20", "none"], ["T-2", "6 in", "1", "20", "none"]])
    table = read_register(path)
    assert list(table["status"]) == ["ok", "ok"]
    assert table.loc[0, "od_m"] == 0.004  # read as written, never changed
    assert table.loc[0, "warnings"] == (
        'od: "4" has no unit; mm assumed; od: "4" is smaller than any steel pipe (10.3 mm); '
        'an NPS in inches in the od column? read as written')
    assert "smaller than any" not in table.loc[1, "warnings"]


def test_layers_win_over_insulation_and_thickness(tmp_path):
    path = tmp_path / "both.csv"
    _write_csv(path, [["tag", "nps", "length", "temp", "layers", "insulation", "thickness"],
                      ["L-1", "2", "1", "100", "mineral-wool 50mm", "foam", "20"]])
    table = read_register(path)
    assert table.loc[0, "layer_materials"] == ("mineral-wool",)
    assert table.loc[0, "warnings"] == "insulation/thickness: ignored because layers is given"


def test_custom_aliases(tmp_path):
    path = tmp_path / "plant.csv"
    _write_csv(path, [["Kennung", "NW", "Laenge", "Betriebstemp", "Isolierung"],
                      ["K-1", "50", "3", "90", "none"]])
    aliases = {"tag": ["kennung"], "nps": ["nw [DN]"], "length": ["laenge"],
               "temp": ["betriebstemp"], "layers": ["isolierung"]}
    table = read_register(path, aliases=aliases)
    assert (table.loc[0, "status"], table.loc[0, "nps"]) == ("ok", "2")


def test_surroundings_column_reads_temperatures_with_units_and_aliases(tmp_path):
    # Contract, register columns added: surroundings, degC by default; a cell or header unit
    # wins; a cell that is not a temperature rejects its row naming the column.
    path = tmp_path / "sur.csv"
    _write_csv(path, [["tag", "nps", "length", "temp", "layers", "surroundings"],
                      ["S-1", "2", "5", "150", "none", "-10"],
                      ["S-2", "2", "5", "150", "none", "50 F"],
                      ["S-3", "2", "5", "150", "none", ""],
                      ["S-4", "2", "5", "150", "none", "sky"]])
    table = read_register(path).set_index("tag")
    assert table.loc["S-1", "surroundings_K"] == pytest.approx(263.15)
    assert table.loc["S-2", "surroundings_K"] == pytest.approx((50 - 32) / 1.8 + 273.15)
    assert math.isnan(table.loc["S-3", "surroundings_K"])
    assert table.loc["S-4", "status"] == "rejected"
    assert table.loc["S-4", "reason"].startswith('surroundings: "sky" is not a temperature')
    # The shipped alias table knows a plant's other words for it, with a header unit.
    path = tmp_path / "alias.csv"
    _write_csv(path, [["tag", "nps", "length", "temp", "layers", "Mean radiant temperature [degF]"],
                      ["S-5", "2", "5", "150", "none", "32"]])
    assert read_register(path)["surroundings_K"][0] == pytest.approx(273.15)
