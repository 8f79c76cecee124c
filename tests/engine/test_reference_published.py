"""The one-item engine against published tables and worked examples.

Each data file in ``tests/data/reference/`` names its source (title, edition, table) in its
header; the source is named again beside each check below.  Units are converted here with
exact definitions (international-table Btu = 1055.05585262 J, ft = 0.3048 m, in = 0.0254 m).
"""

import csv
import math
import tomllib
from pathlib import Path

import numpy as np
import pytest

from audit.engine import solve_item

REFERENCE = Path(__file__).resolve().parents[1] / "data" / "reference"

BTU = 1055.05585262           # J, international table
FOOT = 0.3048                 # m
INCH = 0.0254                 # m
HOUR = 3600.0                 # s
BTU_PER_H_FT = BTU / HOUR / FOOT              # 1 Btu/(h*ft) in W/m
BTU_PER_H_FT_DEGF = BTU_PER_H_FT * 1.8        # 1 Btu/(h*ft*degF) in W/(m*K)


def kelvin_from_degf(t):
    return (t - 32.0) / 1.8 + 273.15


def kelvin_from_degc(t):
    return t + 273.15


def read_commented_csv(path):
    with open(path, newline="") as f:
        return list(csv.DictReader(line for line in f if not line.startswith("#")))


# --- Heating Ventilating Air Conditioning Guide 1941 (ASHVE), Table 6 -------------------------
# Heat losses from horizontal bare steel pipes in still air at 70 F; the same values are in the
# 1955 Guide, Chapter 28, Table 1 (see the data file's header).

ASHVE_ROWS = read_commented_csv(REFERENCE / "ashve_guide_1941_table6_bare_steel_pipe.csv")

# The table does not state the pipe's emissivity.  0.8 is the total emissivity of oxidised
# steel at 100-200 C in the FLIR thermal-imaging emissivity tables ("Iron and steel, oxidized":
# 0.74 at 100 C, 0.79 at 200 C, 0.78-0.82 at 125-525 C), i.e. what an old bare steel pipe is.
# Surroundings are taken at the air temperature (a room at 70 F).  Disclosure: the choice was
# made knowing the table; with 0.7 or 0.9 the engine's mean deviation from it is about -7 % or
# +6 %, so the table is consistent with an emissivity near 0.8 and the bias test below would
# catch a radiation error of that size.
ASHVE_EMISSIVITY = 0.8


def ashve_case(row):
    delta_f = float(row["temp_difference_degF"])
    air = kelvin_from_degf(70.0)
    result = solve_item(shape="pipe", od=float(row["outside_diameter_in"]) * INCH, length=1.0,
                        temp=air + delta_f / 1.8, ambient=air, wind=0.0,
                        emissivity=ASHVE_EMISSIVITY, layers=[], orientation="horizontal",
                        surroundings=None, surface_model="correlations")
    published = float(row["heat_loss_btu_per_h_ft_degF"]) * delta_f * BTU_PER_H_FT   # W/m
    return result, published


@pytest.mark.parametrize("row", ASHVE_ROWS,
                         ids=[f"NPS{r['nps']}-dT{r['temp_difference_degF']}F" for r in ASHVE_ROWS])
def test_bare_steel_pipe_matches_ashve_guide_1941_table_6(row):
    # Source: Heating Ventilating Air Conditioning Guide 1941, Table 6 (ASHVE).
    # Tolerance 8 % per entry: the table is an empirical compilation for old steel pipe whose
    # emissivity is not stated; a change of 0.05 in emissivity moves the loss by about 3 %,
    # and single entries of such a table scatter by several per cent about any modern
    # correlation (the engine uses Churchill & Chu natural convection); one entry (3-1/2 in,
    # 110 F) is itself off its row's trend.  The mean bias is held tighter by the next test.
    result, published = ashve_case(row)
    assert result.converged, result.reason
    assert result.heat_loss_per_m == pytest.approx(published, rel=0.08)


