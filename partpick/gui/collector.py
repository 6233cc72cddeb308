"""Python's cyclic garbage collector, run on the UI thread only.

Any allocation may start a collection, on whatever thread makes it. When the
rechecker's worker thread collects a reference cycle that holds a Qt widget
(a closed dialog, a context menu and its actions), the widget's destructor runs
on the worker: it waits for the UI thread's Qt locks while the UI thread waits
for the interpreter lock the worker holds, and the window freezes for good.
So while the window runs, automatic collection is off and a UI-thread timer
collects instead, generation by generation, with the interpreter's own
thresholds — the same amount of collecting, on the one thread allowed to
destroy widgets.
"""

from __future__ import annotations

import gc

from PySide6.QtCore import QCoreApplication, QObject, QTimer

__all__ = ["MainThreadCollector", "install_collector"]

COLLECT_INTERVAL_MS = 200
"""How often the UI thread looks at the collector's counts [ms]."""


class MainThreadCollector(QObject):
    """Turns automatic collection off and collects on a UI-thread timer."""

    def __init__(self, parent: QObject, *, interval_ms: int = COLLECT_INTERVAL_MS) -> None:
        super().__init__(parent)
        self.threshold = gc.get_threshold()
        gc.disable()
        self._timer = QTimer(self)
        self._timer.timeout.connect(self.collect)
        self._timer.start(interval_ms)

    def collect(self) -> int:
        """Collect the generations whose counts passed their thresholds; the objects found."""
        count0, count1, count2 = gc.get_count()
        threshold0, threshold1, threshold2 = self.threshold
        if count0 <= threshold0:
            return 0
        generation = 0
        if count1 + 1 > threshold1:
            generation = 1
            if count2 + 1 > threshold2:
                generation = 2
        return gc.collect(generation)


def install_collector() -> MainThreadCollector | None:
    """The application's collector, made on first use; None without a Qt application."""
    app = QCoreApplication.instance()
    if app is None:
        return None
    existing = app.findChild(MainThreadCollector)
    return existing if existing is not None else MainThreadCollector(app)
