"""The one account of the methods (audit/methods.py): the README, the report and
``calc --explain`` show the same text."""

from pathlib import Path

from audit import methods
from audit.cli import CAUTION, main
from audit.pipeline import audit_register
from audit.report.context import build_context
from audit.report.html import render

ROOT = Path(__file__).resolve().parents[1]


def test_readme_carries_the_generated_methods_block():
    # Refresh with `python tools/update_readme_methods.py` after changing audit/methods.py.
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert readme.count(methods.README_BEGIN) == 1
    assert methods.readme_block() in readme


def test_the_methods_say_what_the_engine_does():
    # The solver takes safeguarded Newton steps (audit/engine/solver.py), forced convection is
    # at the film temperature except Whitaker's sphere; no other account may survive.
    whole = methods.markdown()
    assert "Newton steps" in whole and "bisection" in whole and "secant" not in whole
    assert "(μ∞/μs)^(1/4)" in whole and "film temperature" in whole
    assert "`surroundings`" in whole


def test_report_shows_every_method_row(tmp_path):
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,insulation\nL-1,4,10,150,none\n", encoding="utf-8")
    html = render("report.html", build_context(audit_register([path]), meta={}, caution=CAUTION))
    for m in methods.METHODS:
        for part in m:
            assert methods.to_html(part) in html, part
    for note in methods.NOTES:
        assert methods.to_html(note) in html


def test_markup_is_rendered_for_each_medium():
    sample = "see *Numerical Recipes* and the `surroundings` column, a < b & c"
    assert methods.plain(sample) == "see Numerical Recipes and the surroundings column, a < b & c"
    assert methods.to_html(sample) == ("see <i>Numerical Recipes</i> and the <code>surroundings"
                                       "</code> column, a &lt; b &amp; c")


def test_calc_explain_prints_the_methods(capsys):
    assert main(["calc", "--nps", "4", "--temp", "150", "--layers", "none", "--explain"]) == 0
    out = capsys.readouterr().out
    assert methods.text() in out
    assert main(["calc", "--nps", "4", "--temp", "150", "--layers", "none"]) == 0
    assert "Methods and references" not in capsys.readouterr().out
