"""Economic rules reader (audit/economics/rules.py): the shipped file, layering over it, and
errors that name the file and the key."""

import pytest

from audit.economics.rules import economic_rule_files, economic_rules, load_economic_rules
from audit.errors import RuleError
from audit.rules import load_rules, shipped_rules_dir

# 1 MBtu (pint: 10**6 Btu) = 1e6 * 1055.05585262 J (the International Table Btu, exact by
# definition); 1 MWh = 3.6e9 J.
MWH_PER_MBTU = 1e6 * 1055.05585262 / 3.6e9
# pint defines the Btu as 1055.056 J, the ISO rounding of the IT Btu: 1.4e-7 relative apart.
BTU_ROUNDING = 1e-6


@pytest.fixture(scope="module")
def shipped():
    return load_economic_rules()


def test_shipped_file_is_read_and_does_not_disturb_the_main_loader(shipped):
    assert [str(p) for p in economic_rule_files()] == [str(shipped_rules_dir() / "economics" / "economics.toml")]
    load_rules()  # the main loader reads the subfolder too and layers its [economics] section
    assert shipped.currency == "EUR"
    assert shipped.energy_check == "heat-loss-limit"


def test_shipped_natural_gas_factor_is_the_published_one(shipped):
    # US EPA 40 CFR Part 98 Subpart C Table C-1: natural gas (weighted U.S. average)
    # 53.06 kg CO2/mmBtu; written in the file as "53.06 kg/MBtu". 181.05 kg/MWh.
    assert shipped.heat.emission_factor == pytest.approx(53.06 / MWH_PER_MBTU, rel=BTU_ROUNDING)
    assert "40 CFR Part 98" in shipped.heat.emission_source


def test_every_assumption_has_a_source(shipped):
    rows = shipped.assumptions()
    assert len(rows) == 10
    assert all(r["source"] for r in rows)


def write(folder, name, text):
    folder.mkdir(exist_ok=True)
    (folder / name).write_text(text, encoding="utf-8")
    return folder


def test_a_later_scalar_replaces_and_a_later_subtable_replaces_whole(tmp_path, shipped):
    folder = write(tmp_path / "plant", "money.toml", """
[economics]
currency = "USD"
[economics.heat]
fuel = "fuel oil"
efficiency = "85 percent"
efficiency_source = "test"
price = 8
price_per = "MBtu"
price_source = "test"
emission_factor = 250
emission_source = "test"
""")
    got = load_economic_rules([folder])
    assert got.currency == "USD"
    assert got.hours == shipped.hours                      # untouched key kept
    assert got.heat.conversion == pytest.approx(0.85)
    # 8 per MBtu is 8 / MWH_PER_MBTU per MWh.
    assert got.heat.price == pytest.approx(8 / MWH_PER_MBTU, rel=BTU_ROUNDING)
    assert got.heat.price_as_written == "8 USD per MBtu"
    assert (got.cold.price, got.cold.conversion) == (shipped.cold.price, shipped.cold.conversion)


def test_a_folder_file_without_economics_is_not_read(tmp_path):
    folder = write(tmp_path / "plant", "materials.toml", '[material.x]\nsource = "t"\n')
    write(folder / "economics", "more.toml", '[economics]\nhours = 7000\n')
    files = economic_rule_files([folder])
    assert [p.name for p in files] == ["economics.toml", "more.toml"]
    assert load_economic_rules([folder]).hours == 7000


def test_overrides_for_one_run(shipped):
    run = shipped.with_overrides(fuel_price=50, hours=6000)
    assert run.heat.price == pytest.approx(50.0)            # price_per is MWh in the shipped file
    assert run.hours == 6000
    assert "--hours" in run.hours_source and "--fuel-price" in run.heat.price_source
    with pytest.raises(RuleError):
        shipped.with_overrides(hours=9000)                  # more than a leap year's hours
    with pytest.raises(RuleError):
        shipped.with_overrides(fuel_price="cheap")


@pytest.mark.parametrize("body, column", [
    ('[economics]\nhours = "lots"\n', "economics.hours"),
    ('[economics]\nspeed = 3\n', "economics.speed"),
    ('[economics.heat]\nefficiency = 1.5\n', "economics.heat"),
    ('[economics.finance]\ninterest = 0.05\nlife = 0\nsource = "t"\n', "economics.finance.life"),
    ('[economics.other]\nx = 1\n', "economics.other"),
    ('[economics.heat]\nprice_per = "metre"\n', "economics.heat"),
])
def test_errors_name_the_file_and_key(tmp_path, body, column):
    folder = write(tmp_path / "bad", "bad.toml", body)
    with pytest.raises(RuleError) as caught:
        load_economic_rules([folder])
    problems = caught.value.problems or [caught.value.problem]
    assert any(p.column.startswith(column) and p.file and p.file.endswith(".toml") for p in problems), \
        [str(p) for p in problems]


def test_repair_table_shape_is_checked(tmp_path):
    folder = write(tmp_path / "bad", "bad.toml", """
[economics.repair]
sizes = [2, 4]
thicknesses = [25, 50]
pipe_per_m = [[1, 2]]
surface_per_m2 = [1, 2]
cover_per_fitting = [1, 2]
source = "t"
""")
    with pytest.raises(RuleError, match="pipe_per_m"):
        load_economic_rules([folder])


def test_not_toml_names_the_file(tmp_path):
    folder = write(tmp_path / "bad", "bad.toml", "[economics\n")
    with pytest.raises(RuleError) as caught:
        load_economic_rules([folder])
    assert caught.value.file.endswith("bad.toml")


def test_the_main_loader_layers_the_economics_too(tmp_path, shipped):
    # One discovery, reading and layering: the Rules object carries the [economics] table as
    # layered, and the economic rules built from it are those read from the folders alone.
    folder = write(tmp_path / "plant", "money.toml", '[economics]\nhours = 7000\n')
    write(folder / "economics", "more.toml", '[economics]\ncurrency = "USD"\n')
    rules = load_rules([folder])
    assert str(shipped_rules_dir() / "economics" / "economics.toml") in rules.files
    assert rules.files[-2:] == (str(folder / "money.toml"), str(folder / "economics" / "more.toml"))
    assert rules.economics["hours"] == (7000, str(folder / "money.toml"))
    built = economic_rules(rules)
    assert built == load_economic_rules([folder])
    assert (built.hours, built.currency, built.life) == (7000, "USD", shipped.life)
    assert built.files[-2:] == rules.files[-2:]
    assert economic_rules(load_rules()) == shipped


def test_economics_not_a_table_names_the_file_in_both_loaders(tmp_path):
    folder = write(tmp_path / "bad", "bad.toml", 'economics = 3\n')
    for load in (load_rules, load_economic_rules):
        with pytest.raises(RuleError) as caught:
            load([folder])
        problems = caught.value.problems or [caught.value.problem]
        assert any(p.message == "[economics] is not a table" and p.file.endswith("bad.toml")
                   for p in problems), [str(p) for p in problems]
