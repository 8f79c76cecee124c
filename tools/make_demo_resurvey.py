"""Write the demo plant's second survey into ``sample_data/`` (``*_resurvey.csv`` and ``.xlsx``).

The same invented plant as ``tools/make_demo_plant.py``, surveyed again at the next turnaround,
so that ``lagaudit demo --history DB`` followed by ``lagaudit demo --second-survey --history DB``
shows what a history compares.  Made from the first survey's rows by fixed edits:

* repairs done: every other damaged, wet or missing insulation made good, half of the lines
  with bare valves or flanges given covers, and the line whose length was ``TBA`` measured;
* partly repaired: some damaged lines with less of their length bare than before;
* worse: some damaged lines with more of their length bare than before;
* new damage: some intact lines now damaged, wet or stripped, and one vessel found wet;
* one line removed from the register (its findings close as ``item-not-in-register``).

    python tools/make_demo_resurvey.py            # rewrites sample_data/*_resurvey.*
    python tools/make_demo_resurvey.py /tmp/demo  # somewhere else
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
import make_demo_plant as first  # noqa: E402  (the first survey's generator, beside this file)

RANDOM_STATE = 7208
REVISION = "rev D"


def resurvey_lines(rows: list[list]) -> list[list]:
    """The first survey's line list after a turnaround's repairs and wear."""
    rng = np.random.default_rng(RANDOM_STATE)
    col = {name: k for k, name in enumerate(first.LINE_HEADERS)}
    rows = [list(r) for r in rows]
    bad = set(first.BAD_ROWS)
    poor = [k for k, r in enumerate(rows) if r[col["Insul Condition"]] in ("damaged", "wet", "missing")
            and k not in bad]
    repaired, left = poor[::2], poor[1::2]
    for k in repaired:
        rows[k][col["Insul Condition"]], rows[k][col["Damaged [%]"]] = "intact", ""
        rows[k][col["Remarks"]] = "reinstated at the last turnaround"
    damaged_left = [k for k in left if rows[k][col["Insul Condition"]] == "damaged"]
    removed = damaged_left[0]
    for n, k in enumerate(damaged_left[1:]):
        share = float(rows[k][col["Damaged [%]"]])
        rows[k][col["Damaged [%]"]] = f"{min(share * 2.5, 80):g}" if n % 2 == 0 else f"{max(share / 3, 2):g}"
    bare = [k for k, r in enumerate(rows) if (r[col["Bare Valves"]] not in ("", "0")
                                               or r[col["Bare Flanges"]] not in ("", "0")) and k not in bad]
    for k in bare[::2]:
        rows[k][col["Bare Valves"]] = rows[k][col["Bare Flanges"]] = "0"
    intact = [k for k, r in enumerate(rows) if r[col["Insul Condition"]] == "intact"
              and k not in bad and k not in repaired]
    for n, k in enumerate(rng.choice(intact, size=14, replace=False)):
        word = ("damaged", "damaged", "wet", "missing")[n % 4]
        rows[k][col["Insul Condition"]] = word
        rows[k][col["Damaged [%]"]] = f"{rng.choice([10, 20, 30])}" if word == "damaged" else ""
        rows[k][col["Remarks"]] = "found at the second survey"
    tba = next(k for k, (header, _) in first.BAD_ROWS.items() if header == "Length [m]")
    rows[tba][col["Length [m]"]] = "42"
    rows[tba][col["Remarks"]] = "measured"
    return [r for k, r in enumerate(rows) if k != removed]


def resurvey_equipment(rows: list[list]) -> list[list]:
    """The equipment list at the second survey: one vessel repaired, one found wet."""
    col = {name: k for k, name in enumerate(first.EQUIPMENT_HEADERS)}
    rows = [list(r) for r in rows]
    damaged = [k for k, r in enumerate(rows) if r[col["Condition"]] == "damaged"]
    rows[damaged[0]][col["Condition"]], rows[damaged[0]][col["Damage [%]"]] = "intact", ""
    intact = [k for k, r in enumerate(rows) if r[col["Condition"]] == "intact" and r[col["Type"]] != "flat"]
    rows[intact[-1]][col["Condition"]] = "wet"
    return rows


def main(out: Path = first.OUT) -> list[Path]:
    out.mkdir(parents=True, exist_ok=True)
    lines = resurvey_lines(first.line_rows(np.random.default_rng(first.RANDOM_STATE)))
    equipment = resurvey_equipment(first.equipment_rows())
    first.REVISION = REVISION  # the XLSX title block names the register's revision
    notes = [f"{first.PLANT} is an invented plant: every tag, number and name here is made up.",
             "Second survey, one turnaround after the first: repairs done, new damage, one line removed.",
             "Temperatures are operating temperatures; AMB = at ambient; 120/150 = normal/max.",
             "Written by tools/make_demo_resurvey.py."]
    written = [out / "demo_line_list_resurvey.csv", out / "demo_line_list_resurvey.xlsx",
               out / "demo_equipment_resurvey.csv", out / "demo_equipment_resurvey.xlsx"]
    first.write_csv(written[0], first.LINE_HEADERS, lines)
    first.write_xlsx(written[1], f"{first.PLANT}: insulated line list, second survey", "Line list",
                     first.LINE_HEADERS, lines, notes)
    first.write_csv(written[2], first.EQUIPMENT_HEADERS, equipment)
    first.write_xlsx(written[3], f"{first.PLANT}: equipment list, second survey", "Equipment",
                     first.EQUIPMENT_HEADERS, equipment, notes)
    return written


if __name__ == "__main__":
    for path in main(Path(sys.argv[1]) if len(sys.argv) > 1 else first.OUT):
        print(f"wrote {path}")
