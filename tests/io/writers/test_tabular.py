"""audit/io/writers/tabular.py: results.csv is what pandas' ``to_csv`` (a general-purpose
library, lagaudit's former writer) makes of the neutralised table, byte for byte."""

import json
import math
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from audit.io.writers import write_csv, write_json
from audit.io.writers.safety import neutralise_frame
from audit.pipeline import audit_register


def results_frame():
    return pd.DataFrame({
        "tag": pd.Series(["=cmd|' /C calc'!A0", "BS-2", "+BS-6", "BS, 4", 'say "hi"', "x\r\ny"],
                         dtype="str"),
        "status": pd.Series(["audited", "rejected", "audited", "audited", "audited", None],
                            dtype="str"),
        "surface_temp [degC]": [60.5, -40.0, np.nan, 1e16, -0.0, 0.1],
        "heat_loss [W]": [-12.345678901234567, 1e-05, np.inf, 2.0**53, 123456.789, np.nan],
        "valves": [0, 1, 2, 3, 4, 5],
        "accessible": [True, False, True, False, True, False],
        "remarks": pd.Series(["@SUM(A1)", "\t=2+2", "-5 is text", "", "Prüfung", None],
                             dtype="str"),
        "=unknown column": pd.Series(["a", -1, None, 2.5, "=b", True], dtype=object),
    })


def test_write_csv_bytes_equal_pandas_to_csv_of_the_neutralised_table(tmp_path):
    frame = results_frame()
    path = write_csv(frame, tmp_path / "results.csv")
    assert path == tmp_path / "results.csv"
    neutralise_frame(frame).to_csv(tmp_path / "oracle.csv", index=False, encoding="utf-8",
                                   lineterminator="\r\n")
    assert path.read_bytes() == (tmp_path / "oracle.csv").read_bytes()
    text = path.read_text(encoding="utf-8")
    # OWASP "CSV Injection": the formula-looking text is prefixed, the negative number is not
    assert "'=cmd" in text and "'+BS-6" in text and "'\t=2+2" in text and "'-5 is text" in text
    assert ",-40.0," in text and text.startswith("tag,status,")


def test_write_json_missing_numbers_are_null(tmp_path):
    path = write_json(results_frame(), tmp_path / "results.json", meta={"tool": "test"})
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["meta"] == {"tool": "test"}
    assert data["results"][2]["surface_temp [degC]"] is None
    assert data["results"][0]["tag"] == "=cmd|' /C calc'!A0"  # JSON keeps the text exactly


def _former_write_json(results, path, meta):
    """The former writer, a dictionary per row through the json module: the oracle."""
    def plain(value):
        if isinstance(value, float) and not math.isfinite(value):
            return None
        if hasattr(value, "item"):
            value = value.item()
            if isinstance(value, float) and not math.isfinite(value):
                return None
        return value
    records = [{k: plain(v) for k, v in row.items()} for row in results.to_dict(orient="records")]
    with open(path, "w", encoding="utf-8") as handle:
        json.dump({"meta": meta, "results": records}, handle, ensure_ascii=False, indent=1)
    return path


def oddities():
    """Nested, unhashable, nullable and empty values next to the ordinary ones."""
    return pd.DataFrame({
        "layers": pd.Series([("mw", "cs"), [], ["a", ["b"]], {"k": 1}, None, ("x",)], dtype=object),
        "mixed": pd.Series([1, None, np.float64("nan"), 4.5, True, np.int64(7)], dtype=object),
        "count": np.arange(6, dtype=np.int32),
        "ratio": np.array([0.5, 2.0, np.nan, -np.inf, 5e-324, 1.7976931348623157e308]),
        "Prüfung \"q\"": ["ü", "\x01", "\n", "\\", "\u2028", ""],
    })


@pytest.mark.parametrize("table", [results_frame, oddities, lambda: results_frame().iloc[:0],
                                   lambda: pd.DataFrame(index=range(3))])
def test_write_json_text_equals_the_former_writer(tmp_path, table):
    meta = {"tool": "lagaudit", "ünits": ["degC", None], "n": 2}
    path = write_json(table(), tmp_path / "new.json", meta=meta)
    _former_write_json(table(), tmp_path / "old.json", meta)
    assert path.read_text(encoding="utf-8") == (tmp_path / "old.json").read_text(encoding="utf-8")


def test_write_json_of_the_demo_audit_equals_the_former_writer(tmp_path):
    demo = Path(__file__).parents[3] / "sample_data"
    results = audit_register([demo / "demo_line_list.csv", demo / "demo_equipment.csv"]).results
    meta = {"tool": "lagaudit"}
    write_json(results, tmp_path / "new.json", meta=meta)
    _former_write_json(results, tmp_path / "old.json", meta)
    assert json.loads((tmp_path / "new.json").read_text(encoding="utf-8")) == \
        json.loads((tmp_path / "old.json").read_text(encoding="utf-8"))
    assert (tmp_path / "new.json").read_bytes() == (tmp_path / "old.json").read_bytes()
