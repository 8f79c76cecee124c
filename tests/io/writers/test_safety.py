"""audit/io/writers/safety.py: spreadsheet formula injection (OWASP, "CSV Injection": text
starting with = + - @, tab or carriage return gets a leading apostrophe; numbers untouched)."""

import math

import numpy as np
import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.io.writers.safety import neutralise_frame, neutralise_text

TRIGGERS = ("=", "+", "-", "@", "\t", "\r")  # OWASP "CSV Injection" list, as the module documents


def test_text_examples():
    assert neutralise_text("=1+1") == "'=1+1"
    assert neutralise_text("+SUM(A1)") == "'+SUM(A1)"
    assert neutralise_text("-2+3") == "'-2+3"
    assert neutralise_text("@cmd") == "'@cmd"
    assert neutralise_text("\tTAB") == "'\tTAB"
    assert neutralise_text("\rCR") == "'\rCR"
    assert neutralise_text("L-1") == "L-1" and neutralise_text("") == ""
    assert neutralise_text(-5.0) == -5.0 and neutralise_text(None) is None


def test_frame_neutralises_text_cells_and_labels_only():
    frame = pd.DataFrame({
        "=label": pd.Series(["=a", None, "b", "=a", "-"], dtype="str"),
        "mixed": pd.Series(["@x", -1, -2.5, None, np.nan], dtype=object),
        "t [degC]": [-40.0, 1.0, np.nan, 0.0, -0.0],
        "n": [-1, 2, 3, 4, 5],
    })
    out = neutralise_frame(frame)
    assert list(out.columns) == ["'=label", "mixed", "t [degC]", "n"]
    assert out["'=label"].tolist()[0] == "'=a" and out["'=label"].tolist()[3] == "'=a"
    assert out["'=label"].tolist()[2] == "b" and out["'=label"].tolist()[4] == "'-"
    assert pd.isna(out["'=label"].tolist()[1])
    assert out["mixed"].tolist()[:3] == ["'@x", -1, -2.5]  # numbers stay numbers
    assert out["mixed"].tolist()[3] is None and math.isnan(out["mixed"].tolist()[4])
    assert out["t [degC]"].equals(frame["t [degC]"]) and out["n"].equals(frame["n"])
    assert frame["=label"].tolist()[0] == "=a"  # the input is not changed


def test_duplicate_labels_and_empty_columns():
    frame = pd.DataFrame([["=a", "=b"], ["c", None]], columns=["x", "x"]).astype("str")
    out = neutralise_frame(frame)
    assert out.iloc[:, 0].tolist() == ["'=a", "c"] and out.iloc[0, 1] == "'=b"
    empty = pd.DataFrame({"s": pd.Series([None, None], dtype="str"), "o": [None, None]})
    assert neutralise_frame(empty).isna().all().all()


CELLS = st.one_of(st.text(alphabet=st.sampled_from(list("=+-@\t\r 'a1é")), max_size=5),
                  st.none(), st.integers(-5, 5), st.floats(allow_nan=True), st.booleans())


@settings(max_examples=150, deadline=None)
@given(st.lists(CELLS, max_size=15), st.lists(st.text(max_size=4) | st.none(), max_size=15))
def test_every_cell_is_neutralise_text_of_itself(objects, texts):
    # The definition: a str cell becomes neutralise_text(cell); anything else is left alone.
    frame = pd.DataFrame({"o": pd.Series(objects, dtype=object)})
    out = neutralise_frame(frame)["o"].tolist()
    for before, after in zip(objects, out):
        if type(before) is str:
            assert after == neutralise_text(before)
        elif pd.isna(before):  # missing stays missing (pandas may store None as NaN)
            assert pd.isna(after)
        else:
            assert after is before
    series = pd.Series(texts, dtype="str")
    out = neutralise_frame(series.to_frame("s"))["s"].tolist()
    for before, after in zip(series.tolist(), out):
        assert (pd.isna(after) and pd.isna(before)) or after == neutralise_text(before)
