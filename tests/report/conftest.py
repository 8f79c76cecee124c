"""A small register with hostile text in it, audited once per test session."""

import pytest

from audit.pipeline import audit_register

#: Tags, areas and an extra column carrying markup, formulas, paths and URLs: all must come
#: out as inert text.  The items are chosen so that burn-risk and other findings exist.
HOSTILE_REGISTER = (
    'tag,area_code,nps,length,temp,insulation,thickness,jacket,accessible,condition,damaged,valves,flanges,drawing\n'
    '<script>alert(1)</script>,../../evil,4,10,200,none,,,yes,missing,,0,2,file:///etc/passwd\n'
    '"=HYPERLINK(""http://example.invalid"")",CON,2,5,250,mineral-wool,25,aluminium-oxidised,yes,intact,,1,2,'
    '"<img src=""http://example.invalid/x.png"">"\n'
    'L-OK,U1,6,8,150,mineral-wool,80,aluminium-oxidised,no,intact,,0,0,DWG-1\n'
    'L-HOT,U1,3,12,300,mineral-wool,25,aluminium-oxidised,yes,damaged,20,0,0,DWG-3\n'
    'L-BAD,U1,2,5,TBA,mineral-wool,40,aluminium-oxidised,no,intact,,0,0,DWG-2\n')

META = {"tool": "lagaudit test", "run_at": "2026-01-01T00:00:00+00:00",
        "registers": [{"file": "hostile.csv", "sha256": "0" * 64}], "surface_model": "correlations"}


@pytest.fixture
def meta():
    return dict(META)


@pytest.fixture(scope="session")
def hostile_audit(tmp_path_factory):
    path = tmp_path_factory.mktemp("register") / "hostile.csv"
    path.write_text(HOSTILE_REGISTER, encoding="utf-8")
    return audit_register([path])


@pytest.fixture(scope="session")
def demo_audit():
    from pathlib import Path
    return audit_register([Path(__file__).resolve().parents[2] / "sample_data" / "demo_line_list.csv"])
