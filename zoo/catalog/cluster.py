"""Classifying areas on a Dask distributed cluster: ``zoo build --cluster ADDRESS``.

Areas are independent (``zoo.catalog.classify``), so each area is one task; the workers run
``classify_area`` (nauty included) and send back its ``AreaClassification``, and the build's
own process stays the only writer, storing the areas in increasing order as before. A task
whose worker is lost is run again on another worker by the scheduler (Dask's
``distributed.scheduler.allowed-failures``, 3 by default); a task that raises (a
classification disagreement) is not retried, because it would fail again. The results are
those of a single-process build: the same function on the same input.

``ADDRESS`` is a scheduler address (``tcp://host:8786`` or ``host:8786``; every worker needs
this zoo installed) or ``local:N``, which starts a local cluster of N worker processes on the
loopback interface for the duration of the build.
"""

from __future__ import annotations

import re
import uuid
from collections.abc import Iterator, Sequence
from types import TracebackType
from typing import Any

from zoo.catalog.classify import AreaClassification, classify_area
from zoo.errors import CatalogError, MissingExtra, ParameterError, extra_advice

__all__ = ["ClusterClassifier", "check_cluster_address"]

_LOCAL = re.compile(r"local:(\d+)")
_REMOTE = re.compile(r"(?:tcp|tls)://[^\s/:]+:\d+|[^\s/:]+:\d+")

#: Most local worker processes ``local:N`` starts (each holds one area in memory).
MAX_LOCAL_WORKERS = 64


def check_cluster_address(address: object) -> str:
    """``address`` if ``--cluster`` accepts it (local:N or a scheduler host:port); else an error."""
    text = address.strip() if isinstance(address, str) else ""
    local = _LOCAL.fullmatch(text)
    if local is not None:
        workers = int(local.group(1))
        if not 1 <= workers <= MAX_LOCAL_WORKERS:
            raise ParameterError(
                f"--cluster {text}: a local cluster needs 1 to {MAX_LOCAL_WORKERS} workers, "
                "e.g. --cluster local:2"
            )
        return text
    if _REMOTE.fullmatch(text) is None:
        raise ParameterError(
            f"--cluster {address!r} is not a cluster address; give a Dask scheduler such as "
            "tcp://10.0.0.5:8786 or local:N for N local worker processes"
        )
    return text


class ClusterClassifier:
    """A connection to a Dask cluster that classifies areas; a context manager.

    >>> with ClusterClassifier("local:2") as cluster:  # doctest: +SKIP
    ...     results = list(cluster.classify([1, 2, 3]))
    """

    def __init__(self, address: str) -> None:
        self.address = check_cluster_address(address)
        self._cluster: Any = None
        self.client: Any = None

    def __enter__(self) -> ClusterClassifier:
        try:
            from distributed import Client, LocalCluster
        except ImportError:
            raise MissingExtra(
                extra_advice("Dask's distributed package", "cluster", "--cluster")
            ) from None
        local = _LOCAL.fullmatch(self.address)
        try:
            if local is not None:
                self._cluster = LocalCluster(  # type: ignore[no-untyped-call]
                    n_workers=int(local.group(1)),
                    threads_per_worker=1,  # nauty holds the GIL: one area per process
                    processes=True,
                    host="127.0.0.1",
                    dashboard_address=None,
                )
                self.client = Client(self._cluster)  # type: ignore[no-untyped-call]
            else:
                self.client = Client(self.address, timeout="20s")  # type: ignore[no-untyped-call]
        except OSError as exc:
            self.close()
            raise CatalogError(
                f"cannot reach the Dask scheduler at {self.address}: {exc}; start one with "
                "dask scheduler (and dask worker ADDRESS on each machine) or use --cluster local:N"
            ) from None
        return self

    def __exit__(
        self,
        kind: type[BaseException] | None,
        value: BaseException | None,
        traceback: TracebackType | None,
    ) -> None:
        self.close()

    def close(self) -> None:
        if self.client is not None:
            self.client.close()
            self.client = None
        if self._cluster is not None:
            self._cluster.close()
            self._cluster = None

    @property
    def workers(self) -> int:
        """Worker processes the scheduler knows now."""
        if self.client is None:
            return 0
        return len(self.client.scheduler_info(n_workers=-1).get("workers", {}))

    def classify(
        self, areas: Sequence[int], behaviour_limit: int | None = None
    ) -> Iterator[AreaClassification]:
        """Classify ``areas`` on the cluster; yield the results in the order of ``areas``.
        ``behaviour_limit`` is ``classify_area``'s (None: the default state bound, 0: none).

        Every area is submitted at once, before this returns, largest first (the longest tasks
        start first while small ones fill the gaps); results are yielded, and released, in the
        given order, so the writer holds one area at a time beyond those that finished early.
        """
        if self.client is None:
            raise CatalogError("the cluster is not connected; use ClusterClassifier as a context")
        build = uuid.uuid4().hex[:12]  # keys unique to this build on a shared scheduler
        futures = {
            area: self.client.submit(
                classify_area,
                area,
                behaviour_limit=behaviour_limit,
                key=f"zoo-classify-{build}-area-{area}",
                priority=area,
            )
            for area in sorted(areas, reverse=True)
        }
        return self._in_order(list(areas), futures)

    @staticmethod
    def _in_order(areas: list[int], futures: dict[int, Any]) -> Iterator[AreaClassification]:
        try:
            for area in areas:
                future = futures.pop(area)
                result: AreaClassification = future.result()
                future.release()
                yield result
        finally:
            for future in futures.values():
                future.cancel()
