"""Evaluations on a Dask distributed cluster (``COLDSEAM_CLUSTER=tcp://host:port``): the same
``submit(job)`` and callbacks (``Job.on_start/on_progress/on_finish``) as the local
``WorkerPool``, backed by ``dask.distributed.Client``.

Each job is one task (``cluster_task.evaluate_on_worker``, ``pure=False``, ``retries``): the
scheduler runs it again elsewhere when the worker running it is lost (up to its
``allowed-failures``), and ``retries`` covers an exception in the task itself. Start and
progress come back as events on this server's topic; one dispatcher thread calls the
callbacks in order, so a job's start and progress never follow its finish; finished outcomes
are stored by a few threads side by side.
"""

from __future__ import annotations

import logging
import queue
import threading
import time
import uuid
from concurrent.futures import ThreadPoolExecutor
from typing import Any

from distributed import Client
from distributed.scheduler import KilledWorker

from coldseam.api.cluster_task import evaluate_on_worker, outcome_of, prestart
from coldseam.api.pool import ClusterUnavailable, QueueFull
from coldseam.api.slot import Job, Outcome, failure

log = logging.getLogger(__name__)

RETRIES = 2  # further attempts of a task that raised
CONNECT_TIMEOUT = 20.0  # s to reach the scheduler at start
RESULT_TIMEOUT = 60.0  # s to fetch a finished task's outcome from its worker
THREADS_REFRESH = 5.0  # s between two looks at how many worker threads the cluster has
#: Threads storing finished outcomes (zlib of the field, JSON, the database: in parallel).
FINISHERS = 4


