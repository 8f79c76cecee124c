"""read_rows (audit/io/readers/__init__.py): rows held in memory read exactly as the same rows
in a CSV register file are, and refused with the same messages."""

import csv

import pandas as pd
import pytest

from audit.errors import RegisterError
from audit.io.readers import read_register, read_rows

HEADER = ["Tag", "NPS", "Temp [degF]", "Layers", "Length", "Condition", "Remarks"]
ROWS = [
    ["P-1", "4", "480", "calcium-silicate 50mm + mineral-wool 2in", "30 ft", "intact", ""],
    ["P-2", '1-1/2"', "AMB", "none", "TBA", "good", "note, with a comma"],
    ["P-1", "DN100", "350", "mineral-wool 2x50", "12", "soggy", ""],
    ["", "2", "100", "mineral-wool 25", "1", "", ""],
]


def _as_csv(tmp_path, name):
    path = tmp_path / f"{name}.csv"
    with path.open("w", newline="", encoding="utf-8") as out:
        csv.writer(out).writerows([HEADER, *ROWS])
    return path


def test_same_table_as_the_csv_file(tmp_path):
    from_file = read_register(_as_csv(tmp_path, "register"))
    in_memory = read_rows(HEADER, ROWS, name="register.csv")
    # Every cell equal, ``source`` included, since the name stands for the file's.
    pd.testing.assert_frame_equal(in_memory, from_file)
    # Rejections and warnings are the reader's, word for word (bad length, bad condition,
    # empty tag, duplicated tag).
    assert list(in_memory["status"]) == ["ok", "rejected", "rejected", "rejected"]
    assert "length" in in_memory.loc[1, "reason"]
    assert "condition" in in_memory.loc[2, "reason"]
    assert "duplicated" in in_memory.loc[0, "warnings"]
    assert in_memory.loc[0, "source"] == "register.csv::2"  # file:sheet:row, no sheet


@pytest.mark.parametrize("header, rows, pattern", [
    (["nps", "temp"], [["4", "100"]], "missing the required tag column"),
    (["tag", "nps"], [], "a header row but no data rows"),
])
def test_refused_like_a_file(header, rows, pattern):
    with pytest.raises(RegisterError, match=pattern) as caught:
        read_rows(header, rows, name="calc")
    assert caught.value.file == "calc"
