"""The output folder under attack (issue 23): links inside --out, --out that is a file or cannot
be written, two runs at once, a run interrupted or killed, spreadsheet formula variants, escape
sequences bound for the terminal, a table wider than XLSX allows.

Expected behaviour, kind by kind:

- a file or folder inside ``--out`` that is a symbolic link: refused with one line naming it,
  exit 2, nothing outside ``--out`` changed (checked for every output writer);
- ``--out`` naming an existing file: refused with one line, exit 2;
- ``--out`` that cannot be written (read-only): one line saying so, exit 2;
- a second run into an ``--out`` another run holds: refused with one line, exit 2;
- Ctrl-C while writing: exit 130 with one line, no temporary left, no half file in place;
- the work-order workers die with their parent, even when it is killed outright;
- text starting with the full-width = + - @, with a line feed, or with spaces / no-break spaces
  before the trigger: neutralised in CSV and XLSX; a plain number as text is not;
- control characters in a message bound for the terminal: written as ``\\xNN``;
- a table beyond XLSX's columns: split over further sheets, and said on standard error.
"""

import csv
import hashlib
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

import audit.cli
import audit.io.writers.xlsx as xlsx_writer
from audit.errors import LagauditError
from audit.io.writers.place import LOCK_NAME, OutputFolder
from audit.io.writers.safety import is_plain_number, needs_prefix
from audit.outputs import FORMATS, OUTPUT_NAMES, write_outputs
from audit.pipeline import audit_register
from audit.progress import printable

REGISTER = (
    "tag,nps,length,temp,layers,condition,area_code,remarks\n"
    "FO-1,2,10,250,none,missing,U1,\uff1dSUM(A1)\n"
    "FO-2,4,10,200,mineral-wool 20mm,damaged,U2,\uff0b1\n"
    '\uff0dFO-3,2,10,300,none,missing,U3,"\n=1+1"\n'
    "\uff20FO-4,2,10,150,mineral-wool 40mm,intact,U1,  =cmd\n"
    "FO-5,2,10,150,mineral-wool 40mm,intact,U2,\u00a0\u00a0@SUM(1)\n"
    "FO-6,2,10,150,mineral-wool 40mm,intact,U2,-5\n"
)


@pytest.fixture
def register(tmp_path):
    path = tmp_path / "register.csv"
    path.write_text(REGISTER, encoding="utf-8", newline="")
    return path


@pytest.fixture(scope="module")
def small_audit(tmp_path_factory):
    path = tmp_path_factory.mktemp("register") / "register.csv"
    path.write_text(REGISTER, encoding="utf-8", newline="")
    return audit_register([path])


def snapshot(folder: Path) -> dict:
    """Every file under ``folder`` (links not followed) with the digest of its bytes."""
    return {p: hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file() and not p.is_symlink()}


@pytest.fixture
def elsewhere(tmp_path):
    """A folder outside --out holding a file and a sub-folder that links in --out point to."""
    folder = tmp_path / "elsewhere"
    (folder / "docs").mkdir(parents=True)
    (folder / "precious.txt").write_text("do not overwrite\n")
    (folder / "docs" / "U1.pdf").write_text("not a pack\n")
    return folder


def _links(out: Path, elsewhere: Path, names) -> None:
    out.mkdir(exist_ok=True)
    for name in names:
        if name.endswith("/"):
            (out / name.rstrip("/")).symlink_to(elsewhere / "docs", target_is_directory=True)
        else:
            (out / name).symlink_to(elsewhere / "precious.txt")


@pytest.mark.parametrize("name", sorted({n for f in FORMATS for n in OUTPUT_NAMES[f]}))
def test_a_link_in_out_is_refused_before_any_work(lagaudit, register, tmp_path, elsewhere, name):
    out = tmp_path / "out"
    _links(out, elsewhere, [name])
    before = snapshot(elsewhere)
    code, _, err = lagaudit("run", register, "--out", out)
    assert code == 2
    assert err.count("\n") == 1 and "symbolic link" in err and name.rstrip("/") in err
    assert snapshot(elsewhere) == before
    assert sorted(p.name for p in out.iterdir()) == [name.rstrip("/")]  # nothing else written