class ClusterPool:
    """Jobs run as Dask tasks; at most ``queue_size`` beyond the cluster's threads in flight."""

    def __init__(self, address: str, engine_spec: str, timeout: float, queue_size: int,
                 instance: str, memory_limit: int = 0, start_method: str = "spawn",
                 prestart: bool = True) -> None:
        self.address, self._queue_size = address, queue_size
        self.topic = f"coldseam-progress-{instance}-{uuid.uuid4().hex[:8]}"
        self._config = {"engine": engine_spec, "timeout": timeout, "topic": self.topic,
                        "memory_limit": memory_limit, "start_method": start_method}
        self._client: Client | None = None
        self._jobs: dict[str, tuple[Job, str, Any]] = {}  # key: job, task token, future
        self._lock = threading.Lock()
        self._events: queue.Queue[tuple | None] = queue.Queue()
        self._dispatcher = threading.Thread(target=self._dispatch, name="coldseam-cluster",
                                            daemon=True)
        self._finishers = ThreadPoolExecutor(FINISHERS, thread_name_prefix="coldseam-finish")
        self._threads, self._threads_at = 1, -THREADS_REFRESH
        self._mean_seconds = 5.0
        self._prestart = prestart
        self.stopping = False
        self.completed = 0

    def start(self) -> None:
        """Connect to the scheduler (raises ClusterUnavailable when it cannot be reached)."""
        try:
            self._client = Client(self.address, timeout=CONNECT_TIMEOUT, set_as_default=False,
                                  name=f"coldseam-server-{self.topic}")
        except (OSError, TimeoutError) as exc:
            raise ClusterUnavailable(f"the Dask scheduler at {self.address} cannot be "
                                     f"reached ({exc})") from None
        self._client.subscribe_topic(self.topic, self._event)
        self._dispatcher.start()
        if self._prestart:
            try:  # each worker starts its engine processes in the background
                self._client.run(prestart, self._config)
            except Exception as exc:  # noqa: BLE001 - the first task starts them instead
                log.warning("the cluster workers could not start engine processes ahead "
                            "(%s: %s)", type(exc).__name__, exc)
        log.info("evaluations go to the Dask cluster at %s (%d worker threads)", self.address,
                 self.threads())

    def threads(self) -> int:
        """Worker threads of the cluster (looked up at most every THREADS_REFRESH s)."""
        now = time.monotonic()
        if now - self._threads_at > THREADS_REFRESH and self._client is not None:
            try:
                self._threads = max(1, sum(self._client.nthreads().values()))
            except (OSError, TimeoutError) as exc:
                log.warning("could not ask the scheduler for its workers: %s", exc)
            self._threads_at = now
        return self._threads

    def capacity(self) -> int:
        """Evaluations that can run at once: the cluster's worker threads."""
        return self.threads()

    def submit(self, job: Job) -> None:
        """Send ``job`` to the cluster; QueueFull when too many are in flight."""
        token = f"coldseam-{job.key[:16]}-{uuid.uuid4().hex[:12]}"
        with self._lock:
            if self.stopping or len(self._jobs) >= self._queue_size + self.threads():
                raise QueueFull(self.retry_after())
            self._jobs[job.key] = (job, token, None)
        try:
            future = self._client.submit(evaluate_on_worker, job.key, token, job.request,
                                         self._config, key=token, pure=False, retries=RETRIES)
        except Exception as exc:  # noqa: BLE001 - whatever the client raises, the job is off
            with self._lock:
                self._jobs.pop(job.key, None)
            raise ClusterUnavailable(f"the Dask scheduler at {self.address} did not take the "
                                     f"evaluation ({type(exc).__name__}: {exc})") from None
        with self._lock:
            self._jobs[job.key] = (job, token, future)
        future.add_done_callback(lambda done: self._events.put(("finish", job.key, token,
                                                                done)))

    def retry_after(self) -> int:
        """Seconds after which a place in the queue is likely free."""
        return max(1, round(self._mean_seconds * (len(self._jobs) + 1) / self.threads()))

    def worker_pids(self) -> list[int | None]:
        return []  # the engine processes run on the cluster's machines

    def shutdown(self) -> None:
        """Cancel what is in flight (answered Interrupted) and leave the cluster."""
        self.stopping = True
        with self._lock:
            futures = [future for _, _, future in self._jobs.values() if future is not None]
        if self._client is not None and futures:
            try:
                self._client.cancel(futures)
            except Exception as exc:  # noqa: BLE001 - leaving anyway
                log.warning("could not cancel %d cluster tasks: %s", len(futures), exc)
        self._events.put(None)
        if self._dispatcher.is_alive():
            self._dispatcher.join(10.0)
        self._finishers.shutdown(wait=True)
        for job, _, _ in list(self._jobs.values()):
            job.on_finish(job, failure("Interrupted", "the server stopped before this "
                                       "evaluation finished; send it again"))
        self._jobs.clear()
        if self._client is not None:
            self._client.close(timeout=5)

    def _event(self, event: tuple[float, dict[str, Any]]) -> None:
        """A start or progress event (on the client's event loop: only queued here)."""
        message = event[1]
        self._events.put((message.get("kind"), message.get("key"), message.get("token"),
                          message))

    def _dispatch(self) -> None:
        while (event := self._events.get()) is not None:
            kind, key, token, detail = event
            with self._lock:
                entry = self._jobs.get(key)
                if entry is None or entry[1] != token:
                    continue  # an earlier attempt of a finished job, or another server's
                if kind == "finish":
                    self._jobs.pop(key)
            if kind == "finish":  # after every earlier event of the job: those came first
                self._finishers.submit(self._safely, kind, entry, detail)
            else:
                self._safely(kind, entry, detail)

    def _safely(self, kind: str, entry: tuple[Job, str, Any], detail: Any) -> None:
        try:
            self._deliver(kind, entry, detail)
        except Exception:  # noqa: BLE001 - one job's callback must not stop the others
            log.exception("cluster %s event of %s failed", kind, entry[0].key[:12])

    def _deliver(self, kind: str, entry: tuple[Job, str, Any], detail: Any) -> None:
        job = entry[0]
        if kind == "start":
            job.extra["started"] = time.monotonic()
            job.on_start(job)
        elif kind == "progress":
            job.on_progress(job, str(detail["stage"]), float(detail["fraction"]))
        elif kind == "finish":
            outcome = self._outcome(detail)  # the finished future
            started = job.extra.get("started")
            with self._lock:
                if started is not None:
                    self._mean_seconds = 0.8 * self._mean_seconds + 0.2 * (
                        time.monotonic() - started)
                self.completed += 1
            job.on_finish(job, outcome)

    def _outcome(self, future: Any) -> Outcome:
        """What the task ended with: its Outcome, or why it has none (never raises: the job
        must finish)."""
        try:
            return self._read_outcome(future)
        except Exception as exc:  # noqa: BLE001 - reported as the evaluation's failure
            log.exception("outcome of cluster task %s unreadable", future.key)
            return failure("WorkerCrashed", f"the outcome of the evaluation could not be read "
                           f"from the cluster ({type(exc).__name__}); send it again")

    def _read_outcome(self, future: Any) -> Outcome:
        if future.status == "finished":
            try:
                return outcome_of(future.result(timeout=RESULT_TIMEOUT))
            except Exception as exc:  # noqa: BLE001 - the worker holding it was lost
                return failure("WorkerCrashed", f"the outcome could not be fetched from the "
                               f"cluster ({type(exc).__name__}: {exc}); send it again")
        if future.status == "cancelled" or self.stopping:
            return failure("Interrupted", "the evaluation was cancelled on the cluster (the "
                           "server stopped or lost the scheduler); send it again")
        error = future.exception(timeout=RESULT_TIMEOUT)
        if isinstance(error, KilledWorker):
            return failure("WorkerCrashed", "every cluster worker that took this evaluation "
                           "was lost while running it; the request was not completed and may "
                           "be sent again")
        return failure("WorkerCrashed", f"the evaluation failed on the cluster "
                       f"({type(error).__name__}: {error})")
