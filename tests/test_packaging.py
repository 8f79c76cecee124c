"""The installed command works from any folder: the wheel carries the rules and demo data;
CI runs the README's own test command.

The command tests run only where ``lagaudit`` is installed (as .ci/run installs it, with
``pip install ".[test]"``, not editable); in a development tree without an install they skip.
"""

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent


def installed_command():
    command = shutil.which("lagaudit")
    if command is None:
        pytest.skip("lagaudit is not installed here (CI installs it with pip install .)")
    return command


def test_installed_command_runs_from_an_unrelated_folder(tmp_path):
    command = installed_command()
    register = tmp_path / "reg.csv"
    shutil.copy(REPO / "sample_data" / "demo_line_list.csv", register)
    work = tmp_path / "elsewhere"
    work.mkdir()
    done = subprocess.run([command, "run", str(register), "--format", "csv", "--out", "out"],
                          cwd=work, capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    assert (work / "out" / "results.csv").is_file()
    assert "Traceback" not in done.stderr


def test_installed_package_finds_its_shipped_rules(tmp_path):
    installed_command()
    code = ("import audit.rules as r, pathlib; d = r.shipped_rules_dir(); "
            "print(d); assert any(pathlib.Path(d).glob('*.toml'))")
    done = subprocess.run([sys.executable, "-c", code], cwd=tmp_path, capture_output=True,
                          text=True, timeout=120)
    assert done.returncode == 0, done.stderr


def readme_test_command():
    """The command under the README's "Run the tests" paragraph (its first indented line)."""
    lines = (REPO / "README.md").read_text(encoding="utf-8").splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("Run the tests"))
    return next(line.strip() for line in lines[start:] if line.startswith("    "))


def test_ci_runs_exactly_the_readme_test_command():
    command = readme_test_command()
    assert command.startswith('pip install ".[test]"')  # a fresh machine has no pytest yet
    ci = (REPO / ".ci" / "run").read_text(encoding="utf-8").splitlines()
    assert command in (line.strip() for line in ci)
