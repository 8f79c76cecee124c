"""Write the demo plant's registers into ``sample_data/`` (or a folder given on the command line).

The plant, Quarvel Point Works, is invented: its name, tags, units and numbers come from this
script, not from any real site.  The registers are meant to look like exports from a real plant's
document system, mess included:

* a line list (about 300 lines) and an equipment list (about 40 vessels, spheres, tanks and flat
  surfaces), each as CSV and as XLSX with the same rows;
* header aliases (``Line No``, ``Op Temp [degC]``, ``Lagging``, ``Cladding``, ``MOC``, ...) and
  units in headers; cells with their own units (``331 F``, ``354 ft``, ``2in``, ``1-1/2"``,
  ``DN150``, ``8000 h/yr``), layered thickness notation (``calcium-silicate 50mm + mineral-wool
  2x40mm``; ``2x2.5`` inches in the equipment list), ``AMB`` and ``normal/max`` temperatures;
* extra columns the audit carries through (``P&ID``, ``Drawing``, ``Stream``, ``Remarks``) and the
  CUI columns ``Cyclic`` and ``Install Year``, and the height of each item above grade or its
  platform (``Elevation [m]``, ``Elev``) for the work orders' access planning;
* in the XLSX, a title block above the header row and a notes sheet without a register;
* a few bad rows, each a different mistake found in real registers (listed in ``BAD_ROWS``);
* a small cold area in a register of its own (``COLD_AREA``): an LNG unit with a
  liquid-nitrogen supply, and a refrigerated hall.

The rows come from a fixed random state, so the files are the same on every run::

    python tools/make_demo_plant.py            # rewrites sample_data/
    python tools/make_demo_plant.py /tmp/demo  # somewhere else
"""

from __future__ import annotations

import csv
import datetime
import sys
from pathlib import Path

import numpy as np
import xlsxwriter

PLANT = "Quarvel Point Works"
RANDOM_STATE = 7207
N_LINES = 300
REVISION = "rev C"
OUT = Path(__file__).resolve().parent.parent / "sample_data"
#: A fixed creation date, so that the XLSX files do not change from run to run.
CREATED = datetime.datetime(2026, 1, 15, 8, 0, 0)

#: The cold-weather columns (heat tracing, freeze protection, temperature drop), after every
#: other column: empty on every line but those of :func:`_add_cold_weather_lines`.
COLD_WEATHER_HEADERS = ["Tracing", "Maintain [degC]", "Flow [kg/s]", "Fluid", "Schedule"]

LINE_HEADERS = ["Line No", "Unit", "P&ID", "Stream", "Size", "Length [m]", "Orientation",
                "Op Temp [degC]", "Lagging", "Cladding", "Location", "Access",
                "Insul Condition", "Damaged [%]", "Pipe Material", "Bare Valves",
                "Bare Flanges", "Op Hours", "Purpose", "Cyclic", "Install Year", "Remarks",
                "Elevation [m]", *COLD_WEATHER_HEADERS]

EQUIPMENT_HEADERS = ["Equipment Tag", "Description", "Type", "Diameter [mm]", "Tan Tan [m]",
                     "Surface Area [m^2]", "Head Type", "Orientation", "Op Temp [degF]",
                     "Insulation Material", "Insul Thk [in]", "Cladding", "Site", "Access",
                     "Condition", "Damage [%]", "MOC", "Plant Unit", "Op Hours", "Purpose",
                     "Cyclic Service", "Install Year", "Drawing", "Elev"]
#: Elevations come from a random state of their own, added after every other cell, so that
#: adding them left the rest of the plant as it was.
ELEVATION_STATE = 7209
#: Pipe-rack levels of the invented plant above grade [m]; lines within reach run lower.
RACK_LEVELS_M = (4.5, 6.0, 7.5, 9.0)

#: Plant units: code, name, fluids with (low, high) operating temperature [degC], metal.
UNITS = [
    ("U10", "crude preheat", [("crude", 120, 320), ("hot oil return", 180, 290)], "carbon-steel"),
    ("U20", "steam and condensate", [("LP steam", 150, 160), ("MP steam", 210, 250),
                                     ("HP steam", 380, 420), ("condensate", 90, 130)],
     "carbon-steel"),
    ("U30", "reformer and hot oil", [("reactor effluent", 420, 530), ("hot oil supply", 300, 340),
                                     ("flue-gas sample", 350, 450)], "carbon-steel"),
    ("U40", "refrigeration", [("propane refrigerant", -40, -20), ("chilled glycol", 2, 8),
                              ("ethylene vent", -45, -30)], "stainless-steel"),
    ("U50", "utilities and tank farm", [("heated fuel oil", 60, 110), ("tempered water", 55, 85),
                                        ("bitumen", 160, 190)], "carbon-steel"),
    ("U60", "amine treating", [("rich amine", 55, 95), ("lean amine", 100, 125),
                               ("reflux", 45, 60)], "stainless-steel"),
]
UNIT_WEIGHTS = [0.22, 0.2, 0.14, 0.14, 0.16, 0.14]
SIZES = ["1/2", "3/4", "1", "1-1/2", "2", "3", "4", "6", "8", "10", "12", "16", "20", "24"]
SIZE_WEIGHTS = np.array([3, 4, 8, 8, 12, 10, 12, 11, 9, 7, 6, 4, 3, 3], float)
STOCK_MM = [13, 19, 25, 32, 40, 50, 65, 75, 80, 90, 100, 115, 130, 150]

