"""Worker processes for the build: a map over areas (or classes) in a process pool that stays
quiet on Ctrl-C and when its parent dies.
"""

from __future__ import annotations

import multiprocessing
import os
import signal
import sys
import threading
from collections.abc import Callable, Iterator, Sequence
from typing import TypeVar

T = TypeVar("T")
R = TypeVar("R")


def in_workers(function: Callable[[T], R], items: Sequence[T], jobs: int) -> Iterator[R]:
    """``function`` of each item, in order, in ``jobs`` worker processes when that helps.

    With workers, Ctrl-C is this process's alone: workers ignore SIGINT, and here SIGINT only
    sets a flag that is turned into ``KeyboardInterrupt`` between two results, never inside a
    garbage-collector callback or a database write (which would print "Exception ignored"
    tracebacks). Workers end quietly when this process dies (``_pool_worker_start``).
    """
    if jobs <= 1 or len(items) <= 1:
        for item in items:
            yield function(item)
        return
    methods = multiprocessing.get_all_start_methods()
    context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
    interrupted: list[int] = []
    own_handler = threading.current_thread() is threading.main_thread()
    previous = (
        # Installed before the fork, so a worker hit before its initializer runs stays quiet.
        signal.signal(signal.SIGINT, lambda number, _frame: interrupted.append(number))
        if own_handler
        else None
    )

    def check() -> None:
        if interrupted:
            raise KeyboardInterrupt

    try:
        pool = context.Pool(
            processes=min(jobs, len(items)), initializer=_pool_worker_start, initargs=(os.getpid(),)
        )
        try:
            results = pool.imap(function, items, chunksize=1)
            for _ in items:
                while True:
                    check()
                    try:
                        result = results.next(timeout=_INTERRUPT_POLL_SECONDS)
                        break
                    except multiprocessing.TimeoutError:
                        continue
                yield result
            check()
            pool.close()
        finally:
            pool.terminate()
            pool.join()
    finally:
        if own_handler:
            signal.signal(signal.SIGINT, previous)


#: How often the builder looks for a Ctrl-C while it waits for a worker's result.
_INTERRUPT_POLL_SECONDS = 0.2


def _pool_worker_start(parent: int) -> None:
    """Initializer of a build worker: no tracebacks on Ctrl-C or when the builder dies.

    Ctrl-C reaches every process of the terminal's group; the builder handles it and stops the
    pool. A worker whose builder was killed would otherwise finish its area and then print a
    BrokenPipeError traceback when it sends the result: on Linux it is told of the death
    (PR_SET_PDEATHSIG) and ends at once; elsewhere the default SIGPIPE action ends it silently
    at the send.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if hasattr(signal, "SIGPIPE"):
        signal.signal(signal.SIGPIPE, signal.SIG_DFL)
    if sys.platform.startswith("linux"):
        try:
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(_PR_SET_PDEATHSIG, signal.SIGTERM)
        except (OSError, AttributeError):  # pragma: no cover - no usable libc
            pass
    if os.getppid() != parent:  # the builder died before the request above took effect
        os._exit(0)


#: prctl option of Linux: the signal a process receives when its parent dies.
_PR_SET_PDEATHSIG = 1


__all__ = ["in_workers"]