def test_bare_steel_pipe_ashve_table_has_no_systematic_bias():
    # Source: Heating Ventilating Air Conditioning Guide 1941, Table 6 (ASHVE), all 105 entries.
    # Tolerance 4 % on the geometric mean of engine/table: random scatter of the entries
    # averages out over 105 values, so what remains is a systematic error (a wrong radiation
    # or convection term shows up as a bias of 5 % or more).
    ratios = []
    for row in ASHVE_ROWS:
        result, published = ashve_case(row)
        ratios.append(result.heat_loss_per_m / published)
    assert len(ratios) == 105
    assert math.exp(np.mean(np.log(ratios))) == pytest.approx(1.0, abs=0.04)


def test_bare_steel_pipe_ashve_table_trend_with_size_and_temperature():
    # Source: Heating Ventilating Air Conditioning Guide 1941, Table 6 (ASHVE).
    # The per-degree loss rises with pipe size along each row and with temperature difference
    # down each column in the table; the engine must reproduce both orderings (checked on the
    # engine's own numbers, compared with the table's ordering, so no tolerance is involved).
    per_degree = {}
    for row in ASHVE_ROWS:
        result, _ = ashve_case(row)
        per_degree[(row["temp_difference_degF"], row["nps"])] = (
            result.heat_loss_per_m / float(row["temp_difference_degF"]),
            float(row["heat_loss_btu_per_h_ft_degF"]))
    sizes = list(dict.fromkeys(r["nps"] for r in ASHVE_ROWS))
    deltas = list(dict.fromkeys(r["temp_difference_degF"] for r in ASHVE_ROWS))
    for d in deltas:
        engine = [per_degree[(d, s)][0] for s in sizes]
        table = [per_degree[(d, s)][1] for s in sizes]
        assert np.all(np.diff(table) > 0) and np.all(np.diff(engine) > 0)
    for s in sizes:
        engine = [per_degree[(d, s)][0] for d in deltas]
        table = [per_degree[(d, s)][1] for d in deltas]
        assert np.all(np.diff(table) > 0) and np.all(np.diff(engine) > 0)


# --- Cengel & Ghajar, Heat and Mass Transfer, Example 9-1 "Heat Loss from Hot Water Pipes" ----

def test_hot_water_pipe_natural_convection_cengel_ghajar_example_9_1():
    # Source: Cengel & Ghajar, "Heat and Mass Transfer", Example 9-1 (see the data file).
    # A bare pipe's surface is at the process temperature, so the engine's convective flux
    # times the pipe's surface area is the example's answer (the example excludes radiation).
    # Tolerance 3 %: the example takes air properties from the book's table at 45 C
    # (k = 0.02699 W/(m K), nu = 1.749e-5 m2/s, Pr = 0.7241); reference air property
    # equations differ from those rounded table values by up to about 2 % in k and nu, and
    # the answer is rounded to 3 figures.
    example = tomllib.loads((REFERENCE / "cengel_ghajar_example_hot_water_pipe.toml").read_text())
    given = example["inputs"]
    diameter, length = given["outside_diameter_m"], given["length_m"]
    result = solve_item(shape="pipe", od=diameter, length=length,
                        temp=kelvin_from_degc(given["surface_temp_degC"]),
                        ambient=kelvin_from_degc(given["ambient_temp_degC"]), wind=0.0,
                        emissivity=0.9, layers=[], orientation="horizontal",
                        surroundings=None, surface_model="correlations")
    assert result.converged, result.reason
    area = math.pi * diameter * length
    assert area == pytest.approx(example["intermediate"]["surface_area_m2"], rel=1e-3)
    assert result.surface_temp == pytest.approx(kelvin_from_degc(given["surface_temp_degC"]))
    assert result.q_conv * area == pytest.approx(example["results"]["convective_heat_loss_W"],
                                                 rel=0.03)
    # The example's h (5.869 W/(m2 K)) from the engine's convective flux, same tolerance.
    h = result.q_conv / (given["surface_temp_degC"] - given["ambient_temp_degC"])
    assert h == pytest.approx(example["intermediate"]["h_W_per_m2_K"], rel=0.03)


# --- Bird, Stewart & Lightfoot, Transport Phenomena, 2nd ed., "Heat loss from an insulated pipe"

def bsl_problem():
    problem = tomllib.loads((REFERENCE / "bsl_insulated_pipe_magnesia_cork.toml").read_text())
    given = problem["inputs"]
    radius = given["inside_diameter_in"] * INCH / 2.0
    layers, resistances = [], []
    for _name, thickness_in, k_btu in given["layers"]:
        k = k_btu * BTU_PER_H_FT_DEGF
        thickness = thickness_in * INCH
        layers.append((k, thickness))
        resistances.append(math.log((radius + thickness) / radius) / (2.0 * math.pi * k))
        radius += thickness
    return given, layers, np.array(resistances)


