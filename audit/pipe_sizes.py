"""Nominal pipe sizes: NPS text, DN number and outside diameter of steel pipe.

Source: ASME B36.10M, *Welded and Seamless Wrought Steel Pipe*, Table 1 (outside diameter
in millimetres, the same for every schedule of one size), and its NPS/DN designations
(the DN column of the same table, also ISO 6708).  Sizes 1/8 to 48 are listed; larger pipe
is entered by its outside diameter (`od` column).
"""

from __future__ import annotations

# (NPS text, NPS value [in], DN, outside diameter [mm]) -- ASME B36.10M Table 1.
NOMINAL_PIPE_SIZES: tuple[tuple[str, float, int, float], ...] = (
    ("1/8", 0.125, 6, 10.3),
    ("1/4", 0.25, 8, 13.7),
    ("3/8", 0.375, 10, 17.1),
    ("1/2", 0.5, 15, 21.3),
    ("3/4", 0.75, 20, 26.7),
    ("1", 1.0, 25, 33.4),
    ("1-1/4", 1.25, 32, 42.2),
    ("1-1/2", 1.5, 40, 48.3),
    ("2", 2.0, 50, 60.3),
    ("2-1/2", 2.5, 65, 73.0),
    ("3", 3.0, 80, 88.9),
    ("3-1/2", 3.5, 90, 101.6),
    ("4", 4.0, 100, 114.3),
    ("5", 5.0, 125, 141.3),
    ("6", 6.0, 150, 168.3),
    ("8", 8.0, 200, 219.1),
    ("10", 10.0, 250, 273.0),
    ("12", 12.0, 300, 323.8),
    ("14", 14.0, 350, 355.6),
    ("16", 16.0, 400, 406.4),
    ("18", 18.0, 450, 457.0),
    ("20", 20.0, 500, 508.0),
    ("22", 22.0, 550, 559.0),
    ("24", 24.0, 600, 610.0),
    ("26", 26.0, 650, 660.0),
    ("28", 28.0, 700, 711.0),
    ("30", 30.0, 750, 762.0),
    ("32", 32.0, 800, 813.0),
    ("34", 34.0, 850, 864.0),
    ("36", 36.0, 900, 914.0),
    ("38", 38.0, 950, 965.0),
    ("40", 40.0, 1000, 1016.0),
    ("42", 42.0, 1050, 1067.0),
    ("44", 44.0, 1100, 1118.0),
    ("46", 46.0, 1150, 1168.0),
    ("48", 48.0, 1200, 1219.0),
)

NPS_BY_VALUE: dict[float, str] = {value: text for text, value, _, _ in NOMINAL_PIPE_SIZES}
NPS_BY_DN: dict[int, str] = {dn: text for text, _, dn, _ in NOMINAL_PIPE_SIZES}
OD_MM_BY_NPS: dict[str, float] = {text: od for text, _, _, od in NOMINAL_PIPE_SIZES}

#: Wall thickness [mm] of steel pipe by schedule and NPS -- ASME B36.10M, Table 1 (schedules 40
#: and 80, sizes 1/8 to 24 where the table gives them; from memory, every value held to the
#: ``fluids`` library's ASME B36.10M tables in tests/test_pipe_sizes.py).
WALL_MM_BY_SCHEDULE: dict[str, dict[str, float]] = {
    "40": {"1/8": 1.73, "1/4": 2.24, "3/8": 2.31, "1/2": 2.77, "3/4": 2.87, "1": 3.38,
           "1-1/4": 3.56, "1-1/2": 3.68, "2": 3.91, "2-1/2": 5.16, "3": 5.49, "3-1/2": 5.74,
           "4": 6.02, "5": 6.55, "6": 7.11, "8": 8.18, "10": 9.27, "12": 10.31, "14": 11.13,
           "16": 12.70, "18": 14.27, "20": 15.09, "24": 17.48},
    "80": {"1/8": 2.41, "1/4": 3.02, "3/8": 3.20, "1/2": 3.73, "3/4": 3.91, "1": 4.55,
           "1-1/4": 4.85, "1-1/2": 5.08, "2": 5.54, "2-1/2": 7.01, "3": 7.62, "3-1/2": 8.08,
           "4": 8.56, "5": 9.53, "6": 10.97, "8": 12.70, "10": 15.09, "12": 17.48, "14": 19.05,
           "16": 21.44, "18": 23.83, "20": 26.19, "24": 30.96},
}
#: The schedule of a pipe whose register gives neither ``schedule`` nor ``wall`` (README).
DEFAULT_SCHEDULE = "40"
