"""audit/io/writers/csv_fast.py against pandas' own ``DataFrame.to_csv`` (a general-purpose
library, the writer this module replaces) and Python's ``repr`` of floats (what ``to_csv``'s
numpy formatting prints for float64): the files must be byte-identical."""

import math
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from audit.io.writers import csv_fast
from audit.io.writers.csv_fast import float_texts, quote, write_frame_csv


def pandas_bytes(frame):
    """The oracle: pandas' to_csv with the options lagaudit used before this module."""
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "pandas.csv"
        frame.to_csv(path, index=False, encoding="utf-8", lineterminator="\r\n")
        return path.read_bytes()


def fast_bytes(frame):
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "fast.csv"
        assert write_frame_csv(frame, path) == path
        return path.read_bytes()


EDGE_FLOATS = [0.1, 1e-05, 1e-4, 9.999e-05, 1e16, 1e15, 9999999999999998.0, -0.0, 0.0, math.inf,
               -math.inf, math.nan, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308,
               2.0**53, 2.0**53 + 2, 2.0**63, 123456789012345678.0, 1 / 3, 2 / 3, 0.5, 1.0, 2.0,
               1024.0, 100.0, 1e22, 1e23, -1e-7, 0.30000000000000004, 9.5, 99999.99999999999,
               0.00010000000000000002, 0.9999999999999999, 4.35, 2.675, 1e-4 * (1 - 2**-52)]


def test_float_texts_are_reprs_on_edge_values():
    # Python's repr is what numpy's astype(str), and so to_csv, prints for float64.
    values = np.array(EDGE_FLOATS)
    assert float_texts(values) == ["" if v != v else repr(v) for v in values.tolist()]
    assert float_texts(values) == ["" if v != v else s for v, s in zip(values, values.astype(str))]


@pytest.mark.parametrize("name", ["lognormal", "rounded", "bit patterns", "halves", "neighbours"])
def test_float_texts_are_reprs_on_many_random_values(name):
    rng = np.random.default_rng(20261201)
    n = 200_000
    values = {
        "lognormal": rng.lognormal(3.0, 4.0, n) * rng.choice([-1.0, 1.0], n),
        "rounded": np.round(rng.uniform(0, 1e4, n), 3),
        "bit patterns": np.frombuffer(rng.bytes(8 * n), np.float64).copy(),
        # decimal ties at the 17th digit: the cases the formatter leaves to repr
        "halves": (rng.integers(0, 10**17, n) + 0.5) / 10.0 ** rng.integers(0, 17, n),
        # one ulp either side of short decimals: 16 and 17 digits needed
        "neighbours": np.nextafter(np.round(rng.uniform(0, 1e4, n), 3),
                                   rng.choice([-np.inf, np.inf], n)),
    }[name]
    assert float_texts(values) == ["" if v != v else repr(v) for v in values.tolist()]


@given(st.lists(st.floats(allow_nan=True, allow_infinity=True, width=64), max_size=50))
def test_float_texts_are_reprs_for_any_double(values):
    assert float_texts(np.array(values, np.float64)) == \
        ["" if v != v else repr(v) for v in values]


def test_quote_matches_the_csv_module_rules():
    # csv.QUOTE_MINIMAL with doublequote and "\r\n" line ends (Python's csv module).
    assert quote("plain text") == "plain text"
    assert quote(" lead and trail ") == " lead and trail "
    assert quote("a,b") == '"a,b"'
    assert quote('say "hi"') == '"say ""hi"""'
    assert quote("two\nlines") == '"two\nlines"'
    assert quote("cr\r") == '"cr\r"'
    assert quote("tab\there") == "tab\there"
    assert quote("") == ""


def test_results_like_frame_is_byte_identical():
    rng = np.random.default_rng(3)
    n = 500
    temps = rng.normal(60.0, 40.0, n)
    temps[::7] = np.nan
    frame = pd.DataFrame({
        "tag": pd.Series([f"L-{i}" for i in range(n)], dtype="str"),
        "reason": pd.Series(rng.choice(["", "temp: 'TBA', expected degC", 'nps "4"', "a\r\nb"], n),
                            dtype="str"),
        "surface_temp [degC]": temps,
        "heat_loss [W]": rng.lognormal(5.0, 3.0, n),
        "valves": rng.integers(0, 5, n),
        "accessible": rng.random(n) < 0.5,
        "notes": pd.Series(rng.choice(np.array(["x", None, "Prüfung, nötig", "中文"], object), n),
                           dtype="str"),
        "payback [yr]": np.where(rng.random(n) < 0.5, np.nan, rng.uniform(0, 30, n)),
    })
    assert fast_bytes(frame) == pandas_bytes(frame)


def test_chunks_join_seamlessly(monkeypatch):
    monkeypatch.setattr(csv_fast, "CHUNK_ROWS", 7)
    frame = pd.DataFrame({"a": np.arange(30) / 7.0, "b": pd.Series(list("abcde") * 6, dtype="str"),
                          "c": np.arange(30) * 1e-5})
    assert fast_bytes(frame) == pandas_bytes(frame)


