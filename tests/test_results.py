"""The results table (audit/results.py): the values each check judged, the inputs as the audit
understood them, the emissivity of the surface reported, and the workbook's numbers."""

import numpy as np
import openpyxl
import pytest

from audit.cli import main
from audit.pipeline import audit_register

C = 273.15
REGISTER = """tag,nps,length,temp,layers,jacket,location,accessible,material,valves,flanges,Design Temp,Line Class
HOT-BARE,4,10,150,none,,outdoor,yes,stainless-steel,0,0,-170,007
VESSEL-1,,,200,mineral-wool 25mm,aluminium-oxidised,outdoor,yes,,0,0,250.5,A1
FLG-1,4,10,180,mineral-wool 50mm + calcium-silicate 25 mm,aluminium-oxidised,indoor,yes,carbon-steel,0,2,,B
"""


@pytest.fixture(scope="module")
def audit(tmp_path_factory):
    path = tmp_path_factory.mktemp("results") / "reg.csv"
    path.write_text(REGISTER.replace("VESSEL-1,,,", "VESSEL-1,,,"), encoding="utf-8")
    return audit_register([path])


def test_every_design_case_a_check_judged_is_a_column(audit):
    cases = {c.site for c in audit.rules.checks.values() if c.enabled and c.site}
    for case in cases:
        assert f"surface_temp@{case} [degC]" in audit.results.columns


def test_a_burn_finding_shows_the_value_the_results_carry(audit):
    # Filtering results.csv on the hot still day's surface finds what the burn check judged.
    burns = audit.findings[audit.findings["check"] == "touch-temperature"]
    assert len(burns)
    results = audit.results.set_index("tag")
    for _, finding in burns.iterrows():
        judged = results.loc[finding["tag"], "surface_temp@hot-still-day [degC]"]
        assert finding["value"] == pytest.approx(judged, rel=1e-12), finding["tag"]


def test_recognised_inputs_are_echoed_with_units(audit):
    r = audit.results.set_index("tag")
    # NPS 4: outside diameter 4.500 in = 114.3 mm (ASME B36.10M).
    assert r.loc["HOT-BARE", "od [mm]"] == pytest.approx(114.3)
    assert r.loc["HOT-BARE", "nps"] == "4"
    assert r.loc["HOT-BARE", "length [m]"] == 10.0
    assert r.loc["HOT-BARE", "temp [degC]"] == pytest.approx(150.0)
    assert r.loc["HOT-BARE", "layers"] == "none"
    assert r.loc["FLG-1", "layers"] == "mineral-wool 50mm + calcium-silicate 25mm"
    assert r.loc["FLG-1", "accessible"] == "yes" and r.loc["FLG-1", "location"] == "indoor"
    columns = list(audit.results.columns)
    assert columns.index("service") < columns.index("warnings") < columns.index("Design Temp")


def test_the_emissivity_is_that_of_the_surface_reported(audit):
    r = audit.results.set_index("tag")
    metals, jackets = audit.rules.metals, audit.rules.jackets
    assert r.loc["HOT-BARE", "surface_part"] == "bare metal"
    assert r.loc["HOT-BARE", "emissivity [-]"] == metals["stainless-steel"].emissivity
    # Bare flanges are the hottest part of FLG-1: their metal's emissivity, not the jacket's.
    assert r.loc["FLG-1", "surface_part"] == "bare metal"
    assert r.loc["FLG-1", "emissivity [-]"] == metals["carbon-steel"].emissivity
    assert r.loc["FLG-1", "surface_temp [degC]"] > r.loc["FLG-1", "surface_temp_insulated [degC]"]


def test_finding_values_carry_no_float_noise(audit):
    from audit.results import findings_out

    written = findings_out(audit.findings)
    for column in ("value", "limit", "remedy_thickness [mm]"):
        for x in written[column].dropna():
            assert x == float(f"{x:.6g}")


def test_register_numbers_stay_numbers_in_the_workbook(tmp_path):
    path = tmp_path / "reg.csv"
    path.write_text(REGISTER.replace("VESSEL-1,,,", "VESSEL-1,4,10,"), encoding="utf-8")
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--format", "xlsx,csv",
                 "-q"]) == 0
    sheet = openpyxl.load_workbook(tmp_path / "out" / "results.xlsx")["results"]
    header = [c.value for c in sheet[1]]
    design, line_class = header.index("Design Temp"), header.index("Line Class")
    rows = [[c.value for c in row] for row in sheet.iter_rows(min_row=2)]
    assert [r[design] for r in rows] == [-170, 250.5, ""]  # an empty cell stays as read
    assert [r[line_class] for r in rows] == ["007", "A1", "B"]  # a code's zeros are its own
    # The CSV keeps the register's text as written.
    assert "-170,007" in (tmp_path / "out" / "results.csv").read_text(encoding="utf-8")


def test_significant_figures_round_as_decimal_text_does():
    # The reference is Python's own correctly rounded decimal formatting (float(f"{x:.6g}")).
    from hypothesis import given, strategies as st

    from audit.results import significant

    # Over the magnitudes an audit writes (1e-9 to 1e12; the powers of ten used are exact
    # up to 1e22).
    magnitude = st.floats(min_value=1e-9, max_value=1e12)

    @given(magnitude, st.sampled_from([1.0, -1.0]))
    def check(x, sign):
        assert significant([sign * x])[0] == float(f"{sign * x:.6g}")

    check()
    assert significant([175.00000000000003, 88.89999999999999])[0] == 175.0
    assert significant([88.89999999999999])[0] == 88.9
    assert np.isnan(significant([np.nan])[0])
