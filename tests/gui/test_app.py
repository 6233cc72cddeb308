"""`partpick` with no subcommand opens the window (partpick.cli.app.run)."""

from __future__ import annotations

import argparse

from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QApplication

from partpick.cli import app as app_module


def test_no_display_gives_a_clear_message_and_exit_1(monkeypatch, capsys):
    for name in ("QT_QPA_PLATFORM", "DISPLAY", "WAYLAND_DISPLAY"):
        monkeypatch.delenv(name, raising=False)
    monkeypatch.setattr(app_module.sys, "platform", "linux")
    assert app_module.run(argparse.Namespace(library=None)) == 1
    err = capsys.readouterr().err
    assert "cannot start the desktop app" in err and "QT_QPA_PLATFORM=offscreen" in err


def _close_when(predicate, seen):
    """Close the app's windows once ``predicate(window)`` holds (polled from the event loop)."""
    timer = QTimer()

    def poll():
        for widget in QApplication.topLevelWidgets():
            if widget.objectName() == "main_window" and widget.isVisible() and predicate(widget):
                seen.append(widget.bench.result.status_text())
                widget.close()
                timer.stop()

    timer.timeout.connect(poll)
    timer.start(50)
    return timer


def test_run_opens_the_window_on_the_library(qapp, library_path, settings, monkeypatch):
    monkeypatch.setattr("partpick.gui.main_window.default_settings", lambda: settings)
    seen = []
    timer = _close_when(lambda w: w.bench.result.result is not None, seen)
    code = app_module.run(argparse.Namespace(library=str(library_path)))
    timer.stop()
    assert code == 0
    assert seen and " parts pass · " in seen[0]


def test_run_on_a_file_that_is_not_a_library_asks_and_quitting_exits_1(qapp, tmp_path, settings, monkeypatch,
                                                                       capsys):
    from partpick.gui.commands import OPEN_ANOTHER, OPEN_EXAMPLE, QUIT

    monkeypatch.setattr("partpick.gui.main_window.default_settings", lambda: settings)
    asked = []

    def choose(self, title, text, choices):
        asked.append((text, list(choices)))
        return QUIT

    monkeypatch.setattr("partpick.gui.main_window.WindowPrompt.choose", choose)
    bogus = tmp_path / "notes.sqlite"
    bogus.write_text("this is not a database", encoding="utf-8")
    code = app_module.run(argparse.Namespace(library=str(bogus)))
    assert code == 1
    assert str(bogus.name) in capsys.readouterr().err
    # The reason is shown in a dialog that offers another library or the example (SPEC §6).
    assert len(asked) == 1
    text, choices = asked[0]
    assert bogus.name in text and choices == [OPEN_ANOTHER, OPEN_EXAMPLE, QUIT]
    assert bogus.read_text(encoding="utf-8") == "this is not a database"  # left as it was


def test_a_bad_library_at_start_can_be_replaced_by_the_example(qapp, tmp_path, settings, monkeypatch,
                                                               example_library_file):
    import shutil

    from partpick.gui.commands import OPEN_EXAMPLE

    monkeypatch.setattr("partpick.gui.main_window.default_settings", lambda: settings)
    monkeypatch.setattr("partpick.gui.main_window.WindowPrompt.choose", lambda self, t, x, c: OPEN_EXAMPLE)
    example_copy = tmp_path / "example-copy.sqlite"
    shutil.copyfile(example_library_file, example_copy)
    monkeypatch.setattr("partpick.gui.commands.example_library_copy", lambda: example_copy)
    bogus = tmp_path / "notes.sqlite"
    bogus.write_text("this is not a database", encoding="utf-8")
    seen = []
    timer = _close_when(lambda w: w.bench.result.result is not None, seen)
    code = app_module.run(argparse.Namespace(library=str(bogus)))
    timer.stop()
    assert code == 0
    assert seen and " parts pass · " in seen[0]