#: Rows that hold a mistake real registers contain, by line-list position: what is wrong.
BAD_ROWS = {
    17: ("Length [m]", "TBA"),                    # not yet measured
    58: ("Op Temp [degC]", "25O"),                # letter O typed for a zero
    101: ("Size", "7"),                           # NPS 7 is not a standard size
    142: ("Lagging", "minerl wool 50mm"),         # misspelt material
    187: ("Insul Condition", "damaged"),          # damaged, but no share given (Damaged [%] empty)
    233: ("Access", "?"),                         # not a yes/no
    271: ("Lagging", ""),                         # insulation not recorded at all
}


def _fmt_mm(rng, mm: int) -> str:
    """A thickness as a register writes it: mostly mm, sometimes inches or a 2x layer."""
    pick = rng.random()
    if pick < 0.15 and mm in (25, 50, 75, 100):
        return f"{mm // 25}in"
    if pick < 0.27 and mm >= 80 and mm % 2 == 0:
        return f"2x{mm // 2}mm"
    return f"{mm}mm"


def _stock(mm: float) -> int:
    return min(STOCK_MM, key=lambda s: (abs(s - mm), s))


def _spec_mm(temp_c: float, size: str, cold: bool) -> int:
    """Roughly what the demo specification (rules/spec-demo.toml) asks: the plant built to it."""
    big = SIZES.index(size) >= SIZES.index("8")
    if cold:
        return 50 if temp_c < -20 and big else 40 if temp_c < -20 else 32
    for top, small_mm, big_mm in ((100, 25, 50), (200, 50, 65), (300, 65, 90), (400, 100, 115),
                                  (600, 115, 130)):
        if temp_c <= top:
            return small_mm if SIZES.index(size) <= SIZES.index("6") else big_mm
    return 130


def _layers(rng, temp_c: float, size: str, cold: bool, thin: bool) -> str:
    """The installed insulation of a line, innermost first."""
    mm = _spec_mm(temp_c, size, cold)
    if thin:
        mm = _stock(mm * rng.uniform(0.45, 0.7))
    if cold:
        material = "elastomeric-foam" if mm <= 40 else "polyisocyanurate"
        return f"{material} {_fmt_mm(rng, mm)}"
    if temp_c > 400:
        inner = 50 if mm >= 90 else 40
        return f"calcium-silicate {inner}mm + mineral-wool {_fmt_mm(rng, _stock(mm - inner))}"
    if temp_c > 300 and rng.random() < 0.5:
        return f"calcium-silicate {_fmt_mm(rng, mm)}"
    return f"mineral-wool {_fmt_mm(rng, mm)}"


def _temp_text(rng, temp_c: float, high: float) -> str:
    pick = rng.random()
    if pick < 0.08:
        return f"{temp_c * 9 / 5 + 32:.0f} F"
    if pick < 0.13 and high - temp_c >= 10:
        return f"{temp_c:.0f}/{high:.0f}"
    return f"{temp_c:.0f}"


def line_rows(rng) -> list[list]:
    rows = []
    for i in range(N_LINES):
        code, _, fluids, metal = UNITS[rng.choice(len(UNITS), p=UNIT_WEIGHTS)]
        fluid, low, high = fluids[rng.integers(len(fluids))]
        temp_c = float(np.round(rng.uniform(low, high)))
        cold = high < 15
        size = SIZES[rng.choice(len(SIZES), p=SIZE_WEIGHTS / SIZE_WEIGHTS.sum())]
        if cold and SIZES.index(size) > SIZES.index("12"):
            size = "12"
        length = int(rng.integers(4, 120))
        number = 4001 + i
        tag = f"QP-{code[1:]}-{fluid[:2].upper().replace(' ', '')}-{number}"
        thin = rng.random() < 0.1
        lagging = _layers(rng, temp_c, size, cold, thin)
        # Installation mistakes that overheat a layer: a foam on a hot line, wool alone on the
        # hottest lines.
        if not cold and 105 < temp_c < 200 and rng.random() < 0.04:
            lagging = f"elastomeric-foam {_fmt_mm(rng, 25)}"
        if temp_c > 500 and rng.random() < 0.5:
            lagging = f"mineral-wool {_fmt_mm(rng, 100)}"
        condition, damaged = "intact", ""
        pick = rng.random()
        if pick < 0.08:
            condition, damaged = "damaged", str(int(rng.choice([5, 10, 15, 25, 40])))
        elif pick < 0.13:
            condition = "wet"
        elif pick < 0.17:
            condition = "missing"
        if condition == "wet" and lagging.startswith("elastomeric"):
            condition = "intact"
        accessible = rng.random() < 0.3
        access = rng.choice(["Y", "yes"]) if accessible else rng.choice(["N", "no", "no"])
        fittings = rng.random() < 0.22
        valves = int(rng.integers(1, 4)) if fittings else 0
        flanges = int(rng.integers(0, 7)) if fittings else 0
        jacket = ("pvc" if cold and rng.random() < 0.5 else
                  str(rng.choice(["Aluminium-Oxidised", "aluminium-oxidised", "aluminium-oxidised",
                                  "stainless-steel", "aluminium-bright", "0.9", ""])))
        location = "indoor" if code == "U50" and rng.random() < 0.4 else "outdoor-annual-mean"
        purpose = ("cold" if cold else
                   "personnel" if accessible and temp_c < 150 and rng.random() < 0.5 else
                   "heat-conservation" if rng.random() < 0.85 else "")
        hours = str(rng.choice(["8760", "8400", "8000 h/yr", "6000", ""]))
        length_text = f"{length * 3.28084:.0f} ft" if rng.random() < 0.07 else str(length)
        rows.append([
            tag, code, f"QP-{code[1:]}-PID-{rng.integers(1, 40):03d}", fluid,
            _size_text(rng, size), length_text,
            "vertical" if rng.random() < 0.12 else "horizontal",
            _temp_text(rng, temp_c, high), lagging, jacket, location, access, condition,
            damaged, metal.replace("-", " ").title() if rng.random() < 0.2 else metal,
            str(valves), str(flanges), hours, purpose,
            str(rng.choice(["yes", "no", "no", "no", ""])),
            str(int(rng.integers(1986, 2024))), ""])
    _add_fixed_lines(rows)
    cold_weather = _add_cold_weather_lines(rows)
    for position, (header, value) in BAD_ROWS.items():
        rows[position][LINE_HEADERS.index(header)] = value
        rows[position][LINE_HEADERS.index("Remarks")] = "check with site"
    rows[187][LINE_HEADERS.index("Damaged [%]")] = ""
    # A tag entered twice (the second is a later revision of the same line): kept, with a warning.
    rows[120][0] = rows[119][0]
    _add_elevations(rows, LINE_HEADERS.index("Access"), (*(f"{x:g}" for x in RACK_LEVELS_M), "0.5"))
    for row in rows:
        row.extend(cold_weather.get(row[0], [""] * len(COLD_WEATHER_HEADERS)))
    _leave_planning_gaps(rows)
    return rows


