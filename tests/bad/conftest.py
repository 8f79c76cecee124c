"""Fixtures of the bad-input tests: the command line run in-process, as a user runs it."""

import pandas as pd
import pytest

from audit.cli import main


@pytest.fixture
def lagaudit(capsys):
    """Run ``lagaudit ARGS...`` in-process; return (exit code, stdout, stderr).

    An exception escaping ``main`` is what a user would see as a traceback: it propagates and
    fails the test.  Output must never show a traceback either.
    """
    def run(*argv):
        code = main([str(a) for a in argv])
        out, err = capsys.readouterr()
        assert "Traceback" not in out and "Traceback" not in err
        return code, out, err
    return run


@pytest.fixture
def results_of(lagaudit, tmp_path):
    """Run a register through ``lagaudit run`` (CSV only); exit 0 expected; results by tag."""
    def run(register, *options):
        out = tmp_path / "out"
        code, _, err = lagaudit("run", register, "--out", out, "--format", "csv", *options)
        assert code == 0, err
        return pd.read_csv(out / "results.csv", keep_default_na=False, dtype=str)
    return run


@pytest.fixture
def refused(lagaudit, tmp_path):
    """``lagaudit run PATH``: exit 2, nothing written, one error naming the file and the fix."""
    def run(path, *options):
        out = tmp_path / "refused-out"
        code, _, err = lagaudit("run", path, "--out", out, *options)
        assert code == 2, err
        assert err.startswith("lagaudit: error: ") and str(path) in err
        assert "; expected " in err  # what to do instead
        assert not out.exists() or not any(out.iterdir())  # nothing half-written
        return err
    return run
