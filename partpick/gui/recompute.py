"""Live rechecking: debounced after settled edits, off the UI thread for big libraries.

Every change of the requirement's valid values or of the library restarts a
short single-shot timer; when it fires, one `CheckJob` is built on the UI
thread (a snapshot) and run — inline for a small library (a few ms, and no
thread hand-over latency), in the global QThreadPool for a big one. Each job
carries a generation number; a result whose generation is not the latest is
stale and dropped, so a slow old job can never overwrite a newer answer.
"""

from __future__ import annotations

import time

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from partpick.errors import InputError, LibraryError
from partpick.gui.collector import install_collector

__all__ = ["Rechecker", "DEBOUNCE_MS", "THREAD_THRESHOLD", "SHORTLIST_LIMIT"]

DEBOUNCE_MS = 150
"""Quiet time after the last edit before the checker runs [ms]."""

THREAD_THRESHOLD = 1500
"""Libraries with at least this many parts are checked in a worker thread."""

SHORTLIST_LIMIT = 500
"""The shortlist lists the first this many candidates (``partpick check --top 500``); the status
line counts every candidate (the result's ``summary``). Building the JSON of 10,000 candidates costs
several times the check itself, and nobody reads past the first few hundred rows."""


class _Relay(QObject):
    """Carries a worker's answer back to the UI thread (queued: it lives there)."""

    done = Signal(int, object, float)
    failed = Signal(int, str)


class _Job(QRunnable):
    def __init__(self, job, relay: _Relay) -> None:
        super().__init__()
        self._job = job
        self._relay = relay

    def run(self) -> None:  # worker thread: touches no model, only the snapshot
        try:
            result, elapsed = self._job.run()
        except Exception as exc:  # reported on the UI thread, never lost in the pool
            self._relay.failed.emit(self._job.generation, f"{type(exc).__name__}: {exc}")
        else:
            self._relay.done.emit(self._job.generation, result, elapsed)


class Rechecker(QObject):
    """Runs the checker for a `Workbench` when its inputs settle.

    Attributes
    ----------
    runs : int
        Checks started (tests count these to see that garbage never runs).
    """

    checked = Signal()  # a result was applied to the result model

    def __init__(self, bench, *, delay_ms: int = DEBOUNCE_MS, thread_threshold: int = THREAD_THRESHOLD,
                 parent=None) -> None:
        super().__init__(parent)
        self._bench = bench
        self.thread_threshold = thread_threshold
        self.generation = 0
        self.runs = 0
        self.pending = 0
        self.last_started = 0.0
        self._pool = QThreadPool.globalInstance()
        install_collector()  # a worker thread must never run the cyclic collector (see gui/collector.py)
        self._relay = _Relay(self)
        self._relay.done.connect(self._apply)
        self._relay.failed.connect(self._fail)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self.run_now)
        bench.requirement.values_changed.connect(self.schedule)
        bench.requirement.errors_changed.connect(self._errors_changed)
        bench.library.parts_changed.connect(self.schedule)

    @property
    def busy(self) -> bool:
        return self._timer.isActive() or self.pending > 0

    def schedule(self) -> None:
        """(Re)start the quiet-time timer."""
        self._timer.start()

    def _errors_changed(self) -> None:
        errors = self._bench.requirement.errors()
        if errors:
            self._timer.stop()
            self.generation += 1  # whatever is running answers an older form
            self._bench.result.set_stale("Not rechecked: " + "; ".join(errors.values()))

    def run_now(self) -> None:
        """Check the current requirement now (no-op, with the reason shown, if the form has errors)."""
        self._timer.stop()
        self.generation += 1
        try:
            # Operating limits come after, selected part first (`gui.limits_view.LimitsComputer`).
            job = self._bench.check_job(self.generation, top=SHORTLIST_LIMIT, analyse=0)
        except (InputError, LibraryError) as exc:
            self._bench.result.set_stale(f"Not rechecked: {exc}")
            return
        self.runs += 1
        self.last_started = time.perf_counter()
        if len(job.parts) >= self.thread_threshold:
            self.pending += 1
            self._bench.result.message = "Checking…"
            self._pool.start(_Job(job, self._relay))
            return
        try:
            result, elapsed = job.run()
        except (InputError, LibraryError) as exc:
            self._bench.result.set_stale(f"Not rechecked: {exc}")
            return
        self._deliver(job.generation, result, elapsed, len(job.parts))

    def _apply(self, generation: int, result, elapsed: float) -> None:
        self.pending -= 1
        self._deliver(generation, result, elapsed, None)

    def _deliver(self, generation: int, result: dict, elapsed: float, part_count) -> None:
        if generation != self.generation:
            return  # stale: the form or the library changed since this job started
        count = part_count if part_count is not None else len(self._bench.library.parts)
        self._bench.result.set_result(result, elapsed, count)
        self.checked.emit()

    def _fail(self, generation: int, message: str) -> None:
        self.pending -= 1
        if generation == self.generation:
            self._bench.result.set_stale(f"Check failed: {message}")

    def wait(self, timeout_ms: int = 10000) -> bool:
        """Wait for worker jobs (closing the window, tests); True when none is left."""
        return self._pool.waitForDone(timeout_ms)

    def shutdown(self) -> None:
        self._timer.stop()
        self.generation += 1
        self.wait()
