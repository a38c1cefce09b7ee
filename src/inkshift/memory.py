"""Hand memory freed by large numpy temporaries back to the operating system.

numpy takes its arrays from the C allocator. With glibc, blocks under the
dynamic mmap threshold (up to 32 MiB) come from the heap and from one arena
per thread, and freed pages that are not at the top of a heap stay resident.
A check makes hundreds of megabytes of such temporaries in one step (the
palette's evidence, the proof's chunks) and would carry them, unused, into
the next; ``malloc_trim`` returns them (glibc manual, "Memory Allocation
Tunables" and malloc_trim(3)). Measured on a 24-megapixel photograph:
see benchmarks/check_command.py.
"""

from __future__ import annotations

import ctypes
import sys
from functools import lru_cache
from typing import Callable

__all__ = ["release_freed_memory"]


@lru_cache(maxsize=1)
def _malloc_trim() -> Callable[[int], int] | None:
    if not sys.platform.startswith("linux"):
        return None
    try:
        trim = ctypes.CDLL(None).malloc_trim  # glibc; absent from musl and others
    except (OSError, AttributeError):
        return None
    trim.argtypes = [ctypes.c_size_t]
    trim.restype = ctypes.c_int
    return trim


def release_freed_memory() -> None:
    """Return freed heap pages to the operating system (glibc ``malloc_trim(0)``); elsewhere nothing."""
    trim = _malloc_trim()
    if trim is not None:
        trim(0)
