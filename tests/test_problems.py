"""Row problems as data (audit/problems.py)."""

import copy
import re
from pathlib import Path

import pandas as pd
import pytest

from audit.io.readers import read_rows
from audit.problems import CODES, Problem, Problems, problems_of, words

DEVELOPERS = Path(__file__).parents[1] / "DEVELOPERS.md"


def test_developers_guide_lists_every_code():
    listed = re.findall(r"^\| `([a-z-]+)` \| (.+) \|$", DEVELOPERS.read_text(encoding="utf-8"),
                        re.MULTILINE)
    assert {c: m for c, m in listed if c in CODES or "-" in c} == CODES


def test_a_problem_reads_as_text_and_keeps_its_parts():
    p = Problem("not-a-count", "is not a count", "a whole number, 0 or more")
    assert p == "is not a count; expected a whole number, 0 or more"
    assert (p.code, p.said, p.expected) == ("not-a-count", "is not a count",
                                           "a whole number, 0 or more")
    assert words("valves", "two", p) == 'valves: "two" is not a count; expected a whole number, 0 or more'
    assert words("", None, Problem("blank-row", "row is blank")) == "row is blank"
    assert copy.deepcopy(p).code == "not-a-count"


def test_records_name_row_column_code_value_and_expected():
    table = read_rows(["tag", "nps", "length", "temp", "layers", "valves"],
                      [["A", "4", "10", "150", "mineral-wool 50", "two"],
                       ["B", "4", "TBA", "150", "mineral-wool 50", "1"]])
    found = problems_of(table).frame
    rejects = found[found["severity"] == "reject"].sort_values("row")  # recorded by column
    assert rejects[["row", "column", "code", "value"]].values.tolist() == [
        [0, "valves", "not-a-count", "two"], [1, "length", "not-a-number", "TBA"]]
    assert list(table["reason"]) == list(rejects["text"])
    assert rejects["expected"].iloc[0] == "a whole number, 0 or more"


def test_problems_pass_through_pandas_copies_without_being_copied():
    table = read_rows(["tag", "nps", "length", "temp", "layers"],
                      [["A", "4", "x", "150", "mineral-wool 50"]])
    held = problems_of(table)
    assert problems_of(table.copy()) is held
    assert problems_of(table[table["tag"] == "A"]) is held
    assert len(Problems().frame) == 0 and problems_of(pd.DataFrame()).frame.empty


def test_the_codes_are_known():
    with pytest.raises(ValueError):
        Problem("misspelt", "is wrong")
