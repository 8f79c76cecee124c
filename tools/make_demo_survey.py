"""Write the demo plant's invented infrared survey into ``sample_data/demo_survey.csv``.

Readings of Quarvel Point Works (an invented plant) taken on an invented day, for ``lagaudit demo``:
some lines hotter than registered (wet or missing insulation the register does not know; one of
them within reach, whose measured condition fails the burn check on the hot still day), lines
as registered, one reading without its conditions (the audit warns and uses the line's own), one
tag that is not in the register, and one impossible reading (hotter than the line's process).
Every number here is made up; run after ``tools/make_demo_plant.py``::

    python tools/make_demo_survey.py            # rewrites sample_data/demo_survey.csv
"""

from __future__ import annotations

import csv
import sys
from pathlib import Path

OUT = Path(__file__).resolve().parent.parent / "sample_data"
HEADERS = ["tag", "surface_temp", "ambient", "wind", "rh", "emissivity", "date", "position",
           "note"]
DAY = "2026-10-14"
#: tag, surface temperature [degC], air [degC], wind [m/s], RH [%], emissivity, position, note
READINGS = [
    ("QP-20-HP-4004", 62, 12, 2, 70, 0.95, "3 m east of the pipe rack bend", "patch of tape"),
    ("QP-20-HP-4004", 48, 12, 2, 70, 0.95, "mid span", "patch of tape"),
    ("QP-30-HO-4002", 35, 12, 2, 70, 0.95, "bottom of the run", "jacket joint open"),
    ("QP-10-CR-4005", 140, 12, 2, 70, 0.95, "low point", "wet, dripping from the jacket"),
    ("QP-40-CH-4003", 11, 12, 2, 70, 0.95, "", "pvc jacket"),
    ("QP-20-MP-4001", 22, "", "", "", 0.95, "", "conditions not recorded"),
    ("QP-20-MP-4001", 260, 12, 2, 70, 0.95, "", "probably the next line's steam trap"),
    ("QP-99-XX-0001", 50, 12, 2, 70, 0.95, "", "tag painted over; as read"),
    # An accessible line that passes the burn check as registered: its reading, extrapolated
    # to the hot still day, shows it does not (measured beats assumed).
    ("QP-10-CR-4017", 33, 12, 2, 70, 0.95, "at the valve station, within reach",
     "jacket dented"),
]


def main(out: Path = OUT) -> Path:
    path = out / "demo_survey.csv"
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(HEADERS)
        for tag, temp, air, wind, rh, eps, position, note in READINGS:
            writer.writerow([tag, temp, air, wind, rh, eps, DAY, position, note])
    return path


if __name__ == "__main__":
    print(main(Path(sys.argv[1]) if len(sys.argv) > 1 else OUT))
