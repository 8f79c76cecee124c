"""Bad rule folders (tests/data/bad/rules), each given to ``lagaudit run --rules DIR``.

An invalid rule file stops the run with exit 2 and a message naming the file, the key and what
was expected, before any register row is read.  Layering is deterministic: folders in the order
given, the files of a folder in name order, a later definition of a name replacing the earlier
one whole (audit/rules/loader.py; the contract's "a later definition of the same name wins").

"Circular" for folders layered in order can only mean a folder given twice, or two layers that
redefine one name differently, or a reference that points at a later layer; each is defined
and tested here:

| kind                                         | folder                | behaviour                   |
|----------------------------------------------|-----------------------|-----------------------------|
| TOML syntax error                            | syntax_error          | exit 2, file and line       |
| unknown key                                  | unknown_key           | exit 2, key and allowed keys|
| unknown section                              | unknown_section       | exit 2                      |
| values that are code (k, max_temp, selector) | runs_code             | exit 2, nothing runs        |
| nesting 1000 deep                            | deep_nesting          | exit 2, "nested too deeply" |
| not UTF-8                                    | not_utf8              | exit 2                      |
| partial redefinition of a shipped material   | partial_redefinition  | exit 2 (replace, not merge) |
| two folders define one material differently  | layer_a, layer_b      | the later folder wins       |
| the same folder given twice                  | layer_a twice         | same as once                |
| one name in two files of a folder            | same_name_two_files   | the later file name wins    |
| default naming a site of a later file        | default_in_later_file | resolved after layering     |
| default naming an undefined site             | default_undefined     | exit 2                      |
| a folder without *.toml files                | no_toml               | exit 2, names what it found |
| a file given where a folder is expected      | registers/empty.csv   | exit 2                      |
"""

from pathlib import Path

import pandas as pd
import pytest

from audit.rules import load_rules

REGISTERS = Path(__file__).parents[1] / "data" / "bad" / "registers"
RULES = Path(__file__).parents[1] / "data" / "bad" / "rules"
GOOD_REGISTER = REGISTERS / "duplicate_tags.csv"


@pytest.fixture
def rules_refused(lagaudit, tmp_path):
    """``lagaudit run GOOD --rules DIR``: exit 2, nothing written, the message returned."""
    def run(*folders):
        out = tmp_path / "out"
        options = [x for folder in folders for x in ("--rules", folder)]
        code, _, err = lagaudit("run", GOOD_REGISTER, *options, "--out", out)
        assert code == 2, err
        assert err.startswith("lagaudit: error: ") and "; expected " in err
        assert not out.exists()
        return err
    return run


def test_syntax_error_names_file_and_line(rules_refused):
    err = rules_refused(RULES / "syntax_error")
    assert str(RULES / "syntax_error" / "plant.toml") in err
    assert "not valid TOML: Expected ']' at the end of a table declaration (at line 2" in err


def test_unknown_key_names_the_key_and_the_allowed_ones(rules_refused):
    err = rules_refused(RULES / "unknown_key")
    assert (f"{RULES / 'unknown_key' / 'plant.toml'}, column 'material.plant-foam.colour': "
            "unknown key 'colour'; expected one of k, max_temp, min_temp, wet_factor, "
            "wet_source, density, below_data, source") in err


def test_unknown_section(rules_refused):
    err = rules_refused(RULES / "unknown_section")
    assert "plant.toml, column 'pump': unknown section [pump]; expected one of alias, check" in err