@pytest.mark.parametrize("ambient_degf, wind, emissivity", [
    (70.0, 0.0, 0.9),      # still indoor air, painted/canvas finish
    (40.0, 5.0, 0.1),      # windy outdoor air, bright aluminium jacket
    (90.0, 0.0, 0.05),     # warm still air, very low emissivity
])
def test_insulated_pipe_conduction_bird_stewart_lightfoot(ambient_degf, wind, emissivity):
    # Source: Bird, Stewart & Lightfoot, "Transport Phenomena", 2nd ed., problem "Heat loss from
    # an insulated pipe" (steel / 85 % magnesia / cork; see the data file).  The problem fixes
    # both surface temperatures; the engine computes the outer one from its surface model, so
    # what is compared is the conduction: with constant conductivities the heat per metre is
    # (T_inner - T_outer) / sum(R_i) whatever the outside conditions, and each interface lies
    # at the fraction of the drop that the published layers' resistances give.  The three
    # outside conditions show the comparison does not depend on the surface model.
    # Tolerance 1e-5 relative: the conduction is exact for constant k and the engine closes its
    # surface balance to 1e-6.
    given, layers, resistances = bsl_problem()
    inner = kelvin_from_degf(given["inner_surface_temp_degF"])
    inner_radius = given["inside_diameter_in"] * INCH / 2.0
    result = solve_item(shape="pipe", od=2.0 * inner_radius, length=1.0, temp=inner,
                        ambient=kelvin_from_degf(ambient_degf), wind=wind, emissivity=emissivity,
                        layers=layers, orientation="horizontal", surroundings=None,
                        surface_model="correlations")
    assert result.converged, result.reason
    drop = inner - result.surface_temp
    assert result.heat_loss_per_m * resistances.sum() == pytest.approx(drop, rel=1e-5)
    interfaces = np.array(result.interface_temps)
    assert interfaces.shape == (len(layers) + 1,)
    expected = inner - drop * np.concatenate(([0.0], np.cumsum(resistances))) / resistances.sum()
    np.testing.assert_allclose(interfaces, expected, rtol=0, atol=1e-5 * drop)
    # The problem's answer: heat per foot with the stated surfaces (250 F inside, 90 F outside),
    # i.e. the engine's conductance scaled to the stated 160 F drop, against the worked
    # solution's series formula (Eq. 10.6-29 of the book) on the published inputs.
    stated_drop = (given["inner_surface_temp_degF"] - given["outer_surface_temp_degF"]) / 1.8
    engine_answer = result.heat_loss_per_m / drop * stated_drop / BTU_PER_H_FT
    formula_answer = stated_drop / resistances.sum() / BTU_PER_H_FT
    assert engine_answer == pytest.approx(formula_answer, rel=1e-5)


def test_insulated_pipe_table_conductivity_equals_constant_bird_stewart_lightfoot():
    # Source: Bird, Stewart & Lightfoot, "Transport Phenomena", 2nd ed. (as above).  The same
    # constant conductivities given as (temperature [K], k) tables must give the same answer:
    # the integral of a flat piecewise-linear k is exact.  Tolerance 1e-6 relative (solver
    # closure).
    given, layers, _ = bsl_problem()
    inner = kelvin_from_degf(given["inner_surface_temp_degF"])
    od = given["inside_diameter_in"] * INCH
    tabled = [([(200.0, k), (400.0, k), (900.0, k)], t) for k, t in layers]
    common = dict(shape="pipe", od=od, length=1.0, temp=inner, ambient=kelvin_from_degf(70.0),
                  wind=0.0, emissivity=0.9, orientation="horizontal", surroundings=None,
                  surface_model="correlations")
    constant = solve_item(layers=layers, **common)
    table = solve_item(layers=tabled, **common)
    assert table.converged and constant.converged
    assert table.heat_loss_per_m == pytest.approx(constant.heat_loss_per_m, rel=1e-6)
    assert table.surface_temp == pytest.approx(constant.surface_temp, rel=1e-9)
