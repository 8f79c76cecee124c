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