@pytest.mark.parametrize("fmt", FORMATS)
def test_every_writer_refuses_links_when_it_writes(small_audit, tmp_path, elsewhere, fmt):
    """Each writer of the registry, called with links already in place (a link made after the
    command's own check): it raises, writes nothing through the link, leaves no temporary."""
    out = tmp_path / "out"
    _links(out, elsewhere, OUTPUT_NAMES[fmt])
    before = snapshot(elsewhere)
    with pytest.raises(LagauditError, match="symbolic link"):
        write_outputs(small_audit, OutputFolder(out), [fmt], meta={})
    assert snapshot(elsewhere) == before
    assert not [p for p in out.rglob("*") if p.name.endswith(".part")]


def test_links_to_folders_inside_out_are_not_written_through(small_audit, tmp_path, elsewhere):
    out = tmp_path / "out"
    _links(out, elsewhere, ["workorders/"])
    before = snapshot(elsewhere)
    with pytest.raises(LagauditError, match="workorders"):
        write_outputs(small_audit, OutputFolder(out), ["pdf"], meta={})
    assert snapshot(elsewhere) == before


def test_out_that_is_a_file_is_refused(lagaudit, register, tmp_path):
    out = tmp_path / "out.txt"
    out.write_text("mine\n")
    code, _, err = lagaudit("run", register, "--out", out)
    assert code == 2 and err.count("\n") == 1
    assert "is a file, not a folder" in err
    assert out.read_text() == "mine\n"


def test_out_that_cannot_be_written_is_said_in_one_line(lagaudit, register, tmp_path, monkeypatch):
    # The tests may run as root, who writes anywhere: the refusal is simulated where it happens.
    def denied(self, *args, **kwargs):
        raise PermissionError(13, "Permission denied", str(self))
    monkeypatch.setattr(Path, "mkdir", denied)
    code, _, err = lagaudit("run", register, "--out", tmp_path / "readonly" / "out")
    assert code == 2 and err.count("\n") == 1
    assert "cannot write into" in err and "permission denied" in err


def test_a_second_run_into_the_same_out_is_refused(lagaudit, register, tmp_path):
    out = tmp_path / "out"
    with OutputFolder(out):  # the first run, still writing
        code, _, err = lagaudit("run", register, "--out", out, "--format", "csv")
        assert code == 2 and err.count("\n") == 1
        assert "another lagaudit run is writing into" in err
        assert not (out / "results.csv").exists()
    assert not (out / LOCK_NAME).exists()  # the first run's lock is gone with it
    code, _, err = lagaudit("run", register, "--out", out, "--format", "csv", "-q")
    assert code == 0, err
    assert not (out / LOCK_NAME).exists()


def test_ctrl_c_while_writing_leaves_no_half_file(lagaudit, register, tmp_path, monkeypatch):
    import audit.outputs

    def interrupted(sheets, path, **kwargs):
        Path(path).write_bytes(b"PK\x03\x04 a third of a workbook")
        raise KeyboardInterrupt
    monkeypatch.setattr(audit.outputs, "write_xlsx", interrupted)
    out = tmp_path / "out"
    code, out_text, err = lagaudit("run", register, "--out", out, "--format", "csv,xlsx")
    assert code == 130
    assert err == "lagaudit: interrupted; no output was left half-written\n"
    assert sorted(p.name for p in out.iterdir()) == ["findings.csv", "results.csv"]  # complete ones


