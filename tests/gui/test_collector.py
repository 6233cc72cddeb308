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



_CLOSED_WINDOW_COLLECTED = r"""
import gc, os, sys
os.environ["QT_QPA_PLATFORM"] = "offscreen"
from PySide6.QtCore import QCoreApplication, QEvent, QSettings
from PySide6.QtWidgets import QApplication
from partpick.gui.commands import Workbench
from partpick.gui.main_window import MainWindow
from partpick.library.store import open_library

folder, parts_csv = sys.argv[1], sys.argv[2]
app = QApplication([])
library = open_library(os.path.join(folder, "library.sqlite"), create=True)
library.import_csv(parts_csv)
for round_ in range(2):
    bench = Workbench(library)
    window = MainWindow(bench, settings=QSettings(os.path.join(folder, f"{round_}.ini"),
                                                  QSettings.Format.IniFormat))
    window.show()
    for key, text in (("role", "tvs_clamp"), ("surge.surge_source_ohm", "-"), ("surge.surge_source_ohm", "-2")):
        bench.requirement.edit_text(key, text)  # undo steps, the last one extended by typing on
        app.processEvents()
    bench.requirement.modified = False
    window.close()
    window.deleteLater()
    QCoreApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    del window, bench
    gc.collect()  # the workbench, its models and its undo stack are now one collectable cycle
print("collected")
"""


def test_a_closed_window_and_its_undo_steps_are_collected_without_a_crash(tmp_path):
    """A closed window's workbench, left in a reference cycle, is collected without a crash.

    Before the fix the collector freed the undo commands' wrappers and then the stack, whose
    destructor deleted them again: a segmentation fault, seen in CI, reproduced by this script
    every time. Run in a child process, so a crash fails this test instead of ending the suite.
    """
    import subprocess
    import sys
    from pathlib import Path

    parts_csv = Path(__file__).resolve().parents[2] / "resources" / "example_library" / "parts.csv"
    done = subprocess.run([sys.executable, "-c", _CLOSED_WINDOW_COLLECTED, str(tmp_path), str(parts_csv)],
                          capture_output=True, text=True, timeout=300, cwd=tmp_path)
    assert done.returncode == 0, f"exit {done.returncode}: {done.stderr[-2000:]}"
    assert done.stdout.strip().endswith("collected")
