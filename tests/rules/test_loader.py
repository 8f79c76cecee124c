"""Rule files (audit/rules/loader.py): the shipped data, layering and invalid files."""

import math

import pytest

from audit.errors import RuleError
from audit.rules import load_rules, shipped_rules_dir


@pytest.fixture(scope="module")
def shipped():
    return load_rules()


def test_shipped_rules_load_and_every_definition_names_its_source(shipped):
    for group in (shipped.materials, shipped.jackets, shipped.metals, shipped.sites, shipped.fittings):
        assert group
        for entry in group.values():
            assert entry.source.strip(), entry.name
    for name in ("mineral-wool", "calcium-silicate", "cellular-glass", "expanded-perlite",
                 "elastomeric-foam", "polyisocyanurate", "aerogel-blanket"):
        assert name in shipped.materials
    assert shipped.default_site().name in shipped.sites


def test_every_shipped_file_opens_with_a_grammar_comment():
    for path in sorted(shipped_rules_dir().glob("*.toml")):
        first = path.read_text(encoding="utf-8").lstrip().splitlines()[0]
        assert first.startswith("#"), path.name


def test_values_in_kelvin_and_SI(shipped):
    wool = shipped.materials["mineral-wool"]
    assert all(t > 200 for t, _ in wool.k)  # degC in the file, kelvin here
    assert wool.max_temp > 273.15


def write(folder, name, text):
    folder.mkdir(parents=True, exist_ok=True)
    (folder / name).write_text(text, encoding="utf-8")
    return folder


def test_a_user_folder_adds_and_replaces_by_name(tmp_path, shipped):
    user = write(tmp_path / "mine", "plant.toml", '''
# plant additions
[material.mineral-wool]
k = [[50, 0.05]]
max_temp = 600
source = "plant test data"

[material.plant-foam]
k = [["100 degF", "0.30 Btu*in/(h*ft**2*degF)"], ["200 degF", "0.35 Btu*in/(h*ft**2*degF)"]]
max_temp = "250 degF"
source = "invented for this test"
''')
    rules = load_rules([user])
    assert rules.materials["mineral-wool"].k == ((323.15, 0.05),)
    assert rules.materials["calcium-silicate"] == shipped.materials["calcium-silicate"]
    foam = rules.materials["plant-foam"]
    # 1 Btu*in/(h*ft2*degF) = 0.1442279 W/(m K) (ASHRAE Handbook Fundamentals SI conversion
    # table, from memory); the degF inside the compound unit is a difference.
    assert foam.k[0][1] == pytest.approx(0.30 * 0.1442279, rel=1e-6)
    assert foam.k[0][0] == pytest.approx((100 - 32) / 1.8 + 273.15)
    assert foam.max_temp == pytest.approx((250 - 32) / 1.8 + 273.15)


def test_later_folders_win(tmp_path):
    a = write(tmp_path / "a", "x.toml", '[jacket.test-skin]\nemissivity = 0.2\nsurface = "metal"\nsource = "a"\n')
    b = write(tmp_path / "b", "x.toml", '[jacket.test-skin]\nemissivity = 0.7\nsurface = "non-metal"\nsource = "b"\n')
    rules = load_rules([a, b])
    assert rules.jackets["test-skin"].emissivity == 0.7 and rules.jackets["test-skin"].source == "b"


@pytest.mark.parametrize("text, words", [
    ("[material.x\nk = 1", "not valid TOML"),
    ('[material.x]\nk = [[50, 0.04]]\nmax_temp = 600\n', "missing key 'source'"),
    ('[material.x]\nk = [[50, 0.04]]\nmax_temp = 600\nsource = "s"\ncolour = "red"\n', "unknown key 'colour'"),
    ('[material.x]\nk = [[100, 0.04], [50, 0.05]]\nmax_temp = 600\nsource = "s"\n', "increasing"),
    ('[material.x]\nk = [[50, -0.04]]\nmax_temp = 600\nsource = "s"\n', "below or at 0"),
    ('[material.x]\nk = [[50, "0.04 kg"]]\nmax_temp = 600\nsource = "s"\n', "not a value|conductivity|expected"),
    ('[jacket.x]\nemissivity = 1.5\nsurface = "metal"\nsource = "s"\n', "above 1"),
    ('[jacket.x]\nemissivity = 0.5\nsurface = "shiny"\nsource = "s"\n', "not one of"),
    ('[widgets.x]\nsize = 1\n', "unknown section"),
    ('[defaults]\nsite = "nowhere"\n', "not defined"),
    ('[material.x]\nk = [[50, 0.04]]\nmax_temp = 600\nwet_factor = 2\nsource = "s"\n', "wet_source"),
    ('[material.x]\nk = [[50, 0.04]]\nmax_temp = 600\nbelow_data = "clamp"\nsource = "s"\n',
     "below_data.*not one of extend, hold"),
])
def test_invalid_rule_files_name_the_file_and_key(tmp_path, text, words):
    folder = write(tmp_path / "bad", "broken.toml", text)
    with pytest.raises(RuleError) as info:
        load_rules([folder])
    message = str(info.value)
    assert "broken.toml" in message or "rules" in message
    assert __import__("re").search(words, message), message


def test_a_rule_file_containing_python_runs_nothing(tmp_path):
    marker = tmp_path / "was_run"
    payload = f"__import__('pathlib').Path({str(marker)!r}).write_text('x')"
    folder = write(tmp_path / "evil", "evil.toml",
                   f'[material.evil]\nk = [[50, "{payload}"]]\nmax_temp = "{payload}"\nsource = "{payload}"\n')
    with pytest.raises(RuleError):
        load_rules([folder])
    assert not marker.exists()


def test_missing_rules_folder_is_a_clear_error(tmp_path):
    with pytest.raises(RuleError, match="does not exist"):
        load_rules([tmp_path / "nope"])


def test_wet_factors_carry_their_own_source(shipped):
    for material in shipped.materials.values():
        if not math.isnan(material.wet_factor):
            assert material.wet_source.strip(), material.name