def test_work_order_workers_die_with_their_parent(tmp_path):
    """The parent is killed outright (SIGKILL: no handler runs); its render workers must stop
    at once, not finish their packs into --out."""
    script = tmp_path / "parent.py"
    script.write_text(textwrap.dedent(f"""
        import os, time
        from pathlib import Path
        import audit.report.workorders as w
        from audit.io.writers.place import OutputFolder

        def slow(task):
            os.write(1, ("worker %d" % os.getpid() + chr(10)).encode())  # one write: whole lines
            time.sleep(60)
            Path(task[1]).write_text("written after the parent died")

        w._render_pack = slow
        folder = OutputFolder({str(tmp_path / 'out')!r})
        folder.prepare()
        tasks = [("", Path({str(tmp_path / 'out')!r}) / f".{{k}}.part", f"{{k}}.pdf") for k in range(2)]
        w.render_packs(folder, tasks, 2)
    """))
    root = str(Path(__file__).parents[2])  # this tree's audit package, not an installed one
    parent = subprocess.Popen([sys.executable, str(script)], stdout=subprocess.PIPE, text=True,
                              cwd=root, env={**os.environ, "PYTHONPATH": root})
    workers = [int(parent.stdout.readline().split()[1]) for _ in range(2)]
    parent.send_signal(signal.SIGKILL)
    parent.wait(10)
    deadline = time.monotonic() + 10  # generous: the machine may be busy
    while time.monotonic() < deadline and any(_alive(pid) for pid in workers):
        time.sleep(0.1)
    assert not any(_alive(pid) for pid in workers)
    assert not any((tmp_path / "out").iterdir())


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except FileNotFoundError:
        return False
    return state not in ("Z", "X")


@pytest.mark.parametrize("text", ["\uff1dSUM(A1)", "\uff0b1", "\uff0dx", "\uff20SUM(1)", "\n=1",
                                  "\r=1", "\t=1", "  =cmd", "\u00a0\u00a0@SUM(1)", " \u00a0+1+1",
                                  "\u3000=1", "=1", "-x", "+", "@"])
def test_formula_variants_are_neutralised(text):
    assert needs_prefix(text)


@pytest.mark.parametrize("text", ["-5", "+1.5", "1e-3", "-.5", "5.", "-2E+10", "abc", "", "a=b",
                                  "1-2"])
def test_plain_numbers_and_plain_text_are_left_alone(text):
    assert not needs_prefix(text)


@pytest.mark.parametrize("text", ["-5", "+1.5", "1e-3", "-2E+10"])
def test_plain_number_text(text):
    assert is_plain_number(text)


