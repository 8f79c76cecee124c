"""A register in a plant's own words and US customary units, audited with a words table and
no copied materials; the same audit in SI and in US units agrees after conversion.

The plant (Harrowmere Works) and its register are invented."""

import re

import numpy as np
import pandas as pd
import pytest

from audit.cli import main
from audit.units import ureg

REGISTER = """\
Line No,Type,Size,OD [in],Run Length [ft],Op Temp [degF],Insulation System,Cladding,Metal,\
Condition,Damage,Access,Plant Area,Valves,Lab Temp [degC]
L-101,Line,4,,100,480,CaSi 2in + MW 1-1/2 in,SS,CS,OK,,Y,U-100,2,21
L-102,Line,2,,50,350,Rockwool 1 1/2",GRP,SS316L,Poor,20,N,U-100,,
L-103,Line,6,,80,-20,PIR 2in,Alu Jkt,CS,OK,,N,U-200,,
V-201,VV,,96,30,300,Perlite 3in,Alu Jkt,CS,OK,,Y,U-200,,
L-104,Line,1-1/2,,40,250,none,,CS,OK,,Y,U-100,,
"""
WORDS = """\
# Harrowmere Works: our own words for the rules' names (invented plant).
[words.layers]
Rockwool = "mineral-wool"
[words.jacket]
"Alu Jkt" = "aluminium-oxidised"
[words.material]
SS316L = "stainless-steel"
[words.condition]
OK = "intact"
Poor = "damaged"
[words.shape]
Line = "pipe"
VV = "vertical-vessel"
"""
#: The test's own map of SI headers to US headers and pint units (independent of the code's).
US = {"degC": ("degF", "degC", "degF"), "mm": ("in", "mm", "inch"), "m": ("ft", "m", "foot"),
      "m2": ("ft2", "m**2", "foot**2"), "m/s": ("mph", "m/s", "mile/hour"),
      "W": ("Btu/h", "W", "Btu_it/hour"), "W/m": ("Btu/h/ft", "W/m", "Btu_it/hour/foot"),
      "W/m2": ("Btu/(h ft2)", "W/m**2", "Btu_it/hour/foot**2"), "MWh": ("MMBtu", "MWh", "MBtu_it"),
      "t": ("ton", "metric_ton", "short_ton"), "kg/h": ("lb/h", "kg/hour", "lb/hour"),
      "kg/s": ("lb/h", "kg/s", "lb/hour")}
SI_IN_TEXT = re.compile(r"\d ?(degC|°C|mm|W/m2|W/m|m/s|m2|MWh|kg/h)\b|\d ?m\b")


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    root = tmp_path_factory.mktemp("plant")
    (root / "register.csv").write_text(REGISTER, encoding="utf-8")
    (root / "rules").mkdir()
    (root / "rules" / "words.toml").write_text(WORDS, encoding="utf-8")
    out = {}
    for units in ("si", "us"):
        assert main(["run", str(root / "register.csv"), "--rules", str(root / "rules"),
                     "--out", str(root / units), "--format", "csv,json", "--units", units,
                     "-q"]) == 0
        out[units] = {name: pd.read_csv(root / units / f"{name}.csv", keep_default_na=False)
                      for name in ("results", "findings")}
    return root, out


def test_a_register_in_the_plants_own_words_audits_without_copied_materials(runs):
    root, out = runs
    assert "[material." not in (root / "rules" / "words.toml").read_text(encoding="utf-8")
    results = out["si"]["results"]
    assert (results["status"] == "audited").all(), results[["tag", "reason"]]


def _unit(header):
    match = re.match(r"^(.*) \[(.+)\]$", header)
    return match.groups() if match else (header, None)


def test_us_and_si_runs_agree_after_conversion_for_every_numeric_column(runs):
    _, out = runs
    for name in ("results", "findings"):
        si, us = out["si"][name], out["us"][name]
        # converted figures are written to 6 significant figures (audit.results.SIGNIFICANT;
        # findings in either system), so a converted SI figure and the US one differ by that
        # rounding: at most half a unit of the 6th figure, 5e-6 relative (1e-5 for findings,
        # rounded twice)
        rtol, atol = (5e-6, 1e-9) if name == "results" else (1e-5, 1e-6)
        assert len(si) == len(us)
        carried = {"Lab Temp [degC]"}
        for column in si.columns:
            base, unit = _unit(column)
            if unit in US and column not in carried:
                label, si_unit, us_unit = US[unit]
                values = pd.to_numeric(si[column], errors="coerce").to_numpy(float)
                expected = ureg.Quantity(values, si_unit).to(us_unit).magnitude
                got = pd.to_numeric(us[f"{base} [{label}]"], errors="coerce").to_numpy(float)
                assert np.allclose(got, expected, rtol=rtol, atol=atol, equal_nan=True), column
            elif column in ("value", "limit"):
                for unit_si, rows in si.groupby("unit").groups.items():
                    values = si.loc[rows, column].astype(float).to_numpy()
                    if unit_si in US:
                        label, si_unit, us_unit = US[unit_si]
                        values = ureg.Quantity(values, si_unit).to(us_unit).magnitude
                        assert (us.loc[rows, "unit"] == label).all()
                    assert np.allclose(us.loc[rows, column].astype(float), values, rtol=rtol,
                                       atol=atol)
            elif column not in ("unit", "message", "remedy", "reason", "warnings"):
                assert si[column].astype(str).equals(us[column].astype(str)), column


def test_us_outputs_carry_no_si_value_but_in_carried_columns(runs):
    _, out = runs
    for name, table in out["us"].items():
        for column in table.columns:
            unit = _unit(column)[1]
            if column == "Lab Temp [degC]":
                continue  # the register's own column, carried through as written
            assert unit not in US, column
        for column in ("message", "remedy", "reason", "warnings"):
            if column in table:
                for text in table[column].astype(str):
                    outside_quotes = re.sub(r'"[^"]*"', "", text)  # quoted cells stay as written
                    assert not SI_IN_TEXT.search(outside_quotes), text
    assert out["us"]["results"]["Lab Temp [degC]"].tolist() == \
        out["si"]["results"]["Lab Temp [degC]"].tolist()


def test_a_plant_default_of_us_units(runs, tmp_path):
    root, _ = runs
    rules = tmp_path / "rules"
    rules.mkdir()
    (rules / "words.toml").write_text(WORDS, encoding="utf-8")
    (rules / "units.toml").write_text('[defaults]\nunits = "us"\n', encoding="utf-8")
    assert main(["run", str(root / "register.csv"), "--rules", str(rules), "--out",
                 str(tmp_path / "out"), "--format", "csv", "-q"]) == 0
    header = (tmp_path / "out" / "results.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "surface_temp [degF]" in header and "heat_loss [Btu/h/ft]" in header
    assert main(["run", str(root / "register.csv"), "--rules", str(rules), "--out",
                 str(tmp_path / "si"), "--format", "csv", "--units", "si", "-q"]) == 0
    header = (tmp_path / "si" / "results.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "surface_temp [degC]" in header  # --units wins over the plant's default
