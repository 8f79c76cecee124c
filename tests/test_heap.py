"""audit/heap.py: freed memory handed back to the system (glibc's malloc_trim)."""

import platform
import sys

import pytest

from audit import heap


def resident_mib() -> float:
    with open("/proc/self/statm") as handle:
        return int(handle.read().split()[1]) * 4096 / 2 ** 20


@pytest.mark.skipif(not sys.platform.startswith("linux") or platform.libc_ver()[0] != "glibc",
                    reason="malloc_trim is glibc's")
def test_freed_memory_among_kept_objects_goes_back_to_the_system():
    # 200 MiB of 1 kB blocks (C heap, not Python's small-object arenas), one in 50 kept: the
    # other 49 leave runs of free pages between the kept ones that free() alone keeps resident
    # (glibc returns only the heap's top); give_back() must return most of them.
    assert heap._MALLOC_TRIM is not None
    blocks = [bytearray(1024) for _ in range(200_000)]
    kept = blocks[::50]
    del blocks
    before = resident_mib()
    heap.give_back()
    after = resident_mib()
    # 196 MiB were freed; at least half of it must leave the resident set (the margin allows
    # for pages shared with kept blocks and for the allocator's own bookkeeping).
    assert before - after > 98, (before, after)
    assert len(kept) == 4000
