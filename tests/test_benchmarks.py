"""The benchmark scripts still run against the code they measure (a smoke run on a tiny register;
speed is read from their output by hand, never asserted here)."""

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_bench_run_completes_every_stage_on_a_small_register():
    done = subprocess.run([sys.executable, str(ROOT / "benchmarks" / "bench_run.py"), "--items", "200",
                           "--no-end-to-end"],
                          cwd=ROOT, env={**os.environ, "PYTHONPATH": str(ROOT)},
                          capture_output=True, text=True, timeout=600)
    assert done.returncode == 0, done.stderr[-2000:]
    for stage in ("checks (all scenarios)", "remedies", "write results.xlsx", "render report.pdf"):
        assert stage in done.stdout


def test_bench_survey_completes_on_a_small_register():
    done = subprocess.run([sys.executable, str(ROOT / "benchmarks" / "bench_survey.py"), "--items",
                           "200", "--readings", "40"],
                          cwd=ROOT, env={**os.environ, "PYTHONPATH": str(ROOT)},
                          capture_output=True, text=True, timeout=600)
    assert done.returncode == 0, done.stderr[-2000:]
    for stage in ("audit without the survey", "reconciliation alone", "audit with the survey",
                  "items audited at a measured condition"):
        assert stage in done.stdout
