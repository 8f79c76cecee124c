"""Headers that could mean two columns, and a design temperature standing in for the
operating one (audit/io/readers/ambiguous.py)."""

import pytest

from audit.errors import RegisterError, RuleError
from audit.io.readers import read_register, reader_options
from audit.io.readers.validate import summarise
from audit.rules import load_rules


def register(tmp_path, text, rules=None, name="reg.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    options = reader_options(rules) if rules is not None else {}
    return read_register(path, **options)


def test_area_of_codes_is_the_plant_area(tmp_path):
    t = register(tmp_path, "Tag,Size,Length,Area,Temp,Layers\n"
                           "L-1,4,10,U-100,250,MW 50\nL-2,4,10,Tank farm,250,MW 50\n")
    assert list(t["area_code"]) == ["U-100", "Tank farm"]
    assert t["area_m2"].isna().all() and (t["warnings"].str.find("area") < 0).all()
    assert "header 'Area' read as area_code (plant area): its cells are codes " \
           "('U-100', 'Tank farm')" in summarise(t)


def test_area_of_numbers_with_or_without_unit_is_the_surface_area(tmp_path):
    t = register(tmp_path, "Tag,Shape,Area,Temp,Layers\nF-1,flat,12.5,250,MW 50\n"
                           "F-2,flat,40 ft2,250,MW 50\n")
    assert t["area_m2"].tolist() == pytest.approx([12.5, 40 * 0.3048 ** 2])  # ft exact (NIST SP 811)
    assert "header 'Area' read as area (surface area)" in summarise(t)


def test_area_holding_both_is_an_error_naming_the_header_and_asking_for_an_alias(tmp_path):
    with pytest.raises(RegisterError) as info:
        register(tmp_path, "Tag,Size,Length,AREA,Temp,Layers\nL-1,4,10,U-100,250,MW 50\n"
                           "L-2,4,10,12,250,MW 50\n")
    error = info.value
    assert error.column == "AREA" and error.file.endswith("reg.csv")
    assert "'12'" in str(error) and "'U-100'" in str(error)
    assert '[alias] area_code = ["AREA"]' in error.expected


def test_an_alias_decides_instead_of_the_cells(tmp_path):
    folder = tmp_path / "plant"
    folder.mkdir()
    (folder / "aliases.toml").write_text('[alias]\narea_code = ["Area"]\n', encoding="utf-8")
    t = register(tmp_path, "Tag,Size,Length,Area,Temp,Layers\nL-1,4,10,U-100,250,MW 50\n"
                           "L-2,4,10,12,250,MW 50\n", load_rules([folder]))
    assert list(t["area_code"]) == ["U-100", "12"] and "header 'Area'" not in summarise(t)


def test_a_header_with_an_area_unit_is_not_ambiguous(tmp_path):
    t = register(tmp_path, "Tag,Size,Length,Area [m2],Temp,Layers\nL-1,4,10,U-100,250,MW 50\n")
    assert t.loc[0, "status"] == "ok" and 'area: "U-100" is not an area' in t.loc[0, "warnings"]


DESIGN = "Tag,Size,Length,Design Temp,Layers\nL-1,4,10,250,MW 50\nL-2,4,10,,MW 50\n"


def test_a_design_temperature_is_used_with_a_warning_on_every_row_it_feeds(tmp_path):
    t = register(tmp_path, DESIGN, load_rules())
    assert t.loc[0, "status"] == "ok" and t.loc[0, "temp_K"] == pytest.approx(523.15)
    assert 'temp: design temperature (header "Design Temp") used as the operating ' \
           "temperature" in t.loc[0, "warnings"]
    assert "design temperature" not in t.loc[1, "warnings"]  # an empty cell feeds nothing
    assert "header 'Design Temp' is a design temperature, read as the operating" in summarise(t)


def test_an_operating_temperature_wins_over_a_design_one(tmp_path):
    t = register(tmp_path, "Tag,Size,Length,Design Temp,Op Temp,Layers\nL-1,4,10,300,250,MW 50\n")
    assert t.loc[0, "temp_K"] == pytest.approx(523.15) and "design" not in t.loc[0, "warnings"]


def test_the_rules_may_refuse_a_design_temperature(tmp_path):
    folder = tmp_path / "plant"
    folder.mkdir()
    (folder / "defaults.toml").write_text('[defaults]\ndesign_temp = "refuse"\n', encoding="utf-8")
    t = register(tmp_path, DESIGN, load_rules([folder]))
    assert (t["status"] == "rejected").all()
    assert 'design_temp = "refuse"' in t.loc[0, "reason"]
    assert "refused" in summarise(t)


def test_design_temp_switch_takes_use_or_refuse_only(tmp_path):
    folder = tmp_path / "plant"
    folder.mkdir()
    (folder / "defaults.toml").write_text('[defaults]\ndesign_temp = "maybe"\n', encoding="utf-8")
    with pytest.raises(RuleError, match="defaults.design_temp"):
        load_rules([folder])
