"""Property tests of the two hostile families that can be generated (hypothesis).

* Long runs of white space in number, unit, size, layer and header cells: the parse equals the
  parse of the same text with each run made one space, for runs up to 10,000 characters (a cell
  stays under the 32,767 characters a spreadsheet cell holds).  The input size is bounded; the
  time is not asserted: a parser that went quadratic again would make this test crawl.
* Selectors nested (``not``, parentheses) or chained (``and``, ``or``) up to thousands deep:
  within the limits the selected rows equal a reference evaluation written here; past them a
  SelectorError names the limit.  Never a RecursionError.
"""

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from audit.io.readers import cells
from audit.io.readers.headers import split_unit
from audit.rules.selector import MAX_COMPARISONS, MAX_DEPTH, SelectorError, parse_selector
from audit.units import parse_quantity

SETTINGS = settings(max_examples=40, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
RUN = st.integers(1, 10_000).map(lambda n: " " * n)
GAP = st.one_of(st.just(" "), RUN, st.integers(1, 50).map(lambda n: " \t" * n))
EDGE = st.one_of(st.just(""), RUN)


@SETTINGS
@given(lead=EDGE, gap=GAP, tail=EDGE, number=st.sampled_from(["150", "-40", "0.5", "1e2", "65"]),
       unit=st.sampled_from(["degC", "F", "K", "degF", "C"]))
def test_temperatures_with_long_space_runs(lead, gap, tail, number, unit):
    text = f"{lead}{number}{gap}{unit}{tail}"
    assert len(text) <= 3 * 10_000 + 20
    assert cells.temperature(text.strip(), "degC") == cells.temperature(f"{number} {unit}", "degC")


@SETTINGS
@given(lead=EDGE, gap=GAP, tail=EDGE, number=st.sampled_from(["10", "2.5", ".5", "3e1"]),
       unit=st.sampled_from(["m", "ft", "mm", "in", "W/m2", "Btu*in/(h*ft**2*degF)"]))
def test_quantities_with_long_space_runs(lead, gap, tail, number, unit):
    text = f"{lead}{number}{gap}{unit}{tail}"
    compact = f"{number} {unit}"
    target = "W/(m*K)" if "Btu" in unit else "W/m**2" if "W" in unit else "m"
    assert parse_quantity(text, "m", target) == parse_quantity(compact, "m", target)


@SETTINGS
@given(gap=GAP, tail=EDGE, digits=st.integers(1, 20_000), end=st.sampled_from(["x", " m", "."]))
def test_long_digit_runs_are_rejected_or_read_not_backtracked(gap, tail, digits, end):
    text = "1" * digits + end + tail
    value, problem = cells.quantity(text.strip(), "m", "m", "a length")
    if end == " m" and digits <= 308:  # a double holds up to about 1.8e308 (IEEE 754)
        assert problem is None and value == float("1" * digits)
    elif end == ".":
        assert (problem is None) == (digits <= 308)
    else:
        assert problem is not None and np.isnan(value)


@SETTINGS
@given(a=GAP, b=GAP, c=GAP, d=EDGE,
       size=st.sampled_from([("1", "1/2", '"', "1-1/2"), ("2", "", "in", "2"),
                             ("DN", "100", "", "4")]))
def test_pipe_sizes_with_long_space_runs(a, b, c, d, size):
    first, second, mark, nps = size
    text = f"{first}{b}{second}{c}{mark}{d}".strip() if second else f"{first}{c}{mark}{d}".strip()
    assert cells.pipe_size(text, None)[0] == nps


@SETTINGS
@given(a=GAP, b=GAP, c=EDGE, material=st.sampled_from(["mineral-wool", "calcium silicate"]),
       thickness=st.sampled_from([("40", "mm", 0.04), ("2", "in", 0.0508), ("2x50", "", 0.05)]))
def test_layers_with_long_space_runs(a, b, c, material, thickness):
    number, unit, metres = thickness
    text = f"{material}{a}{number}{b if unit else ''}{unit}{c}".strip()
    materials, values, problem = cells.layers(text, "mm")
    assert problem is None
    assert values == pytest.approx((metres,) * (2 if "x" in number else 1))
    assert set(materials) == {material.replace(" ", "-")}


@SETTINGS
@given(a=EDGE, b=GAP, c=EDGE, d=EDGE, bracket=st.sampled_from(["[]", "()"]))
def test_header_units_with_long_space_runs(a, b, c, d, bracket):
    header = f"{a}Op Temp{b}{bracket[0]}{c}degF{d}{bracket[1]}"
    name, unit = split_unit(header)
    assert " ".join(name.split()) == "Op Temp" and unit == "degF"


# --- selectors -------------------------------------------------------------------------------

TABLE = pd.DataFrame({"temp_K": [300.0, 400.0, 500.0, 350.0],
                      "accessible": [True, False, True, False],
                      "shape": ["pipe", "flat", "pipe", "sphere"]})
LEAVES = {  # selector comparison -> its rows of TABLE (temperatures in degC: 300 K = 26.85 degC)
    "temp > 100": np.array([False, True, True, False]),
    "accessible == yes": np.array([True, False, True, False]),
    "shape == pipe": np.array([True, False, True, False]),
    "shape in [flat, sphere]": np.array([False, True, False, True]),
}


@SETTINGS
@given(wrappers=st.lists(st.sampled_from(["not", "()"]), max_size=3000),
       leaf=st.sampled_from(sorted(LEAVES)))
def test_selectors_nested_deep(wrappers, leaf):
    text, expected = leaf, LEAVES[leaf]
    for wrapper in reversed(wrappers):
        text = f"not {text}" if wrapper == "not" else f"({text})"
        expected = ~expected if wrapper == "not" else expected
    if len(wrappers) > MAX_DEPTH:
        with pytest.raises(SelectorError, match=f"nested more than {MAX_DEPTH} deep"):
            parse_selector(text)
    else:
        assert (parse_selector(text).mask(TABLE) == expected).all()


@SETTINGS
@given(terms=st.lists(st.tuples(st.sampled_from(["and", "or"]), st.sampled_from(sorted(LEAVES))),
                      min_size=1, max_size=2 * MAX_COMPARISONS + 10))
def test_selectors_chained_long(terms):
    text = " ".join(f"{op} {leaf}" for op, leaf in terms).split(" ", 1)[1]
    # reference: 'and' binds tighter than 'or' (audit/rules/selector.py grammar)
    groups, current = [], LEAVES[terms[0][1]]
    for op, leaf in terms[1:]:
        if op == "and":
            current = current & LEAVES[leaf]
        else:
            groups.append(current)
            current = LEAVES[leaf]
    expected = np.logical_or.reduce(groups + [current])
    if len(terms) > MAX_COMPARISONS:
        with pytest.raises(SelectorError, match=f"more than {MAX_COMPARISONS} comparisons"):
            parse_selector(text)
    else:
        assert (parse_selector(text).mask(TABLE) == expected).all()


@SETTINGS
@given(lead=EDGE, gap=GAP, tail=EDGE, cell=st.sampled_from(
    ["electric|2x15|W/m", "steam|1/2in|150|degC", "electric|30", "steam|3/8", "none"]))
def test_tracing_cells_with_long_space_runs(lead, gap, tail, cell):
    from audit.io.readers.tracing import tracing
    text = lead + gap.join(cell.split("|")) + tail
    assert tracing(text) == tracing(cell.replace("|", " "))


@SETTINGS
@given(digits=st.integers(1, 20_000), kind=st.sampled_from(["electric ", "steam ", "electric 2x"]))
def test_tracing_cells_with_long_digit_runs_are_refused_or_read(digits, kind):
    from audit.io.readers.tracing import tracing
    kind_read, *_, problem = tracing(kind + "1" * digits + "x")
    assert problem is not None and kind_read == ""