#: Planning demo: lines whose register leaves the elevation and the install year empty, so
#: that their work orders show access "unknown" and an asbestos survey presumed, with why.
UNRECORDED_PLANNING = ("QP-20-ST-2901",)


def _leave_planning_gaps(rows: list[list]) -> None:
    """Empty the ``Elevation [m]`` and ``Install Year`` cells of :data:`UNRECORDED_PLANNING`
    (after every random draw, so the rest of the plant is as it was)."""
    tag, elevation, year = (LINE_HEADERS.index(h) for h in ("Line No", "Elevation [m]", "Install Year"))
    for row in rows:
        if row[tag] in UNRECORDED_PLANNING:
            row[elevation] = row[year] = ""


def _add_elevations(rows: list[list], access: int, high: tuple[str, ...]) -> None:
    """Append each row's height above grade or platform: within reach (access yes) 0.3 to
    1.8 m; out of reach one of ``high`` (cells may carry their own unit)."""
    rng = np.random.default_rng(ELEVATION_STATE)
    for row in rows:
        within_reach = str(row[access]).strip().lower() in ("y", "yes")
        row.append(f"{rng.uniform(0.3, 1.8):.1f}" if within_reach else str(rng.choice(high)))


def _size_text(rng, size: str) -> str:
    pick = rng.random()
    dn = {"2": 50, "3": 80, "4": 100, "6": 150, "8": 200, "12": 300}
    if pick < 0.1 and size in dn:
        return f"DN{dn[size]}"
    if pick < 0.25:
        return f'{size}"'
    return size


def _add_fixed_lines(rows: list[list]) -> None:
    """A few lines written by hand, so that every check has at least one clear case."""
    fixed = [
        # a hot accessible line whose flanges were never boxed in
        ["QP-20-ST-2901", "U20", "QP-20-PID-011", "MP steam", "4", "35", "horizontal", "230",
         "mineral-wool 65mm", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact", "",
         "carbon-steel", "1", "4", "8760", "heat-conservation", "no", "2004", ""],
        # a cold line with too little foam: sweats on a humid day
        ["QP-40-PR-2902", "U40", "QP-40-PID-021", "propane refrigerant", "3", "48", "horizontal",
         "-35", "elastomeric-foam 13mm", "pvc", "outdoor-annual-mean", "no", "intact", "",
         "stainless-steel", "0", "0", "8760", "cold", "no", "2011", "thin foam"],
        # a hot line lagged with wool alone, above wool's limit
        ["QP-30-RE-2903", "U30", "QP-30-PID-004", "reactor effluent", "10", "60", "horizontal",
         "1250 F", "mineral-wool 4in", "aluminium-oxidised", "outdoor-annual-mean", "no",
         "intact", "", "carbon-steel", "0", "2", "8400", "heat-conservation", "yes", "1995", ""],
        # a wet line in the CUI window, cycling
        ["QP-50-HE-2904", "U50", "QP-50-PID-030", "heated fuel oil", "6", "80", "horizontal",
         "90", "mineral-wool 40mm", "", "outdoor-annual-mean", "no", "wet", "", "carbon-steel",
         "0", "0", "8000 h/yr", "heat-conservation", "yes", "1989", "lagging soaked"],
    ]
    for k, row in enumerate(fixed):
        rows[-(k + 1)] = row


