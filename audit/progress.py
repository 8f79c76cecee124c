"""Progress of long work, as a bar on a terminal and nothing elsewhere.

::

    with progress("Solving", total=len(table)) as bar:
        for chunk in chunks:
            ...
            bar.advance(len(chunk))

The bar is drawn on ``stream`` (standard error by default) only when that stream is a terminal,
so piped or redirected output and log files stay clean.  It is redrawn at most every
``interval`` seconds and when the work ends.
"""

from __future__ import annotations

import sys
import time
from contextlib import contextmanager

from audit.errors import LagauditError

BAR_WIDTH = 30

#: Control characters (C0 but line feed and tab, DEL, C1) shown as ``\xNN`` on a terminal, so
#: register text such as a sheet name cannot send escape sequences to it.
_CONTROLS = {c: f"\\x{c:02x}" for c in [*range(0x20), *range(0x7f, 0xa0)] if c not in (0x09, 0x0a)}


def printable(text) -> str:
    """``text`` safe to print on a terminal: control characters written out as ``\\xNN``."""
    return str(text).translate(_CONTROLS)


class Progress:
    """A counter of work done out of ``total`` that draws itself when it may."""

    def __init__(self, label: str, total: int | None, stream=None, *, interval: float = 0.1,
                 clock=time.monotonic):
        if total is not None and total < 0:
            raise LagauditError(f"total {total!r} is negative; expected a count of work units, "
                                "0 or more")
        self.label = printable(label)
        self.total = total
        self.done = 0
        self.stream = sys.stderr if stream is None else stream
        self.enabled = _is_terminal(self.stream)
        self._interval = interval
        self._clock = clock
        self._start = clock()
        self._drawn_at = None

    def advance(self, n: int = 1) -> None:
        """Count ``n`` more units of work done."""
        self.done += n
        now = self._clock()
        if self._drawn_at is None or now - self._drawn_at >= self._interval:
            self._draw(now)

    def line(self, now: float | None = None) -> str:
        """The text of the bar as it stands: ``Solving [#####.....]  50% 500/1000 1.2 s``."""
        elapsed = (self._clock() if now is None else now) - self._start
        if self.total:
            share = min(self.done / self.total, 1.0)
            filled = int(round(share * BAR_WIDTH))
            bar = "#" * filled + "." * (BAR_WIDTH - filled)
            return (f"{self.label} [{bar}] {share * 100:3.0f}% {self.done}/{self.total} "
                    f"{elapsed:.1f} s")
        return f"{self.label} {self.done} {elapsed:.1f} s"

    def close(self) -> None:
        """Draw the final state and end the line."""
        if self.enabled:
            self._draw(self._clock())
            self.stream.write("\n")
            self.stream.flush()

    def _draw(self, now: float) -> None:
        self._drawn_at = now
        if self.enabled:
            self.stream.write("\r" + self.line(now))
            self.stream.flush()


def _is_terminal(stream) -> bool:
    isatty = getattr(stream, "isatty", None)
    try:
        return bool(isatty and isatty())
    except (ValueError, OSError):  # a closed or detached stream is not a terminal
        return False


@contextmanager
def progress(label: str, total: int | None = None, stream=None, **options):
    """A :class:`Progress` for the ``with`` block; the bar is finished when the block ends."""
    bar = Progress(label, total, stream, **options)
    try:
        yield bar
    finally:
        bar.close()
