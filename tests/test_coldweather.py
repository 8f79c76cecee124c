"""Tracing need, outlet temperature and time to freeze with the real engine (audit/coldweather.py),
against independent solves, an independent numerical integration and reference libraries."""

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from fluids.piping import nearest_pipe
from scipy.integrate import solve_ivp

from audit.checks.base import CheckContext
from audit.coldweather import (freeze_times, loss_per_metre, outlet_temperatures,
                               tracing_needed, tracing_output, wall_thickness)
from audit.thermal import thermal_states
from support import item_table

C = 273.15
HEAD = "tag,nps,length,temp,layers,jacket,location,tracing,maintain,flow,fluid,schedule,wall\n"


@pytest.fixture(scope="module")
def context(tmp_path_factory, rules):
    text = HEAD + "\n".join([
        "TR-E,4,100,60,mineral-wool 50,aluminium-oxidised,outdoor,electric 2x15 W/m,40,,,,",
        "TR-E-AT,4,100,40,mineral-wool 50,aluminium-oxidised,outdoor,none,,,,,",
        "TR-S,2,50,10,mineral-wool 25,aluminium-oxidised,outdoor,steam 1/2in 120 degC,20,,,,",
        "FLOW,6,600,80,mineral-wool 40,aluminium-oxidised,outdoor,none,,5,water,,",
        "STILL,2,40,8,mineral-wool 25,aluminium-oxidised,outdoor,none,,,water,,",
        "STILL80,2,40,8,mineral-wool 25,aluminium-oxidised,outdoor,none,,,water,80,",
        "STILLW,2,40,8,mineral-wool 25,aluminium-oxidised,outdoor,none,,,water,,4.5",
    ]) + "\n"
    table = item_table(tmp_path_factory.mktemp("cw"), text, rules)
    assert (table["status"] == "ok").all(), table["reason"].tolist()
    return CheckContext(table, rules)


def row(context, tag):
    return int(np.flatnonzero(context.table["tag"] == tag)[0])


def test_tracing_need_is_the_engines_loss_at_maintain_times_the_margin(context):
    # The same line registered at its maintain temperature, solved the ordinary way.
    need = tracing_needed(context, "cold-design-day", 1.2)
    states = thermal_states(context.table, context.rules, site="cold-design-day")
    at_maintain = states["heat_loss_W_per_m"].to_numpy(float)[row(context, "TR-E-AT")]
    assert need[row(context, "TR-E")] == pytest.approx(1.2 * at_maintain, rel=1e-9)
    assert np.isnan(need[row(context, "FLOW")])  # not traced


def test_tracing_output_electric_is_rating_times_cables_and_steam_is_conductance_times_excess(context):
    out = tracing_output(context.table, 150 + C, ((0.5, 0.4),))
    assert out[row(context, "TR-E")] == pytest.approx(30.0)
    assert out[row(context, "TR-S")] == pytest.approx(0.4 * (120 - 20))  # the cell's steam temp
    assert np.isnan(tracing_output(context.table, 150 + C, ((0.375, 0.3),))[row(context, "TR-S")])


def test_the_outlet_temperature_with_the_engine_agrees_with_an_independent_integration(context):
    i = row(context, "FLOW")
    outlet = outlet_temperatures(context, "cold-design-day")[i]
    loss, air = loss_per_metre(context, np.array([i]), "cold-design-day")
    rate = 5 * context.rules.fluids["water"].cp
    ivp = solve_ivp(lambda x, t: -loss(np.array([[t[0]]]))[0] / rate, (0, 600), [80 + C],
                    rtol=1e-10, atol=1e-8)
    # The march's eight steps against a tight adaptive solve of the same engine loss.
    assert outlet == pytest.approx(ivp.y[0, -1], abs=1e-4)
    # And between the textbook exponentials with U held at its inlet and its outlet value
    # (Incropera ch. 8): the loss per kelvin grows with the line's temperature.
    g = [loss(np.array([[t]]))[0, 0] / (t - air[0]) for t in (80 + C, outlet)]
    bounds = [air[0] + (80 + C - air[0]) * np.exp(-gi * 600 / rate) for gi in g]
    assert min(bounds) <= outlet <= max(bounds)