def test_variants_are_inert_in_csv_and_xlsx(lagaudit, register, tmp_path):
    out = tmp_path / "out"
    code, _, err = lagaudit("run", register, "--out", out, "--format", "csv,xlsx", "-q")
    assert code == 0, err
    with open(out / "results.csv", encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert [r["remarks"] for r in rows] == ["'\uff1dSUM(A1)", "'\uff0b1", "'\n=1+1", "'  =cmd",
                                            "'\u00a0\u00a0@SUM(1)", "-5"]
    assert [r["tag"][:2] for r in rows][2:4] == ["'\uff0d", "'\uff20"]
    sheet = openpyxl.load_workbook(out / "results.xlsx", read_only=True)["results"]
    cells = [c for row in sheet.iter_rows(values_only=True) for c in row if isinstance(c, str)]
    assert not [c for c in cells if needs_prefix(c)]
    assert "'\uff1dSUM(A1)" in cells


def test_escape_sequences_never_reach_the_terminal(lagaudit, tmp_path):
    name = tmp_path / "reg\x1b]0;owned\x07\x1b[2J.csv"
    code, out, err = lagaudit("run", name, "--out", tmp_path / "out")
    assert code == 2
    assert "\x1b" not in err + out and "\x07" not in err + out
    assert printable("a\x1b[31mb\x9b\tc\nd") == "a\\x1b[31mb\\x9b\tc\nd"


def test_a_table_wider_than_xlsx_is_split_and_said(small_audit, tmp_path, monkeypatch, capsys):
    """Lowered limits stand in for XLSX's 16,384 columns (a real one takes minutes to write)."""
    monkeypatch.setattr(xlsx_writer, "MAX_COLUMNS", 12)
    out = tmp_path / "out"
    out.mkdir()
    write_outputs(small_audit, OutputFolder(out), ["xlsx"], meta={})
    err = capsys.readouterr().err
    assert "split over sheets results, results (2)" in err
    book = openpyxl.load_workbook(out / "results.xlsx", read_only=True)
    names = [n for n in book.sheetnames if n.startswith("results")]
    headers = [[c.value for c in next(book[n].iter_rows(max_row=1))] for n in names]
    assert all(len(h) <= 12 for h in headers)
    columns = [str(c) for c in small_audit.results.columns]
    assert headers[0] == columns[:12]
    assert all(h[:2] == ["tag", "source"] for h in headers[1:])
    assert [c for h in headers[1:] for c in h[2:]] == columns[12:]  # none lost, none twice
    for n in names:
        assert book[n].max_row == len(small_audit.results) + 1


def test_a_table_longer_than_xlsx_is_split_by_rows(tmp_path, monkeypatch):
    monkeypatch.setattr(xlsx_writer, "MAX_ROWS", 4)
    frame = pd.DataFrame({"tag": [f"T{i}" for i in range(7)], "x": range(7)})
    notes = []
    xlsx_writer.write_xlsx({"findings": frame}, tmp_path / "f.xlsx", notes=notes)
    book = openpyxl.load_workbook(tmp_path / "f.xlsx", read_only=True)
    assert book.sheetnames == ["findings", "findings (2)", "findings (3)"]
    tags = [r[0] for n in book.sheetnames for r in book[n].iter_rows(min_row=2, values_only=True)]
    assert tags == list(frame["tag"])
    assert notes and "split over sheets findings, findings (2), findings (3)" in notes[0]


def test_no_temporary_or_lock_is_left_by_a_whole_run(lagaudit, register, tmp_path):
    out = tmp_path / "out"
    code, _, err = lagaudit("run", register, "--out", out, "-q")
    assert code == 0, err
    left = [p for p in out.rglob("*") if p.name.startswith(".")]
    assert left == []
    assert (out / "workorders.csv").exists() and any((out / "workorders").iterdir())
    assert os.listdir(out)


def test_sigterm_while_writing_stops_like_ctrl_c(lagaudit, register, tmp_path, monkeypatch):
    import audit.outputs

    def terminated(sheets, path, **kwargs):
        Path(path).write_bytes(b"PK\x03\x04 part of a workbook")
        os.kill(os.getpid(), signal.SIGTERM)  # as `kill PID` from another terminal
        time.sleep(5)  # the handler raises before this ends
    monkeypatch.setattr(audit.outputs, "write_xlsx", terminated)
    out = tmp_path / "out"
    code, _, err = lagaudit("run", register, "--out", out, "--format", "csv,xlsx")
    assert code == 143
    assert err == "lagaudit: terminated; no output was left half-written\n"
    assert sorted(p.name for p in out.iterdir()) == ["findings.csv", "results.csv"]
    assert signal.getsignal(signal.SIGTERM) is not audit.cli._stopped  # handler given back


def test_a_full_disk_while_writing_is_one_line(lagaudit, register, tmp_path, monkeypatch):
    import audit.outputs

    def full(sheets, path, **kwargs):
        Path(path).write_bytes(b"PK")
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(audit.outputs, "write_xlsx", full)
    out = tmp_path / "out"
    code, _, err = lagaudit("run", register, "--out", out, "--format", "xlsx")
    assert code == 2 and err.count("\n") == 1
    assert "cannot write into" in err and "results.xlsx" in err and "no space left" in err
    assert not out.exists()  # no temporary left, and the folder it made is gone
