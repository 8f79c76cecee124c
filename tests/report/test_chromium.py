"""The HTML report in a real browser: headless Chromium (Debian's ``chromium``) renders it,
takes a screenshot, and logs no console message (no script error, no blocked fetch).

Chromium writes every console message of the page to stderr as ``...:CONSOLE...`` with
``--enable-logging=stderr``; a page with a deliberate error proves that the detection works.
"""

import shutil
import subprocess

import pytest
from PIL import Image

from audit.cli import CAUTION
from audit.report.context import build_context
from audit.report.html import render

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="Debian's chromium is not installed "
                                "(.ci/run installs it: apt-get install -y chromium)")


def screenshot(page, tmp_path):
    """(console lines, screenshot image) of ``page`` opened in headless Chromium."""
    png = tmp_path / (page.stem + ".png")
    done = subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         f"--user-data-dir={tmp_path / ('profile-' + page.stem)}", "--enable-logging=stderr", "--v=0",
         "--window-size=1200,1600", f"--screenshot={png}", page.as_uri()],
        capture_output=True, text=True, timeout=120)
    console = [line for line in done.stderr.splitlines() if ":CONSOLE" in line]
    return console, Image.open(png).convert("L")


def test_detection_sees_a_script_error(tmp_path):
    page = tmp_path / "broken.html"
    page.write_text("<!DOCTYPE html><p>x</p><script>console.error('deliberate'); notDefined();</script>",
                    encoding="utf-8")
    console, _ = screenshot(page, tmp_path)
    assert any("deliberate" in line for line in console)
    assert any("notDefined" in line for line in console)


def test_report_renders_with_no_console_message(hostile_audit, meta, tmp_path):
    page = tmp_path / "report.html"
    page.write_text(render("report.html", build_context(hostile_audit, meta=meta, caution=CAUTION)),
                    encoding="utf-8")
    console, image = screenshot(page, tmp_path)
    assert console == []
    # Something was drawn: the screenshot is not one flat colour (a blank or failed page is).
    low, high = image.getextrema()
    assert high - low > 100
    dark = sum(image.histogram()[:100]) / (image.width * image.height)
    assert dark > 0.005  # text and rules cover some of the page
