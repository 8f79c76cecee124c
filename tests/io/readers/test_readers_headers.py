"""Header matching and the alias table (audit/io/readers/headers.py, rules/aliases.toml)."""

import pytest

from audit.errors import RuleError
from audit.io.readers.headers import (COLUMNS, Lookup, load_aliases, match_headers,
                                      merge_aliases, normalise_name, shipped_aliases_path,
                                      split_unit)


@pytest.fixture(scope="module")
def lookup():
    return Lookup.from_aliases(load_aliases())


def test_shipped_alias_table_is_found_and_has_the_contract_aliases():
    path = shipped_aliases_path()
    assert path.name == "aliases.toml" and path.read_text().startswith("# Column aliases")
    aliases = load_aliases()
    assert set(aliases) <= set(COLUMNS)
    assert {"line no", "line number", "line", "item", "equipment tag"} <= set(aliases["tag"])
    assert {"size", "pipe size", "nominal size"} <= set(aliases["nps"])
    assert {"op temp", "operating temperature", "design temp"} <= set(aliases["temp"])
    assert "insul thk" in aliases["thickness"]


@pytest.mark.parametrize("header, name, unit", [
    ("temp [degF]", "temp", "degF"), ("Op Temp (°C)", "Op Temp", "degC"),
    ("Insul Thk [in]", "Insul Thk", "in"), ("Temp (normal/max)", "Temp", None),
    ("Size [DN]", "Size", "DN"), ("Area [m²]", "Area", "m**2"), ("Line No.", "Line No.", None),
])
def test_split_unit(header, name, unit):
    assert split_unit(header) == (name, unit)


def test_normalise_name():
    assert normalise_name("Line_No.") == normalise_name("line-no") == normalise_name("LINE NO")


@pytest.mark.parametrize("header, column, unit", [
    ("Tag", "tag", None), ("LINE_NUMBER", "tag", None), ("Equipment-Tag", "tag", None),
    ("Op Temp [degF]", "temp", "degF"), ("insul thk (in)", "thickness", "in"),
    ("DN", "nps", "DN"), ("Size [DN]", "nps", "DN"), ("area code", "area_code", None),
    ("Remarks", None, None),
])
def test_column_of(lookup, header, column, unit):
    hit = lookup.column_of(header)
    assert (hit[0], hit[2]) == (column, unit) if column else hit is None


def test_own_name_then_alias_order_wins(lookup):
    header_map = match_headers(["Design Temp", "Line No", "Op Temp", "Temp"], lookup)
    assert header_map.columns == {"tag": 1, "temp": 3}
    assert [h for _, h in header_map.extras] == ["Design Temp", "Op Temp"]
    assert ("Op Temp", "temp") in header_map.shadowed


def test_group_header_over_a_sub_header(lookup):
    header_map = match_headers(["Tag", "Material", "Thk [mm]", "Material"], lookup,
                               groups=["", "Insulation", "Insulation", ""])
    assert header_map.columns == {"tag": 0, "insulation": 1, "thickness": 2, "material": 3}
    assert header_map.units["thickness"] == "mm"


def test_alias_file_errors_name_the_file(tmp_path):
    bad = tmp_path / "aliases.toml"
    bad.write_text('[alias]\nlenght = ["len"]\n')
    with pytest.raises(RuleError, match="unknown register column 'lenght'") as info:
        load_aliases(bad)
    assert info.value.file == str(bad)
    bad.write_text('[alias]\ntag = "line"\n')
    with pytest.raises(RuleError, match="list of strings"):
        load_aliases(bad)
    bad.write_text('[alias\n')
    with pytest.raises(RuleError, match="not valid TOML"):
        load_aliases(bad)


def test_plant_alias_file_extends_the_shipped_table(tmp_path):
    plant = tmp_path / "aliases.toml"
    plant.write_text('[alias]\ntag = ["kks", "line no"]\n')
    merged = merge_aliases(load_aliases(), load_aliases(plant))
    assert merged["tag"][:2] == ["line no", "line number"] and merged["tag"][-1] == "kks"
    assert merged["tag"].count("line no") == 1 and merged["nps"] == load_aliases()["nps"]
    materials = tmp_path / "materials.toml"
    materials.write_text('[material.foam]\nk = 0.03\n')
    assert load_aliases(materials) == {}  # a rules file without an [alias] table adds nothing