EQUIPMENT = [
    # tag, description, type, diameter, tan-tan, area, heads, orientation, temp degF,
    # material, thickness in, cladding, site, access, condition, damage, moc, unit, hours,
    # purpose, cyclic, install year, drawing
    ("QP-10-C-101", "crude column", "vertical-vessel", "3200", "32", "", "ellipsoidal", "", "680",
     "mineral-wool", "4", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U10", "8400", "heat-conservation", "no", "1992", "D-10-101"),
    ("QP-10-D-102", "desalter", "horizontal-vessel", "3.6 m", "14", "", "ellipsoidal", "", "275",
     "mineral-wool", "2", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged", "10",
     "carbon-steel", "U10", "8400", "heat-conservation", "yes", "1992", "D-10-102"),
    ("QP-10-D-103", "flash drum", "vertical-vessel", "1800", "6", "", "ellipsoidal", "", "480",
     "calcium-silicate", "3", "stainless-steel", "outdoor-annual-mean", "yes", "intact", "",
     "carbon-steel", "U10", "8400", "heat-conservation", "no", "1998", "D-10-103"),
    ("QP-10-D-104", "fuel gas knock-out drum", "vertical-vessel", "1200", "3.5", "", "ellipsoidal",
     "", "140", "mineral-wool", "1", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact",
     "", "carbon-steel", "U10", "8760", "personnel", "no", "2001", "D-10-104"),
    ("QP-10-E-105", "preheat exchanger shell", "horizontal-vessel", "1100", "6.1", "", "flat", "",
     "390", "mineral-wool", "2", "aluminium-oxidised", "outdoor-annual-mean", "no", "missing", "",
     "carbon-steel", "U10", "8400", "heat-conservation", "no", "1992", "D-10-105"),
    ("QP-20-D-201", "steam drum", "horizontal-vessel", "1500", "5", "", "hemispherical", "", "480",
     "mineral-wool", "3", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U20", "8760", "heat-conservation", "no", "2005", "D-20-201"),
    ("QP-20-D-202", "condensate flash drum", "vertical-vessel", "900", "2.5", "", "ellipsoidal", "",
     "250", "mineral-wool", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact",
     "", "carbon-steel", "U20", "8760", "personnel", "yes", "2005", "D-20-202"),
    ("QP-20-D-203", "deaerator", "horizontal-vessel", "2400", "8", "", "ellipsoidal", "", "220",
     "mineral-wool", "2", "aluminium-oxidised", "outdoor-annual-mean", "no", "wet", "",
     "carbon-steel", "U20", "8760", "heat-conservation", "no", "1988", "D-20-203"),
    ("QP-20-D-204", "blowdown drum", "vertical-vessel", "1600", "4", "", "ellipsoidal", "", "AMB",
     "none", "", "", "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U20", "8760", "",
     "no", "2005", "D-20-204"),
    ("QP-20-D-205", "boiler feed water tank", "vertical-vessel", "4000", "6", "", "flat", "", "200",
     "mineral-wool", "2x1", "galvanised-steel-weathered", "outdoor-annual-mean", "no", "intact",
     "", "carbon-steel", "U20", "8760", "heat-conservation", "yes", "1999", "D-20-205"),
    ("QP-30-R-301", "reformer reactor", "vertical-vessel", "2800", "12", "", "hemispherical", "",
     "950", "calcium-silicate", "2x2.5", "stainless-steel", "outdoor-annual-mean", "no", "intact",
     "", "carbon-steel", "U30", "8400", "heat-conservation", "no", "2008", "D-30-301"),
    ("QP-30-R-302", "second reformer reactor", "vertical-vessel", "2800", "12", "",
     "hemispherical", "", "1050", "mineral-wool", "4", "stainless-steel", "outdoor-annual-mean",
     "no", "intact", "", "carbon-steel", "U30", "8400", "heat-conservation", "no", "2008",
     "D-30-302"),
    ("QP-30-D-303", "hot oil expansion drum", "horizontal-vessel", "1400", "4.5", "", "ellipsoidal",
     "", "600", "calcium-silicate", "3", "aluminium-oxidised", "outdoor-annual-mean", "yes",
     "damaged", "15", "carbon-steel", "U30", "8400", "heat-conservation", "no", "2008",
     "D-30-303"),
    ("QP-30-D-304", "separator", "vertical-vessel", "2000", "7", "", "ellipsoidal", "", "200",
     "mineral-wool", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U30", "8400", "heat-conservation", "yes", "1996", "D-30-304"),
    ("QP-30-F-305", "flue-gas duct panel, north", "flat", "", "", "48", "", "vertical", "660",
     "mineral-wool", "3", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U30", "8400", "heat-conservation", "", "2008", "D-30-305"),
    ("QP-30-F-306", "flue-gas duct roof", "flat", "", "", "30", "", "up", "660", "mineral-wool",
     "3", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U30",
     "8400", "heat-conservation", "", "2008", "D-30-306"),
    ("QP-30-F-307", "heater casing door", "flat", "", "", "4", "", "vertical", "400",
     "calcium-silicate", "1", "painted-metal", "outdoor-annual-mean", "yes", "intact", "",
     "carbon-steel", "U30", "8400", "personnel", "", "2008", "D-30-307"),
    ("QP-40-D-401", "refrigerant accumulator", "horizontal-vessel", "1600", "5", "", "ellipsoidal",
     "", "-31", "polyisocyanurate", "2", "aluminium-oxidised", "outdoor-annual-mean", "no",
     "intact", "", "stainless-steel", "U40", "8760", "cold", "no", "2011", "D-40-401"),
    ("QP-40-D-402", "refrigerant economiser", "vertical-vessel", "1000", "3", "", "ellipsoidal", "",
     "-22", "polyisocyanurate", "1", "mastic", "outdoor-annual-mean", "no", "intact", "",
     "stainless-steel", "U40", "8760", "cold", "no", "2011", "D-40-402"),
    ("QP-40-D-403", "glycol surge drum", "vertical-vessel", "1200", "2.4", "", "flat", "", "41",
     "elastomeric-foam", "1", "pvc", "indoor", "yes", "intact", "", "carbon-steel", "U40", "8760",
     "cold", "no", "2015", "D-40-403"),
    ("QP-40-S-404", "propane sphere", "sphere", "14 m", "", "", "", "", "AMB", "none", "", "",
     "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U40", "8760", "", "no", "1990",
     "D-40-404"),
    ("QP-40-S-405", "refrigerated propane sphere", "sphere", "16 m", "", "", "", "", "-44",
     "polyisocyanurate", "2x2", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U40", "8760", "cold", "no", "1990", "D-40-405"),
    ("QP-40-S-406", "butane sphere", "sphere", "12 m", "", "", "", "", "14", "polyisocyanurate",
     "1", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged", "20", "carbon-steel",
     "U40", "8760", "cold", "yes", "1990", "D-40-406"),
    ("QP-40-D-407", "ethylene vent drum", "vertical-vessel", "800", "2", "", "ellipsoidal", "",
     "-49", "polyisocyanurate", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "no",
     "intact", "", "stainless-steel", "U40", "8760", "cold", "no", "2011", "D-40-407"),
    ("QP-50-T-501", "heated fuel oil tank", "vertical-vessel", "18 m", "14", "", "flat", "", "175",
     "mineral-wool", "2", "galvanised-steel-weathered", "outdoor-annual-mean", "no", "intact", "",
     "carbon-steel", "U50", "8760", "heat-conservation", "no", "1986", "D-50-501"),
    ("QP-50-T-502", "bitumen tank", "vertical-vessel", "12 m", "12", "", "flat", "", "350",
     "mineral-wool", "4", "aluminium-oxidised", "outdoor-annual-mean", "no", "wet", "",
     "carbon-steel", "U50", "8760", "heat-conservation", "yes", "1986", "D-50-502"),
    ("QP-50-T-503", "slop tank", "vertical-vessel", "8 m", "10", "", "flat", "", "140",
     "mineral-wool", "1", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged", "30",
     "carbon-steel", "U50", "6000", "heat-conservation", "yes", "1986", "D-50-503"),
    ("QP-50-T-504", "tempered water tank", "vertical-vessel", "5 m", "6", "", "flat", "", "165",
     "mineral-wool", "2", "aluminium-oxidised", "indoor", "yes", "intact", "", "carbon-steel",
     "U50", "8760", "personnel", "no", "2003", "D-50-504"),
    ("QP-50-T-505", "condensate return tank", "vertical-vessel", "3 m", "4", "", "flat", "", "195",
     "mineral-wool", "1", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact", "",
     "carbon-steel", "U50", "8760", "heat-conservation", "no", "2003", "D-50-505"),
    ("QP-50-T-506", "fire water tank", "vertical-vessel", "15 m", "12", "", "flat", "", "AMB",
     "none", "", "", "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U50", "8760", "",
     "no", "1986", "D-50-506"),
    ("QP-50-D-507", "instrument air receiver", "vertical-vessel", "1500", "3", "", "ellipsoidal",
     "", "AMB", "none", "", "", "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U50",
     "8760", "", "no", "2003", "D-50-507"),
    ("QP-50-D-508", "hot water expansion vessel", "vertical-vessel", "900", "1.8", "",
     "ellipsoidal", "", "185", "mineral-wool", "1", "aluminium-oxidised", "indoor", "yes",
     "intact", "", "carbon-steel", "U50", "8760", "", "no", "2003", "D-50-508"),
    ("QP-60-C-601", "amine regenerator", "vertical-vessel", "2200", "22", "", "ellipsoidal", "",
     "250", "mineral-wool", "2", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "stainless-steel", "U60", "8400", "heat-conservation", "yes", "2000", "D-60-601"),
    ("QP-60-C-602", "amine contactor", "vertical-vessel", "1800", "18", "", "ellipsoidal", "",
     "130", "mineral-wool", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged",
     "5", "stainless-steel", "U60", "8400", "heat-conservation", "no", "2000", "D-60-602"),
    ("QP-60-D-603", "reflux drum", "horizontal-vessel", "1200", "4", "", "ellipsoidal", "", "122",
     "mineral-wool", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact", "",
     "stainless-steel", "U60", "8400", "personnel", "no", "2000", "D-60-603"),
    ("QP-60-D-604", "rich amine flash drum", "horizontal-vessel", "1600", "5", "", "ellipsoidal",
     "", "170", "mineral-wool", "2", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact",
     "", "stainless-steel", "U60", "8400", "heat-conservation", "no", "2000", "D-60-604"),
    ("QP-60-T-605", "lean amine storage tank", "vertical-vessel", "9 m", "8", "", "flat", "",
     "140", "mineral-wool", "1.5", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
     "stainless-steel", "U60", "8760", "heat-conservation", "no", "2000", "D-60-605"),
    ("QP-60-D-606", "amine sump drum", "horizontal-vessel", "1000", "3", "", "flat", "", "110",
     "mineral-wool", "1", "", "outdoor-annual-mean", "no", "intact", "", "stainless-steel", "U60",
     "8760", "", "yes", "2000", "D-60-606"),
    # Mistakes: a US spelling of a jacket the rules do not define; a diameter left as a pointer.
    ("QP-60-D-607", "antifoam drum", "vertical-vessel", "600", "1.5", "", "ellipsoidal", "", "120",
     "mineral-wool", "1", "aluminum", "outdoor-annual-mean", "no", "intact", "", "stainless-steel",
     "U60", "8760", "heat-conservation", "no", "2000", "D-60-607"),
    ("QP-30-D-308", "steam superheater drum", "horizontal-vessel", "see drawing", "4", "",
     "ellipsoidal", "", "700", "calcium-silicate", "3", "aluminium-oxidised",
     "outdoor-annual-mean", "no", "intact", "", "carbon-steel", "U30", "8400",
     "heat-conservation", "no", "2008", "D-30-308"),
]


#: Cold-weather lines of utilities unit U50: the base cells, then the COLD_WEATHER_HEADERS cells.
COLD_WEATHER_LINES = [
    # Heated fuel oil kept pumpable by electric tracing: intact, it holds; the same build-up
    # with wet lagging, and a damaged line on one cable, do not (tracing-shortfall).
    (["QP-50-FO-2950", "U50", "QP-50-PID-031", "heated fuel oil", "4", "80", "horizontal", "70",
      "mineral-wool 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "0", "0", "8760", "heat-conservation", "no", "2012", "traced"],
     ["electric 2x15 W/m", "50", "", "fuel-oil", ""]),
    (["QP-50-FO-2951", "U50", "QP-50-PID-031", "heated fuel oil", "4", "60", "horizontal", "70",
      "mineral-wool 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "wet", "",
      "carbon-steel", "0", "0", "8760", "heat-conservation", "no", "2012", "traced, lagging wet"],
     ["electric 2x15 W/m", "50", "", "fuel-oil", ""]),
    (["QP-50-FO-2952", "U50", "QP-50-PID-032", "heated fuel oil", "3", "45", "horizontal", "65",
      "mineral-wool 40mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged", "20",
      "carbon-steel", "1", "2", "8760", "heat-conservation", "no", "2009", "traced"],
     ["electric 25 W/m", "50", "", "fuel-oil", ""]),
    # Steam-traced bitumen branch: a 3/4 in tracer on its own steam holds it.
    (["QP-50-BI-2953", "U50", "QP-50-PID-033", "bitumen", "2", "30", "horizontal", "170",
      "mineral-wool 65mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "0", "0", "8760", "heat-conservation", "no", "2015", "steam traced"],
     ["steam 3/4in 185 degC", "100", "", "", ""]),
    # A traced water line whose tracing is off the map: 3/4 in tracers are listed, 1 in is not.
    (["QP-50-TW-2954", "U50", "QP-50-PID-034", "tempered water", "2", "25", "horizontal", "60",
      "mineral-wool 40mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "0", "0", "8760", "heat-conservation", "no", "2015", "steam traced"],
     ["steam 1in 150 degC", "40", "", "water", ""]),
    # Firewater: stagnant, untraced. The main holds through the cold day; a hydrant branch with
    # thin lagging and the same branch in the heated pump house show the two ends.
    (["QP-50-FW-2960", "U50", "QP-50-PID-040", "firewater", "8", "400", "horizontal", "8",
      "mineral-wool 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "0", "0", "8760", "frost", "no", "2001", "stagnant firewater main"],
     ["none", "", "", "water", ""]),
    (["QP-50-FW-2961", "U50", "QP-50-PID-040", "firewater", "1-1/2", "35", "horizontal", "8",
      "mineral-wool 25mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "damaged", "10",
      "carbon-steel", "0", "0", "8760", "frost", "no", "2001", "hydrant branch"],
     ["none", "", "", "water", "80"]),
    (["QP-50-FW-2962", "U50", "QP-50-PID-041", "firewater", "1-1/2", "20", "horizontal", "8",
      "mineral-wool 25mm", "aluminium-oxidised", "indoor", "no", "intact", "",
      "carbon-steel", "0", "0", "8760", "frost", "no", "2001", "pump house"],
     ["none", "", "", "water", ""]),
    # The long fuel-oil transfer line to the tank farm: untraced, it arrives too cold on the
    # cold day at its flow; the short loading line arrives warm enough (temperature-drop).
    (["QP-50-FO-2970", "U50", "QP-50-PID-035", "heated fuel oil", "6", "650", "horizontal", "95",
      "mineral-wool 40mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "2", "4", "8760", "heat-conservation", "no", "1998", "transfer line"],
     ["none", "70", "0.6", "fuel-oil", ""]),
    (["QP-50-FO-2971", "U50", "QP-50-PID-036", "heated fuel oil", "4", "90", "horizontal", "95",
      "mineral-wool 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact", "",
      "carbon-steel", "0", "2", "8760", "heat-conservation", "no", "2016", "loading line"],
     ["none", "70", "2.5", "fuel-oil", ""]),
]


def _add_cold_weather_lines(rows: list[list]) -> dict[str, list[str]]:
    """Append the cold-weather lines (traced lines, stagnant firewater, long fuel-oil lines) to
    ``rows``; their cold-weather cells by tag, for after the elevations."""
    for base, _ in COLD_WEATHER_LINES:
        rows.append(list(base))
    return {base[0]: list(cells) for base, cells in COLD_WEATHER_LINES}


def equipment_rows() -> list[list]:
    rows = [list(row) for row in EQUIPMENT]
    _add_elevations(rows, EQUIPMENT_HEADERS.index("Access"), ("0", "0", "3.5", "8 m", "26 ft"))
    return rows


#: The cold area, a register of its own (exported from the cold units' own document system,
#: so its headers differ): U70, an LNG import and send-out unit with a small liquid-nitrogen
#: supply, and U80, a refrigerated hall with an ammonia plant. It exercises who pays for heat
#: gained (boil-off, electricity, nothing), boil-off, cold-touch, ice, layer-too-cold and the
#: fluid and flow columns, two of its rows on purpose wrong.
COLD_AREA_HEADERS = ["Tag", "Unit", "Stream", "Fluid", "Type", "Size", "Diameter [mm]",
                     "Length [m]", "Op Temp [degC]", "Lagging", "Cladding", "Location", "Access",
                     "Condition", "MOC", "Op Hours", "Purpose", "Flow [kg/s]", "Bare Valves",
                     "Bare Flanges", "Install Year", "Elevation [m]", "Remarks"]
COLD_AREA = [
    # U70: LNG at -162 degC boils off what it gains; send-out gas gains heat for free.
    ["QP-70-LNG-7001", "U70", "LNG rundown", "lng", "pipe", "8", "", "120", "-162",
     "polyisocyanurate 2x75mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact",
     "stainless-steel", "8760", "cryogenic", "14", "0", "0", "2019", "7.5", ""],
    ["QP-70-LNG-7002", "U70", "LNG recirculation", "lng", "pipe", "3", "", "60", "-162",
     "polyisocyanurate 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact",
     "stainless-steel", "8760", "cryogenic", "2.5", "0", "0", "2019", "7.5", "thin: keep-cold only"],
    ["QP-70-LNG-7004", "U70", "LNG pump suction valves", "lng", "pipe", "6", "", "4", "-162",
     "none", "", "outdoor-annual-mean", "yes", "intact", "stainless-steel", "8760", "cryogenic",
     "", "2", "4", "2019", "0.5", "valve station left bare"],
    ["QP-70-NG-7003", "U70", "send-out gas", "natural-gas", "pipe", "10", "", "80", "5", "none",
     "", "outdoor-annual-mean", "no", "intact", "carbon-steel", "8760", "", "31", "0", "0", "2019",
     "6.0", "warmed downstream"],
    ["QP-70-T-7010", "U70", "LNG storage tank", "lng", "vertical-vessel", "", "14000", "16",
     "-162", "cellular-glass 150mm + polyisocyanurate 150mm", "aluminium-oxidised",
     "outdoor-annual-mean", "no", "intact", "stainless-steel", "8760", "cryogenic", "", "", "",
     "2019", "0", "flat heads: roof and base"],
    # The liquid-nitrogen supply: one line lagged with a foam rated only to -183 degC.
    ["QP-70-LN-7020", "U70", "LIN supply", "liquid-nitrogen", "pipe", "2", "", "40", "-196",
     "polyisocyanurate 100mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact",
     "stainless-steel", "8760", "cryogenic", "0.4", "0", "0", "2021", "4.5", ""],
    ["QP-70-LN-7021", "U70", "LIN to cold box", "liquid-nitrogen", "pipe", "1", "", "25", "-196",
     "cellular-glass 100mm", "aluminium-oxidised", "outdoor-annual-mean", "yes", "intact",
     "stainless-steel", "8760", "cryogenic", "0.1", "0", "0", "2021", "1.2", ""],
    ["QP-70-D-7022", "U70", "LIN storage vessel", "liquid-nitrogen", "vertical-vessel", "",
     "2400", "8", "-196", "cellular-glass 200mm", "aluminium-oxidised", "outdoor-annual-mean",
     "no", "intact", "stainless-steel", "8760", "cryogenic", "", "", "", "2021", "0", ""],
    # Mistakes: a fluid the rules do not define; a flow with the sign of a reverse-flow export.
    ["QP-70-LNG-7030", "U70", "LNG sample", "LNG-heavy", "pipe", "1/2", "", "15", "-158",
     "polyisocyanurate 50mm", "aluminium-oxidised", "outdoor-annual-mean", "no", "intact",
     "stainless-steel", "8760", "cryogenic", "0.01", "0", "0", "2019", "3.0", ""],
    ["QP-70-NG-7031", "U70", "send-out gas bypass", "natural-gas", "pipe", "6", "", "30", "5",
     "none", "", "outdoor-annual-mean", "no", "intact", "carbon-steel", "8760", "", "-3.2", "0",
     "0", "2019", "6.0", "flow from DCS export"],
    # U80: the refrigerated hall (its own design air, rules/sites.toml), ammonia plant.
    ["QP-80-NH-8001", "U80", "ammonia liquid", "ammonia", "pipe", "2", "", "50", "-34",
     "elastomeric-foam 32mm", "pvc", "refrigerated-hall", "yes", "intact", "stainless-steel",
     "8760", "cold", "0.6", "0", "0", "2016", "2.0", ""],
    ["QP-80-NH-8002", "U80", "ammonia wet suction", "ammonia", "pipe", "4", "", "40", "-40",
     "mineral-wool 50mm", "pvc", "refrigerated-hall", "no", "intact", "stainless-steel", "8760",
     "cold", "0.9", "0", "0", "2016", "4.5", "wool on a cold line"],
    ["QP-80-NH-8005", "U80", "ammonia valve group", "ammonia", "pipe", "2", "", "1", "-34",
     "none", "", "refrigerated-hall", "yes", "intact", "stainless-steel", "8760", "cold", "",
     "2", "2", "2016", "1.0", "valves left bare"],
    ["QP-80-GL-8003", "U80", "glycol supply", "ethylene-glycol-30", "pipe", "3", "", "60", "-10",
     "elastomeric-foam 25mm", "pvc", "refrigerated-hall", "no", "intact", "stainless-steel",
     "8760", "cold", "3.1", "0", "0", "2016", "3.0", ""],
    ["QP-80-CW-8004", "U80", "chilled water", "water", "pipe", "4", "", "30", "6",
     "calcium-silicate 40mm", "aluminium-oxidised", "refrigerated-hall", "no", "intact",
     "carbon-steel", "8760", "cold", "5.5", "0", "0", "1998", "3.0", "old hot-service lagging"],
]


def cold_area_rows() -> list[list]:
    """The cold area's register rows (see ``COLD_AREA``), written by hand: no random state."""
    return [list(row) for row in COLD_AREA]


def _cell(text: str):
    """What a spreadsheet holds for a register cell: numbers as numbers, the rest as text."""
    try:
        number = float(text)
    except ValueError:
        return text
    if text.strip() != text or not text:
        return text
    return int(number) if number.is_integer() and "." not in text else number


def write_csv(path: Path, headers: list[str], rows: list[list]) -> None:
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle, lineterminator="\n")
        writer.writerow(headers)
        writer.writerows(rows)


def write_xlsx(path: Path, title: str, sheet: str, headers: list[str], rows: list[list],
               notes: list[str]) -> None:
    """A workbook as a plant's document system exports it: title block, header, rows, notes."""
    book = xlsxwriter.Workbook(str(path))
    book.set_properties({"title": title, "company": PLANT, "created": CREATED})
    bold = book.add_format({"bold": True, "font_size": 13})
    head = book.add_format({"bold": True, "bg_color": "#D9E1F2", "border": 1, "text_wrap": True})
    ws = book.add_worksheet(sheet)
    ws.merge_range(0, 0, 0, 6, title, bold)
    ws.write(1, 0, f"{PLANT}, {REVISION}; issued for the insulation survey")
    for c, header in enumerate(headers):
        ws.write(3, c, header, head)
    for r, row in enumerate(rows, start=4):
        for c, text in enumerate(row):
            value = _cell(text)
            if value != "":
                ws.write(r, c, value)
    ws.freeze_panes(4, 1)
    ws.set_column(0, 0, 16)
    ws.set_column(1, len(headers) - 1, 12)
    info = book.add_worksheet("Notes")
    for r, line in enumerate(notes):
        info.write(r, 0, line)
    book.close()


def main(out: Path = OUT) -> list[Path]:
    out.mkdir(parents=True, exist_ok=True)
    rng = np.random.default_rng(RANDOM_STATE)
    lines = line_rows(rng)
    equipment = equipment_rows()
    notes = [f"{PLANT} is an invented plant: every tag, number and name here is made up.",
             "Temperatures are operating temperatures; AMB = at ambient; 120/150 = normal/max.",
             "Written by tools/make_demo_plant.py."]
    written = [out / "demo_line_list.csv", out / "demo_line_list.xlsx",
               out / "demo_equipment.csv", out / "demo_equipment.xlsx"]
    write_csv(written[0], LINE_HEADERS, lines)
    write_xlsx(written[1], f"{PLANT}: insulated line list", "Line list", LINE_HEADERS, lines,
               notes)
    write_csv(written[2], EQUIPMENT_HEADERS, equipment)
    write_xlsx(written[3], f"{PLANT}: equipment list", "Equipment", EQUIPMENT_HEADERS, equipment,
               notes)
    cold = cold_area_rows()
    written += [out / "demo_cold_area.csv", out / "demo_cold_area.xlsx"]
    write_csv(written[4], COLD_AREA_HEADERS, cold)
    write_xlsx(written[5], f"{PLANT}: cold area (LNG unit, refrigerated hall)", "Cold area",
               COLD_AREA_HEADERS, cold, notes)
    return written


if __name__ == "__main__":
    for path in main(Path(sys.argv[1]) if len(sys.argv) > 1 else OUT):
        print(f"wrote {path}")