@pytest.mark.parametrize("frame", [
    pd.DataFrame({"x": [np.nan, 1.5, np.nan]}),                       # one column: "" records
    pd.DataFrame({"": pd.Series(["", None, "a"], dtype="str")}),      # empty header, empty cells
    pd.DataFrame({"a": pd.Series([], dtype="float64"), "b": pd.Series([], dtype="str")}),
    pd.DataFrame({"a,b": [1.0], 'q"uote': [2.0], "line\nbreak": [3.0], " sp ": [4.0]}),
    pd.DataFrame([[1.0, 2.0]], columns=["same", "same"]),
    pd.DataFrame({1: [1.0], 2.5: ["x"]}),                              # non-text labels
    pd.DataFrame(),
], ids=["lone-float", "lone-text", "no-rows", "header-quoting", "duplicate-labels",
        "number-labels", "empty"])
def test_edge_shapes_are_byte_identical(frame):
    assert fast_bytes(frame) == pandas_bytes(frame)


def test_object_columns_write_what_the_csv_module_writes():
    frame = pd.DataFrame({"o": pd.Series(["a", None, np.nan, 1, 1.0, True, np.float64(0.1),
                                          np.float32(0.1), ("t", 1), pd.NA, "-x", "", "a,b"],
                                         dtype=object)})
    assert fast_bytes(frame) == pandas_bytes(frame)
    frame["f"] = 0.25  # two columns: an empty object cell is a bare empty field
    assert fast_bytes(frame) == pandas_bytes(frame)


def test_other_dtypes_are_formatted_by_pandas_itself():
    frame = pd.DataFrame({
        "Int64": pd.array([1, None, -3], dtype="Int64"),
        "boolean": pd.array([True, None, False], dtype="boolean"),
        "Float64": pd.array([0.1, None, 1e-7], dtype="Float64"),
        "category": pd.Categorical(["a,b", None, "c"]),
        "float32": np.array([0.1, np.nan, 3.3], np.float32),
        "datetime": pd.to_datetime(["2026-01-02 03:04:05", None, "2026-12-31 00:00:00"]),
        "tz": pd.to_datetime(["2026-01-02", None, "2026-12-31"]).tz_localize("UTC"),
        "timedelta": pd.to_timedelta([1, None, 3], unit="h"),
        "uint8": np.array([0, 1, 255], np.uint8),
        "string[python]": pd.array(["x", None, '"q"'], dtype="string"),
    })
    assert fast_bytes(frame) == pandas_bytes(frame)


NASTY = st.text(alphabet=st.sampled_from(list(',"\r\n \t=+-@\'.0a1éü中😀;')), max_size=8) | \
    st.text(st.characters(exclude_categories=["Cs"]), max_size=6)
FLOATS = st.floats(allow_nan=True, allow_infinity=True)
OBJECTS = st.one_of(NASTY, st.none(), st.just(math.nan), st.integers(-10**20, 10**20), FLOATS,
                    st.booleans())


@st.composite
def frames(draw):
    rows = draw(st.integers(0, 12))
    kinds = draw(st.lists(st.sampled_from(["float", "int", "bool", "str", "object", "Int64"]),
                          min_size=1, max_size=6))
    labels = draw(st.lists(NASTY, min_size=len(kinds), max_size=len(kinds)))
    columns = []
    for kind in kinds:
        if kind == "float":
            columns.append(pd.Series(draw(st.lists(FLOATS, min_size=rows, max_size=rows)),
                                     dtype="float64"))
        elif kind == "int":
            columns.append(pd.Series(draw(st.lists(st.integers(-2**63, 2**63 - 1), min_size=rows,
                                                   max_size=rows)), dtype="int64"))
        elif kind == "bool":
            columns.append(pd.Series(draw(st.lists(st.booleans(), min_size=rows, max_size=rows)),
                                     dtype=bool))
        elif kind == "str":
            columns.append(pd.Series(draw(st.lists(NASTY | st.none(), min_size=rows, max_size=rows)),
                                     dtype="str"))
        elif kind == "object":
            columns.append(pd.Series(draw(st.lists(OBJECTS, min_size=rows, max_size=rows)),
                                     dtype=object))
        else:
            columns.append(pd.Series(draw(st.lists(st.integers(-10**6, 10**6) | st.none(),
                                                   min_size=rows, max_size=rows)), dtype="Int64"))
    frame = pd.concat(columns, axis=1) if columns else pd.DataFrame()
    frame.columns = labels
    return frame


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frames())
def test_any_frame_of_the_supported_dtypes_is_byte_identical(frame):
    assert fast_bytes(frame) == pandas_bytes(frame)


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frames())
def test_text_rewritten_while_writing_equals_the_rewritten_frame(frame):
    # write_csv neutralises as it writes; the oracle is pandas' to_csv of the table that
    # neutralise_frame returns (the way results.csv was written before).
    from audit.io.writers.safety import neutralise_frame, neutralise_text

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "fast.csv"
        write_frame_csv(frame, path, text=neutralise_text)
        assert path.read_bytes() == pandas_bytes(neutralise_frame(frame))


def test_float_texts_of_repeated_values_are_reprs():
    # Columns that repeat their values are formatted once per distinct bit pattern: -0.0 and
    # 0.0 compare equal but print differently, and NaN prints as an empty cell.
    values = np.array([0.0, -0.0, np.nan, 1e-05, 2.5, 1e16, -0.0, 0.1, np.inf] * 40, np.float64)
    assert float_texts(values) == ["" if v != v else repr(v) for v in values.tolist()]