def _freeze_by_hand(context, i, wall_m, share=0.25):
    """Time to freeze integrated in time by scipy, with the heat capacity built from CoolProp
    and the fluids library's pipe table, not from the rules' values."""
    od = 0.0603  # NPS 2, ASME B36.10M
    bore = np.pi / 4 * (od - 2 * wall_m) ** 2
    steel = np.pi / 4 * od ** 2 - bore
    rho = CP.PropsSI("D", "T", 283.15, "P", 101325, "Water")
    cp_w = CP.PropsSI("C", "T", 298.15, "P", 101325, "Water")
    # Carbon steel: 7854 kg/m3, 434 J/(kg K), Incropera Table A.1 (from memory, as the rules).
    capacity = rho * bore * cp_w + 7854 * 434 * steel
    latent = 333.6e3  # J/kg, the enthalpy of melting of ice at 0 degC (from memory)
    loss, _ = loss_per_metre(context, np.array([i]), "cold-design-day")
    t_f = CP.PropsSI("Ttriple", "Water")

    def reached(t, temp):
        return temp[0] - t_f
    reached.terminal = True
    ivp = solve_ivp(lambda t, temp: -loss(np.array([[temp[0]]]))[0] / capacity, (0, 1e7),
                    [8 + C], events=reached, rtol=1e-10, atol=1e-8)
    return ivp.t_events[0][0] + share * rho * bore * latent / loss(np.array([[t_f]]))[0, 0]


@pytest.mark.parametrize("tag, schedule", [("STILL", "40"), ("STILL80", "80")])
def test_time_to_freeze_agrees_with_an_independent_integration(context, tag, schedule):
    i = row(context, tag)
    wall = nearest_pipe(NPS=2, schedule=schedule)[3]
    seconds = freeze_times(context, "cold-design-day", 0.25)[i]
    # Same engine loss; independent properties (CoolProp's water at 10 and 25 degC as the
    # rules state them, to their 4 figures) and integration: within 0.1 %.
    assert seconds == pytest.approx(_freeze_by_hand(context, i, wall), rel=1e-3)


def test_the_wall_comes_from_wall_else_schedule_else_schedule_40(context):
    wall = wall_thickness(context.table)
    assert wall[row(context, "STILL")] == pytest.approx(nearest_pipe(NPS=2, schedule="40")[3])
    assert wall[row(context, "STILL80")] == pytest.approx(nearest_pipe(NPS=2, schedule="80")[3])
    assert wall[row(context, "STILLW")] == pytest.approx(0.0045)


def test_no_freezing_where_the_air_is_above_the_freezing_point(context):
    # Outdoor (the rules' mild day, 20 degC): the stagnant line never freezes.
    times = freeze_times(context, "outdoor", 0.25)
    assert np.isinf(times[row(context, "STILL")])
    assert np.isnan(times[row(context, "FLOW")])  # flowing: not a stagnant line


def test_thicker_insulation_lowers_the_need_delays_freezing_and_warms_the_outlet(tmp_path, rules):
    # Beyond the critical radius (all these lines are well beyond it) more insulation loses
    # less heat at every temperature: each answer must move monotonically with thickness.
    thicknesses = (20, 40, 60, 100)
    rows = []
    for mm in thicknesses:
        layers = f"mineral-wool {mm}"
        rows += [f"T{mm},4,100,60,{layers},aluminium-oxidised,outdoor,electric 30,40,,,,",
                 f"S{mm},2,40,8,{layers},aluminium-oxidised,outdoor,none,,,water,,",
                 f"F{mm},6,600,80,{layers},aluminium-oxidised,outdoor,none,,5,water,,"]
    table = item_table(tmp_path, HEAD + "\n".join(rows) + "\n", rules)
    context = CheckContext(table, rules)
    tags = table["tag"].to_numpy(object)
    need = tracing_needed(context, "cold-design-day", 1.2)
    freeze = freeze_times(context, "cold-design-day", 0.25)
    outlet = outlet_temperatures(context, "cold-design-day")
    pick = lambda values, kind: [values[tags == f"{kind}{mm}"][0] for mm in thicknesses]  # noqa: E731
    assert np.all(np.diff(pick(need, "T")) < 0)
    assert np.all(np.diff(pick(freeze, "S")) > 0)
    assert np.all(np.diff(pick(outlet, "F")) > 0)
