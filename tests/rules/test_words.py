"""A plant's words for the rules' names (audit/rules/words.py): loading, layering, bad tables."""

import pytest
from hypothesis import given, strategies as st

from audit.errors import RuleError
from audit.rules import load_rules
from audit.rules.words import WORD_COLUMNS, word_key


def write(folder, text, name="plant.toml"):
    folder.mkdir(parents=True, exist_ok=True)
    (folder / name).write_text(text, encoding="utf-8")
    return folder


def test_word_key_ignores_case_spaces_hyphens_underscores_only():
    assert word_key("Ca-Si") == word_key("CA SI") == word_key("ca_si") == "casi"
    assert word_key("SS.316") != word_key("SS316")  # a dot is not ignored: exact otherwise


def test_shipped_words_are_common_practice_and_name_defined_things():
    rules = load_rules()
    layers = {key: name for key, (name, _, _) in rules.words["layers"].items()}
    assert layers["casi"] == "calcium-silicate" and layers["pir"] == "polyisocyanurate"
    assert layers["mw"] == "mineral-wool" and layers["cg"] == "cellular-glass"
    assert rules.words["material"]["cs"][0] == "carbon-steel"
    assert rules.words["material"]["ss"][0] == "stainless-steel"
    assert rules.words["jacket"]["grp"][0] == "glass-reinforced-plastic"
    text = next(f for f in rules.files if f.endswith("words.toml"))
    assert "common practice" in open(text, encoding="utf-8").read()


def test_plant_words_add_to_the_shipped_ones_and_a_later_word_wins(tmp_path):
    plant = write(tmp_path / "plant", '[words.condition]\nPoor = "damaged"\n'
                                      '[words.layers]\nMW = "calcium-silicate"\n')
    rules = load_rules([plant])
    assert rules.words["condition"]["poor"][:2] == ("damaged", "Poor")
    assert rules.words["layers"]["mw"][0] == "calcium-silicate"  # the plant's own word wins
    assert rules.words["layers"]["casi"][0] == "calcium-silicate"  # shipped words stay


def test_insulation_words_are_the_layers_table(tmp_path):
    rules = load_rules([write(tmp_path / "p", '[words.insulation]\nRW = "mineral-wool"\n')])
    assert rules.words["layers"]["rw"][0] == "mineral-wool"


def refused(tmp_path, text) -> str:
    """The RuleError text of a plant file holding ``text``; it names the file."""
    with pytest.raises(RuleError) as info:
        load_rules([write(tmp_path / "p", text)])
    assert "plant.toml" in str(info.value)
    return str(info.value)


def test_one_word_to_two_names_in_one_file_names_file_and_key(tmp_path):
    text = refused(tmp_path, '[words.layers]\n"M-W" = "mineral-wool"\nmw = "cellular-glass"\n')
    assert "words.layers.mw" in text and "two names" in text


def test_word_to_an_undefined_name_names_file_and_key(tmp_path):
    text = refused(tmp_path, '[words.jacket]\nAlu = "aluminum"\n')
    assert "words.jacket.Alu" in text and "not defined" in text
    assert "aluminium-oxidised" in text  # what is defined


def test_word_to_a_fixed_word_column_is_checked_against_its_words(tmp_path):
    with pytest.raises(RuleError, match="words.condition.Poor"):
        load_rules([write(tmp_path / "p", '[words.condition]\nPoor = "bad"\n')])


def test_word_that_is_a_defined_name_cannot_point_elsewhere(tmp_path):
    with pytest.raises(RuleError, match="words.layers.mineral_wool"):
        load_rules([write(tmp_path / "p", '[words.layers]\nmineral_wool = "cellular-glass"\n')])


def test_unknown_column_and_non_text_value_are_refused(tmp_path):
    with pytest.raises(RuleError) as info:
        load_rules([write(tmp_path / "p", '[words.temp]\nhot = "x"\n[words.jacket]\nSS = 3\n')])
    text = str(info.value)
    assert "words.temp" in text and "words.jacket.SS" in text


def test_fluid_words_are_checked_against_the_fluids_the_rules_define(tmp_path):
    assert WORD_COLUMNS["fluid"] == "fluid"
    with pytest.raises(RuleError, match="words.fluid.LN2"):
        load_rules([write(tmp_path / "p", '[words.fluid]\nLN2 = "no-such-fluid"\n')])


@given(st.sampled_from(sorted(load_rules().words["layers"].items())),
       st.lists(st.sampled_from(["", " ", "-", "_"]), min_size=1, max_size=12),
       st.booleans())
def test_any_spelling_of_case_spaces_hyphens_underscores_maps_the_same(entry, fillers, upper):
    key, (name, word, _) = entry
    spelt = "".join(ch + fillers[i % len(fillers)] for i, ch in enumerate(word))
    spelt = spelt.upper() if upper else spelt.lower()
    assert word_key(spelt) == key

