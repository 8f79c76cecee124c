"""Giving freed memory back to the system between the stages of a run.

glibc's ``malloc`` keeps the memory a program frees for its next allocations, and hands it
back to the system only from the top of its heap: after a stage that made and dropped
hundreds of MiB of small Python objects (the work orders' records) the process's resident
size stays at its highest though most of it is free, and the next stage's allocations come on
top.  ``malloc_trim(0)`` returns every free page.  It changes no result: only the resident
size that the system (and a memory limit) sees.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import sys


def _trim():
    if not sys.platform.startswith("linux"):
        return None
    try:
        return ctypes.CDLL(ctypes.util.find_library("c") or None).malloc_trim
    except (OSError, AttributeError):  # not glibc (musl has no malloc_trim): nothing to do
        return None


_MALLOC_TRIM = _trim()


def give_back() -> None:
    """Return the C heap's free pages to the system (glibc); nothing elsewhere."""
    if _MALLOC_TRIM is not None:
        _MALLOC_TRIM(0)
