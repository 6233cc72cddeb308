"""`partpick` with no subcommand: the desktop app on ``--library`` or the user's own library."""

from __future__ import annotations

import os
import sys
import time

__all__ = ["run", "qt_unavailable_reason", "dispose_window"]


def qt_unavailable_reason() -> str:
    """Why Qt cannot show a window here, or "" when it can (checked before Qt could abort the process)."""
    try:
        import PySide6.QtWidgets  # noqa: F401
    except ImportError as exc:
        return f"the Qt libraries cannot be loaded ({exc})"
    platform = os.environ.get("QT_QPA_PLATFORM", "")
    if sys.platform.startswith("linux") and not platform:
        if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
            return ("no display to open the window on (DISPLAY and WAYLAND_DISPLAY are unset); run it on a desktop, "
                    "under xvfb-run, or with QT_QPA_PLATFORM=offscreen")
    return ""


def run(args) -> int:
    """Open the main window; return the exit code (1 when Qt cannot start or the library cannot be opened)."""
    reason = qt_unavailable_reason()
    if reason:
        print(f"partpick: cannot start the desktop app: {reason}", file=sys.stderr)
        print("partpick: the command line works without it: partpick check REQ.toml", file=sys.stderr)
        return 1
    from PySide6.QtCore import QTimer
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("partpick")
    app.setOrganizationName("partpick")
    from partpick.gui.commands import Workbench
    from partpick.gui.main_window import MainWindow

    # The window is shown first and the library opened right after, so that the database layer
    # and the physics core (SQLAlchemy, scipy: over a second of imports) load behind a visible window.
    bench = Workbench()
    window = MainWindow(bench)
    window.status_label.setText("Opening the library…")
    window.show()
    exit_code = [0]

    def open_library() -> None:
        from partpick.errors import InputError, LibraryError

        from partpick.gui.commands import recover_from_failed_start

        location = getattr(args, "library", None)
        try:
            bench.open_library_at(location)
        except (LibraryError, InputError, OSError) as exc:
            print(f"partpick: {exc}", file=sys.stderr)
            # SPEC §6: the reason in a dialog that offers another library or the example.
            if not recover_from_failed_start(bench, exc, location):
                exit_code[0] = 1
                window.close()
                return
        window.rechecker.run_now()
        if not timing:
            window.show_first_run()

    timing = bool(os.environ.get("PARTPICK_STARTUP_TIMING"))
    if timing:
        # For tests/bench/bench_gui.py: say when the window was shown (wall clock), then quit.
        app.processEvents()
        print(f"partpick: window shown at {time.time():.6f}", file=sys.stderr)
    QTimer.singleShot(0, open_library)
    if timing:
        QTimer.singleShot(0, lambda: print(f"partpick: library open and checked at {time.time():.6f}",
                                           file=sys.stderr) or window.close())
    try:
        code = int(app.exec())
    finally:
        dispose_window(window)
        bench.close()
    return exit_code[0] or code


def dispose_window(window) -> None:
    """Destroy the window's Qt objects now, while the interpreter is whole.

    PySide6 6.12 with pyqtgraph can crash at interpreter exit ("bool_dealloc")
    when plot widgets are still alive during finalization; deleting them first
    avoids it.
    """
    from PySide6.QtCore import QCoreApplication, QEvent

    window.close()
    window.deleteLater()
    QCoreApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    QCoreApplication.processEvents()
