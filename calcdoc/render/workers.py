"""The process pool a build spreads its costly pure work on (figures, the PDF's parts).

Fork is quickest (a worker has calcdoc, matplotlib and WeasyPrint loaded already) but is safe
only while this process runs one thread; otherwise, and where there is no fork, workers are
spawned. What a worker is given and returns is calcdoc's own data between its own processes;
nothing read from a file is unpickled.
"""

from __future__ import annotations

import concurrent.futures
import multiprocessing
import threading

__all__ = ["pool"]


def pool(jobs: int) -> concurrent.futures.ProcessPoolExecutor:
    """Return a process pool of ``jobs`` workers (use it as a context manager)."""
    method = ("fork" if threading.active_count() == 1
              and "fork" in multiprocessing.get_all_start_methods() else "spawn")
    return concurrent.futures.ProcessPoolExecutor(
        max_workers=jobs, mp_context=multiprocessing.get_context(method))
