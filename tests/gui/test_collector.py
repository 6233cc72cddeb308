"""The cyclic collector runs on the UI thread only (a widget destroyed on a worker deadlocks)."""

import gc
import threading

from PySide6.QtCore import QRunnable, QThreadPool
from PySide6.QtWidgets import QMenu

from partpick.gui.collector import install_collector


class _Allocate(QRunnable):
    def __init__(self, done: threading.Event) -> None:
        super().__init__()
        self.done = done

    def run(self) -> None:
        # Enough container allocations to pass every generation's threshold many times over.
        junk = []
        for index in range(200_000):
            pair = [index]
            pair.append(pair)  # a cycle, so the collector has work
            junk.append(pair)
            if len(junk) > 1000:
                junk.clear()
        self.done.set()


def test_worker_threads_never_collect_and_the_ui_thread_does(qtbot):
    collector = install_collector()
    assert collector is not None and install_collector() is collector  # one per application
    assert not gc.isenabled()
    threads = []

    def record(phase, info):
        if phase == "start":
            threads.append(threading.current_thread() is threading.main_thread())

    menu = QMenu()
    menu.cycle = menu  # a reference cycle holding a widget, as a closed dialog leaves behind
    menu.addAction("one")
    del menu
    gc.callbacks.append(record)
    try:
        done = threading.Event()
        QThreadPool.globalInstance().start(_Allocate(done))
        qtbot.waitUntil(done.is_set, timeout=20000)
        qtbot.waitUntil(lambda: bool(threads), timeout=5000)  # the UI thread's timer collected
    finally:
        gc.callbacks.remove(record)
    assert threads and all(threads)
