"""A plant's words in the register (audit/io/readers/words.py): translation and the summary."""

import pytest

from audit.io.readers import read_register, reader_options
from audit.io.readers.validate import summarise
from audit.rules import load_rules
from audit.thermal import resolve_names

REGISTER = """Line No,Size,Length,Op Temp,Insulation System,Cladding,Metal,Condition,Damage,Access
L-1,4,10,250,CaSi 50mm + MW 50mm,SS,CS,intact,,yes
L-2,2,10,180,pir 40,grp,SS316L,Poor,20,no
L-3,6,10,120,Rockwool 50,Alu,C-S,good,,no
"""


@pytest.fixture(scope="module")
def plant_rules(tmp_path_factory):
    folder = tmp_path_factory.mktemp("plant")
    (folder / "words.toml").write_text('[words.condition]\nPoor = "damaged"\n'
                                       '[words.material]\n"SS 316L" = "stainless-steel"\n',
                                       encoding="utf-8")
    return load_rules([folder])


def read(tmp_path, rules, text=REGISTER):
    path = tmp_path / "reg.csv"
    path.write_text(text, encoding="utf-8")
    return resolve_names(read_register(path, **reader_options(rules)), rules)


def test_words_become_the_rules_names(tmp_path, plant_rules):
    table = read(tmp_path, plant_rules)
    assert table.loc[0, "layer_materials"] == ("calcium-silicate", "mineral-wool")
    assert table.loc[1, "layer_materials"] == ("polyisocyanurate",)
    assert list(table["jacket"][:2]) == ["stainless-steel", "glass-reinforced-plastic"]
    assert list(table["material"]) == ["carbon-steel", "stainless-steel", "carbon-steel"]
    assert table.loc[1, "condition"] == "damaged"
    assert list(table["status"][:2]) == ["ok", "ok"]
    assert table.loc[0, "raw:layers"] == "CaSi 50mm + MW 50mm"  # the cell as written is kept


def test_never_fuzzy_unknown_words_reject_their_row(tmp_path, plant_rules):
    row = read(tmp_path, plant_rules).loc[2]
    assert row["status"] == "rejected"
    assert 'material "rockwool" is not in the rules' in row["reason"]
    assert 'jacket: "alu" is not in the rules' in row["reason"]


def test_without_the_words_the_same_register_is_rejected(tmp_path, plant_rules):
    path = tmp_path / "reg.csv"
    path.write_text(REGISTER, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=plant_rules.aliases), plant_rules)
    assert (table["status"] == "rejected").all()


def test_validate_lists_words_mapped_and_not_placed_with_hints(tmp_path, plant_rules):
    text = summarise(read(tmp_path, plant_rules))
    mapped = text.split("Plant words mapped", 1)[1].split("Names neither", 1)[0]
    for line in ("layers: 'CaSi' -> calcium-silicate (1 row)", "layers: 'PIR' -> polyisocyanurate",
                 "condition: 'Poor' -> damaged (1 row)", "material: 'CS' -> carbon-steel (2 rows)",
                 "material: 'SS 316L' -> stainless-steel", "jacket: 'GRP' -> glass-reinforced-plastic"):
        assert line in mapped
    unplaced = text.split("Names neither", 1)[1].split("Rejected rows", 1)[0]
    assert "layers: 'rockwool' (1 row); closest: mineral-wool" in unplaced
    assert "jacket: 'Alu' (1 row); closest: aluminium-bright, aluminium-oxidised" in unplaced
    assert "good" not in unplaced  # the reader's own spelling of intact


def test_words_are_looked_up_once_per_distinct_text(tmp_path, plant_rules):
    rows = "".join(f"L-{i},4,10,250,MW 50 + CaSi 25,SS,CS,intact,,no\n" for i in range(2000))
    table = read(tmp_path, plant_rules, REGISTER.splitlines(True)[0] + rows)
    assert (table["status"] == "ok").all()
    assert len({id(t) for t in table["layer_materials"]}) == 1  # one tuple shared by all rows
    assert "layers: 'MW' -> mineral-wool (2000 rows)" in summarise(table)


def test_names_not_placed_are_listed_up_to_a_cap_then_counted(tmp_path, plant_rules):
    rows = "".join(f"L-{i},4,10,250,foam{i:03d} 50,SS,CS,intact,,no\n" for i in range(60))
    text = summarise(read(tmp_path, plant_rules, REGISTER.splitlines(True)[0] + rows))
    assert text.count("; closest:") == 50
    assert "layers: 10 more names not listed (10 rows)" in text


def test_a_near_miss_is_hinted_never_applied(tmp_path, plant_rules):
    table = read(tmp_path, plant_rules, REGISTER.splitlines(True)[0]
                 + "L-9,4,10,250,CaSj 50,SS,CS,intact,,no\n")
    assert table.loc[0, "status"] == "rejected"
    assert table.loc[0, "layer_materials"] == ("casj",)
    assert "layers: 'casj' (1 row); closest: calcium-silicate (word CaSi)" in summarise(table)
