"""The one validator of every rule section (audit/rules/keys.py)."""

import pytest

from audit.economics.rules import load_economic_rules
from audit.errors import RuleError
from audit.rules import load_rules
from audit.rules.converters import quantity, text
from audit.rules.keys import convert_keys

KEYS = {"thickness": (quantity("mm", "m", low=0.0), True), "source": (text, True),
        "note": (text, False)}


def test_unknown_invalid_and_missing_keys_are_all_reported():
    problems = []
    got = convert_keys({"thickness": "-5 mm", "colour": "red", "note": "n"}, KEYS,
                       where="thing.a", origin="a.toml", problems=problems)
    assert got == {"note": "n"}
    said = {(p.column, p.message.split(":")[0], p.file) for p in problems}
    assert said == {("thing.a.thickness", "invalid value", "a.toml"),
                    ("thing.a.colour", "unknown key 'colour'", "a.toml"),
                    ("thing.a", "missing key 'source'", "a.toml")}


def test_layered_keys_name_the_file_each_came_from():
    problems = []
    got = convert_keys({"thickness": "50 mm", "source": 3}, KEYS, where="t",
                       origin={"thickness": "one.toml", "source": "two.toml"}, problems=problems,
                       known=("kind",))
    assert got == {"thickness": pytest.approx(0.05)}
    assert [(p.file, p.column) for p in problems] == [("two.toml", "t.source")]


def _raised(load, folder):
    with pytest.raises(RuleError) as info:
        load([folder])
    return info.value.problems


def test_main_and_economic_rules_word_an_unknown_key_alike(tmp_path):
    (tmp_path / "m.toml").write_text('[material.x]\nk = [[50, 0.04]]\nmax_temp = 600\n'
                                     'source = "s"\ncolour = "red"\n', encoding="utf-8")
    main = _raised(load_rules, tmp_path)
    (tmp_path / "m.toml").unlink()
    (tmp_path / "e.toml").write_text('[economics.finance]\ninterest = 0.05\nlife = 20\n'
                                     'source = "s"\ncolour = "red"\n', encoding="utf-8")
    economic = _raised(load_economic_rules, tmp_path)
    assert [p.message for p in main] == [p.message for p in economic] == ["unknown key 'colour'"]
    assert economic[0].column == "economics.finance.colour" and economic[0].file.endswith("e.toml")
