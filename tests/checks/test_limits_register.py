"""One register whose items sit just either side of every register-level limit of the shipped
checks, run through the whole audit: each item is flagged exactly as the limits say.

The limits are read from the shipped rules (so the test follows a plant's edits of them); the
boundary each pair straddles is stated beside it.  In each pair, ``-IN`` sits on the accepted
side of the limit and ``-OUT`` on the flagged side.  heat-loss-limit's boundary is a computed heat
loss; its either-side test is in test_heat_loss_limit.py, and so are those of tracing-shortfall,
freeze-risk and temperature-drop (a computed heat loss, time and outlet temperature) in
test_cold_weather_checks.py.
"""

import numpy as np
import pytest

from audit.engine.psychrometrics import dew_point_hyland_wexler
from audit.pipeline import audit_register
from audit.rules import load_rules

C = 273.15


@pytest.fixture(scope="module")
def audit(tmp_path_factory):
    rules = load_rules()
    touch = rules.checks["touch-temperature"].params["limit_metal"]               # 60 degC
    foam_max = rules.materials["elastomeric-foam"].max_temp - C                      # 104 degC
    case = rules.checks["condensation"].site  # these items are indoors: its own case if any
    humid = rules.sites["indoor"].design.get(case) or rules.sites[case]
    margin = rules.checks["condensation"].params.get("margin", 1.0)
    dew = float(dew_point_hyland_wexler(np.array([humid.ambient]), np.array([humid.rh]))[0]) - C
    cui_low = rules.checks["cui-window"].params["windows"]["carbon-steel"][0][0]      # -12 degC
    spec = rules.specs["heat-conservation"]  # NPS 4 at 150 degC: 50 mm, tolerance 3 mm
    need = spec.thickness[1][1] * 1000
    tol = spec.tolerance * 1000
    head = "tag,nps,length,temp,layers,jacket,location,accessible,condition,service,material\n"
    rows = [
        # touch-temperature: bare metal on the hot still day sits at the process temperature.
        f"TOUCH-IN,2,5,{touch - 0.5},none,,indoor,yes,intact,personnel,stainless-steel",
        f"TOUCH-OUT,2,5,{touch + 0.5},none,,indoor,yes,intact,personnel,stainless-steel",
        # layer-overheat: the inner face of the first layer is at the process temperature.
        f"HOT-IN,2,5,{foam_max - 0.5},elastomeric-foam 25mm,pvc,indoor,no,intact,,stainless-steel",
        f"HOT-OUT,2,5,{foam_max + 0.5},elastomeric-foam 25mm,pvc,indoor,no,intact,,stainless-steel",
        # below-spec: installed vs required minus tolerance.
        f"SPEC-IN,4,5,150,mineral-wool {need - tol:g}mm,aluminium-oxidised,indoor,no,intact,heat-conservation,stainless-steel",
        f"SPEC-OUT,4,5,150,mineral-wool {need - tol - 1:g}mm,aluminium-oxidised,indoor,no,intact,heat-conservation,stainless-steel",
        # condition: intact vs wet.
        "COND-IN,4,5,150,mineral-wool 50mm,aluminium-oxidised,indoor,no,intact,heat-conservation,stainless-steel",
        "COND-OUT,4,5,150,mineral-wool 50mm,aluminium-oxidised,indoor,no,wet,heat-conservation,stainless-steel",
        # cui-window: insulated carbon steel either side of the window's lower edge.
        f"CUI-IN,4,5,{cui_low - 0.1},elastomeric-foam 50mm,pvc,indoor,no,intact,,carbon-steel",
        f"CUI-OUT,4,5,{cui_low + 0.1},elastomeric-foam 50mm,pvc,indoor,no,intact,,carbon-steel",
        # condensation: bare cold metal at the dew point plus margin on the humid day.
        f"DEW-IN,2,5,{dew + margin + 0.2},none,,indoor,no,intact,,stainless-steel",
        f"DEW-OUT,2,5,{dew + margin - 0.2},none,,indoor,no,intact,,stainless-steel",
    ]
    path = tmp_path_factory.mktemp("limits") / "limits.csv"
    path.write_text(head + "\n".join(rows) + "\n", encoding="utf-8")
    return audit_register([path], rules=rules)


@pytest.mark.parametrize("pair, check", [
    ("TOUCH", "touch-temperature"), ("HOT", "layer-overheat"), ("SPEC", "below-spec"),
    ("COND", "condition"), ("CUI", "cui-window"), ("DEW", "condensation"),
])
def test_flagged_exactly_outside_the_limit(audit, pair, check):
    flagged = set(audit.findings.loc[audit.findings["check"] == check, "tag"])
    assert f"{pair}-OUT" in flagged
    assert f"{pair}-IN" not in flagged


def test_every_item_audited(audit):
    assert (audit.results["status"] == "audited").all(), audit.results["reason"].tolist()
