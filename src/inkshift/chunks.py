"""Work over millions of items in chunks, shared between worker threads.

numpy releases the GIL inside its array loops, so chunks of one large array
operation run in parallel in threads; chunking also bounds the temporaries
(a chunk's float64 intermediates instead of the whole array's).
"""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor
from typing import Callable

__all__ = ["for_each_chunk", "WORKERS"]

WORKERS = 2
"""Worker threads: the machines this project is tuned and benchmarked on have
two cores (benchmarks/check_command.py)."""


def for_each_chunk(run: Callable[[int], None], n: int, chunk: int, *, threads: bool = True) -> None:
    """Call ``run(start)`` for the chunks ``start = 0, chunk, 2 * chunk, ...`` of ``n`` items.

    With more than one chunk they are shared among :data:`WORKERS` threads
    (unless ``threads`` is False: a caller already running in a worker), so
    ``run`` must write only its own chunk's share of any output.
    """
    starts = range(0, n, chunk)
    if threads and len(starts) > 1:
        with ThreadPoolExecutor(max_workers=WORKERS) as pool:
            list(pool.map(run, starts))
    else:
        for s in starts:
            run(s)
