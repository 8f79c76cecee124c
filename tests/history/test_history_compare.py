"""The comparison of one audit's findings with the last audit's (audit/history/compare.py):
pure table work, so each rule is shown on a hand-made table."""

import pandas as pd
import pytest

from audit.history.compare import MARGIN, compare, tag_key

COLUMNS = ["tag", "check", "severity", "value", "limit", "unit"]


def _findings(*rows):
    return pd.DataFrame(rows, columns=COLUMNS)


def _previous(*rows, first="2024-03-12"):
    return _findings(*rows).assign(first_reported=first, message="as found last time")


def _items(*tags, rejected=()):
    return pd.DataFrame({"tag": list(tags), "status": ["rejected" if t in rejected else "audited" for t in tags]})


def _words(now, before, items=None):
    out, closed = compare(now, items if items is not None else _items(*now["tag"]), before,
                          today="2026-12-04", last_date="2025-06-01")
    return list(out["since_last"]), out, closed


def test_first_audit_everything_new():
    words, out, closed = _words(_findings(("P-1", "touch-temperature", "high", 80, 60, "degC")), None)
    assert words == ["new"] and list(out["first_reported"]) == ["2026-12-04"] and closed.empty


@pytest.mark.parametrize("before, now, word", [
    (("high", 80.0), ("high", 80.0), "recurring"),
    (("high", 80.0), ("critical", 80.0), "worsened"),    # severity up, value the same
    (("high", 80.0), ("medium", 95.0), "improved"),      # severity down wins over the value
    (("high", 80.0), ("high", 90.0), "worsened"),        # 20 K past the limit, now 30 K
    (("high", 80.0), ("high", 70.0), "improved"),        # 20 K past, now 10 K
    (("high", 80.0), ("high", 80.0 + 20 * MARGIN * 0.9), "recurring"),  # inside the margin
    (("high", 80.0), ("high", 80.0 + 20 * MARGIN * 1.1), "worsened"),   # just outside it
])
def test_since_last_words(before, now, word):
    words, out, _ = _words(_findings(("P-1", "touch-temperature", *now, 60, "degC")),
                           _previous(("P-1", "touch-temperature", *before, 60, "degC")))
    assert words == [word]
    assert list(out["first_reported"]) == ["2024-03-12"]  # carried from the first report


def test_below_the_limit_is_judged_by_distance_too():
    # A condensation finding is a surface below the dew point: further below is worse.
    words, out, _ = _words(_findings(("C-1", "condensation", "medium", 20.0, 28.0, "degC")),
                           _previous(("C-1", "condensation", "medium", 26.0, 28.0, "degC")))
    assert words == ["worsened"]
    assert out["change_since_last"].iloc[0] == "value 26 -> 20 degC (limit 28 degC)"


def test_a_changed_unit_is_not_compared_by_value():
    words, _, _ = _words(_findings(("P-1", "heat-loss-limit", "low", 900, 100, "W/m")),
                         _previous(("P-1", "heat-loss-limit", "low", 2.0, 1.5, "times spec")))
    assert words == ["recurring"]


def test_closed_why():
    before = _previous(("A", "condition", "medium", 20, 0, "%"), ("B", "condition", "medium", 20, 0, "%"),
                       ("C", "condition", "medium", 20, 0, "%"))
    _, _, closed = _words(_findings(), before, _items("a", "C", rejected={"C"}))
    assert dict(zip(closed["tag"], closed["why"])) == {
        "A": "cleared", "B": "item-not-in-register", "C": "item-rejected"}
    assert set(closed["last_reported"]) == {"2025-06-01"} and set(closed["first_reported"]) == {"2024-03-12"}


def test_a_tag_entered_twice_pairs_in_register_order():
    before = _previous(("D", "condition", "medium", 10, 0, "%"), ("D", "condition", "medium", 50, 0, "%"))
    words, _, closed = _words(_findings(("D", "condition", "medium", 10, 0, "%")), before)
    assert words == ["recurring"] and list(closed["why"]) == ["cleared"]


@pytest.mark.parametrize("a, b", [("QP-10-CR-4005", "qp-10-cr-4005"), ("P 101", "P101"),
                                  ("P-101\u00a0", "p-101"), ("ＰＡ-1", "pa-1")])
def test_tags_compare_without_case_and_spaces(a, b):
    assert tag_key(a) == tag_key(b)


def test_different_tags_stay_different():
    assert tag_key("P-101") != tag_key("P-1010") and tag_key("P-101") != tag_key("P_101")
