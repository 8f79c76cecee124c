"""The progress reporter (audit/progress.py): a bar on a terminal, silence elsewhere."""

import io
import sys

import pytest

from audit.errors import LagauditError
from audit.progress import BAR_WIDTH, Progress, progress


class Stream(io.StringIO):
    """A text stream that says whether it is a terminal."""

    def __init__(self, tty: bool):
        super().__init__()
        self.tty = tty

    def isatty(self):
        return self.tty


class Clock:
    """A clock the test moves by hand, so that redraw throttling is deterministic."""

    def __init__(self):
        self.now = 0.0

    def __call__(self):
        return self.now


def test_silent_when_not_a_terminal():
    stream = Stream(tty=False)
    with progress("Solving", 100, stream=stream) as bar:
        for _ in range(100):
            bar.advance()
    assert bar.done == 100
    assert stream.getvalue() == ""


def test_silent_on_a_stream_without_isatty_or_closed():
    class Closed(io.StringIO):
        def isatty(self):
            raise ValueError("I/O operation on closed file")

    for stream in (Closed(), object()):
        bar = Progress("Solving", 3, stream)
        assert not bar.enabled


def test_bar_drawn_on_a_terminal_and_line_ended():
    stream, clock = Stream(tty=True), Clock()
    with progress("Solving", 10, stream=stream, clock=clock) as bar:
        for _ in range(10):
            clock.now += 1.0
            bar.advance()
    text = stream.getvalue()
    assert text.startswith("\rSolving [")
    assert text.endswith("\n")
    final = text.rstrip("\n").split("\r")[-1]
    assert final.startswith("Solving [" + "#" * BAR_WIDTH + "] 100% 10/10")
    assert text.count("\r") == 11  # one redraw per step (1 s apart > interval) and the last


def test_redraws_throttled_to_the_interval():
    stream, clock = Stream(tty=True), Clock()
    bar = Progress("Reading", 1000, stream, interval=0.5, clock=clock)
    for _ in range(1000):  # all within the same instant: only the first is drawn
        bar.advance()
    assert stream.getvalue().count("\r") == 1
    clock.now = 0.6
    bar.advance(0)
    assert stream.getvalue().count("\r") == 2


def test_line_shows_share_count_and_time():
    clock = Clock()
    bar = Progress("Solving", 10, Stream(tty=True), clock=clock)
    bar.done = 5
    clock.now = 2.0
    line = bar.line()
    filled = BAR_WIDTH // 2
    assert line == f"Solving [{'#' * filled}{'.' * (BAR_WIDTH - filled)}]  50% 5/10 2.0 s"


def test_unknown_total_counts_only():
    clock = Clock()
    bar = Progress("Checking", None, Stream(tty=True), clock=clock)
    bar.advance(3)
    assert bar.line() == "Checking 3 0.0 s"


def test_default_stream_is_stderr(monkeypatch):
    fake = Stream(tty=True)
    monkeypatch.setattr(sys, "stderr", fake)
    with progress("Writing", 1) as bar:
        bar.advance()
    assert "Writing" in fake.getvalue()


def test_negative_total_refused():
    with pytest.raises(LagauditError, match="negative"):
        Progress("Solving", -1, Stream(tty=False))


def test_bar_finished_even_when_the_work_fails():
    stream = Stream(tty=True)
    with pytest.raises(RuntimeError):
        with progress("Solving", 4, stream=stream) as bar:
            bar.advance()
            raise RuntimeError("stop")
    assert stream.getvalue().endswith("\n")