def test_values_that_are_code_run_nothing(rules_refused, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # the payloads write 'lagaudit-code-ran' in the working folder
    err = rules_refused(RULES / "runs_code")
    assert "3 problem(s) in rule file" in err
    for key in ("material.plant-foam.k", "material.plant-foam.max_temp",
                "check.touch-temperature.applies_to"):
        assert f"column '{key}'" in err, key
    assert "found '__import__' at token 1; expected a column name" in err
    assert not (tmp_path / "lagaudit-code-ran").exists()


def test_deep_nesting_is_a_rule_error(rules_refused):
    err = rules_refused(RULES / "deep_nesting")
    assert "plant.toml" in err and "nested" in err


def test_a_rule_file_not_in_utf8(rules_refused):
    err = rules_refused(RULES / "not_utf8")
    assert "not_utf8/plant.toml: cannot read the rule file: 'utf-8' codec can't decode" in err
    assert "expected a readable UTF-8 text file" in err


def test_a_later_layer_replaces_whole_and_never_merges(rules_refused):
    err = rules_refused(RULES / "partial_redefinition")
    assert "column 'material.mineral-wool': missing key 'max_temp'; expected max_temp = ..." in err
    assert "column 'material.mineral-wool': missing key 'source'; expected source = ..." in err


def test_default_naming_an_undefined_site(rules_refused):
    err = rules_refused(RULES / "default_undefined")
    assert "column 'defaults.site': default site 'plant-yrad' is not defined" in err
    assert str(RULES / "default_undefined" / "plant.toml") in err


def test_a_file_given_as_rules_folder(rules_refused):
    err = rules_refused(REGISTERS / "empty.csv")
    assert "does not exist or is not a folder; expected a folder holding *.toml rule files" in err


def test_a_rules_folder_without_toml_files(rules_refused):
    err = rules_refused(RULES / "no_toml")
    assert "no *.toml" in err and "plant.tml" in err


# --- layering: deterministic, later wins -----------------------------------------------------

def foam_register(tmp_path):
    path = tmp_path / "foam.csv"
    path.write_text("tag,nps,length,temp,layers\nBF-10,4,10,150,plant-foam 50mm\n",
                    encoding="utf-8")
    return path


def heat_loss(lagaudit, tmp_path, register, *folders, name):
    out = tmp_path / name
    options = [x for folder in folders for x in ("--rules", folder)]
    code, _, err = lagaudit("run", register, *options, "--out", out, "--format", "csv")
    assert code == 0, err
    results = pd.read_csv(out / "results.csv")
    assert list(results["status"]) == ["audited"]
    return float(results["heat_loss [W]"][0])


def test_two_folders_defining_one_material_differently_later_wins(lagaudit, tmp_path):
    a, b = RULES / "layer_a", RULES / "layer_b"
    assert load_rules([a, b]).materials["plant-foam"].source == "invented: layer B"
    assert load_rules([b, a]).materials["plant-foam"].source == "invented: layer A"
    register = foam_register(tmp_path)
    a_then_b = heat_loss(lagaudit, tmp_path, register, a, b, name="ab")
    b_then_a = heat_loss(lagaudit, tmp_path, register, b, a, name="ba")
    # The whole run uses the winner only: the same bits as the winning layer alone.
    assert a_then_b == heat_loss(lagaudit, tmp_path, register, b, name="b")
    assert b_then_a == heat_loss(lagaudit, tmp_path, register, a, name="a")
    # Layer B's conductivity is twice layer A's at every row: its heat loss must be larger.
    assert a_then_b > b_then_a
    assert a_then_b == heat_loss(lagaudit, tmp_path, register, a, b, name="ab-again")


def test_the_same_folder_twice_is_the_same_as_once(lagaudit, tmp_path):
    a = RULES / "layer_a"
    once, twice = load_rules([a]), load_rules([a, a])
    for section in ("materials", "jackets", "metals", "sites", "fittings", "checks", "specs"):
        assert getattr(twice, section) == getattr(once, section), section
    assert twice.aliases == once.aliases and twice.defaults == once.defaults
    register = foam_register(tmp_path)
    assert heat_loss(lagaudit, tmp_path, register, a, a, name="aa") == \
        heat_loss(lagaudit, tmp_path, register, a, name="a")


def test_one_name_in_two_files_of_a_folder_the_later_file_name_wins():
    rules = load_rules([RULES / "same_name_two_files"])
    assert rules.materials["plant-foam"].source == "invented: z.toml"
    assert rules.materials["plant-foam"].origin.endswith("z.toml")


def test_a_default_may_name_a_site_of_a_later_file(results_of):
    rules = load_rules([RULES / "default_in_later_file"])
    assert rules.default_site().name == "plant-yard"
    r = results_of(GOOD_REGISTER, "--rules", RULES / "default_in_later_file")
    assert list(r["status"]) == ["audited"] * 3
    assert float(r.loc[0, "air_temp [degC]"]) == 15.0  # plant-yard's ambient, not the shipped one
    assert all('site "plant-yard" assumed (rules default)' in w for w in r["warnings"])
