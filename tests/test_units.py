"""Units at the edges (audit/units.py): the contract's unit spellings, checked against pint."""

import pint
import pytest

from audit.units import UnitParseError, parse_quantity, parse_temperature

UREG = pint.UnitRegistry()  # a fresh registry: pint's own definitions are the oracle


@pytest.mark.parametrize("text, default, target, expected", [
    ("12 m2", "m**2", "m**2", 12.0),            # the contract writes areas as m2
    ("10 ft2", "m**2", "m**2", UREG.Quantity(10, "ft**2").to("m**2").magnitude),
    ("3 m3/h", "m**3/h", "m**3/s", 3 / 3600),
    ("2 in", "mm", "m", UREG.Quantity(2, "inch").to("m").magnitude),
    ('1.5"', "mm", "m", UREG.Quantity(1.5, "inch").to("m").magnitude),
    ("0.30 Btu*in/(h*ft**2*degF)", "W/(m*K)", "W/(m*K)",
     UREG.Quantity(0.30, "Btu*inch/(hour*foot**2*delta_degF)").to("W/(m*K)").magnitude),
])
def test_quantities(text, default, target, expected):
    assert parse_quantity(text, default, target) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text, kelvin", [
    ("300 F", UREG.Quantity(300, "degF").to("kelvin").magnitude),
    ("65 degC", 338.15), ("120 °C", 393.15), ("150C", 423.15), ("400 K", 400.0), (20, 293.15),
])
def test_temperatures(text, kelvin):
    assert parse_temperature(text) == pytest.approx(kelvin, rel=1e-12)


@pytest.mark.parametrize("text", ["TBA", "2 kg", "", "nan", "-300 degC", "__import__('os')"])
def test_not_temperatures(text):
    with pytest.raises(UnitParseError):
        parse_temperature(text)


def test_unit_registry_falls_back_when_its_cache_cannot_be_used(monkeypatch):
    # pint's definition cache is a speed-up only: if it cannot be used, the registry is built
    # the usual way and parses the same.
    import pint

    from audit import units

    real = pint.UnitRegistry

    def refusing(*args, **kwargs):
        if "cache_folder" in kwargs:
            raise PermissionError("cache folder not writable")
        return real(*args, **kwargs)

    monkeypatch.setattr(units.pint, "UnitRegistry", refusing)
    registry = units._registry()
    # (300 - 32) * 5/9 + 273.15 K: the definitions of the Fahrenheit and Celsius scales.
    assert registry.Quantity(300, "degF").to("K").magnitude == pytest.approx(422.0388888888889)
