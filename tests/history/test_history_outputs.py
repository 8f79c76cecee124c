"""What a history adds to the outputs: the report's "Since the last audit" section with its
trend chart, "first reported" on the work orders, and the demo plant's two surveys."""

import importlib.util
import re
from pathlib import Path

import pandas as pd
import pypdf
import pytest

from audit.cli import main
from audit.history import History
from audit.history.run import compare_audit, record_run
from audit.io.writers.place import OutputFolder
from audit.pipeline import audit_register
from audit.report import write_reports

from test_history_runs import SURVEY_1, SURVEY_2

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "sample_data"
META = {"tool": "lagaudit test", "run_at": "2026-12-04T00:00:00+00:00", "registers": []}


def _audited(tmp_path, db, name, body):
    register = tmp_path / f"{name}.csv"
    register.write_text(body, encoding="utf-8")
    audit = compare_audit(History.open(db), audit_register([register]), plant=None)
    out = tmp_path / name
    out.mkdir()
    return audit, register, out


def test_report_section_trend_and_work_orders(tmp_path):
    db = str(tmp_path / "h.db")
    first, register, out = _audited(tmp_path, db, "s1", SURVEY_1)
    with OutputFolder(out) as folder:
        record_run(History.open(db), first, [register], folder, surface_model="correlations")
    second, register, out = _audited(tmp_path, db, "s2", SURVEY_2)
    written = write_reports(second, out, meta=META, formats=["html", "workorders"])
    html = (out / "report.html").read_text(encoding="utf-8")
    section = html[html.index('<section id="since-last"'):html.index('<section id="charts"')]
    assert "Since the last audit" in section and "Trend across 2 audits" in section
    for word, count in (("new", 2), ("recurring", 2), ("worsened", 2), ("improved", 0), ("cleared", 1)):
        assert f"<b>{count}</b>{word}<" in section
    assert "<b>3</b>gone with their item from the register" in section
    # oldest first: every standing finding was first reported at the first audit
    today = second.history.run_at.strftime("%Y-%m-%d")
    assert section.count(f"<td>{today}</td>") == 4 + 5  # 4 standing + 5 closed, all from today's first run
    assert re.search(r"<svg[^>]*>.*plant heat loss \[kW\].*findings by check", section, re.S)

    csv = (out / "workorders.csv").read_text(encoding="utf-8")
    assert "first_reported" in csv.splitlines()[0]
    pack = next(p for p in written if p.suffix == ".pdf")
    text = " ".join(page.extract_text() for page in pypdf.PdfReader(pack).pages)
    assert f"first reported {today}" in text


def test_no_history_no_section(tmp_path):
    register = tmp_path / "s1.csv"
    register.write_text(SURVEY_1, encoding="utf-8")
    write_reports(audit_register([register]), tmp_path, meta=META, formats=["html"])
    assert 'id="since-last"' not in (tmp_path / "report.html").read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def demo_runs(tmp_path_factory):
    """``lagaudit demo`` twice into one history: the first survey, then the second."""
    folder = tmp_path_factory.mktemp("demo")
    db = str(folder / "demo.db")
    for name, extra in (("first", []), ("second", ["--second-survey"])):
        assert main(["demo", "--history", db, "--out", str(folder / name), "--format", "csv,html",
                     "-q", *extra]) == 0
    return folder, db


def test_demo_second_survey_shows_every_word_and_the_trend(demo_runs):
    folder, db = demo_runs
    words = pd.read_csv(folder / "second" / "findings.csv")["since_last"].value_counts()
    why = pd.read_csv(folder / "second" / "closed.csv")["why"].value_counts()
    for word in ("new", "recurring", "worsened", "improved"):
        assert words.get(word, 0) > 0, word
    for word in ("cleared", "item-not-in-register"):
        assert why.get(word, 0) > 0, word
    first = pd.read_csv(folder / "first" / "results.csv")
    second = pd.read_csv(folder / "second" / "results.csv")
    removed = set(first["tag"]) - set(second["tag"])
    assert len(removed) == 1 and len(second) == len(first) - 1  # one line taken out of the register
    closed = pd.read_csv(folder / "second" / "closed.csv")
    assert set(closed.loc[closed["why"] == "item-not-in-register", "tag"]) == removed
    html = (folder / "second" / "report.html").read_text(encoding="utf-8")
    assert "Since the last audit" in html and "Trend across 2 audits" in html
    assert list(History.open(db, create=False).audits()["plant"]) == ["Quarvel Point Works"] * 2


def test_resurvey_generator_reproduces_the_files(tmp_path):
    spec = importlib.util.spec_from_file_location("make_demo_resurvey", ROOT / "tools" / "make_demo_resurvey.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    for path in module.main(tmp_path):
        if path.suffix == ".csv":  # byte for byte; the XLSX zip bytes depend on xlsxwriter's version
            assert path.read_bytes() == (DATA / path.name).read_bytes(), path.name


def test_closed_csv_is_not_written_through_a_link(tmp_path, capsys):
    # closed.csv goes through the output folder like every output: a link there is refused
    # before the audit, and the file it points at is left as it was.
    register = tmp_path / "s1.csv"
    register.write_text(SURVEY_1, encoding="utf-8")
    outside = tmp_path / "elsewhere.txt"
    outside.write_text("keep me", encoding="utf-8")
    out = tmp_path / "out"
    out.mkdir()
    (out / "closed.csv").symlink_to(outside)
    code = main(["run", str(register), "--history", str(tmp_path / "h.db"), "--out", str(out),
                 "--format", "csv", "-q"])
    assert code == 2
    assert "closed.csv" in capsys.readouterr().err
    assert outside.read_text(encoding="utf-8") == "keep me"
    assert not (out / "results.csv").exists()
