"""Fixtures of the window tests: a temporary library built from the example CSV, test-only settings."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")  # before anything imports Qt (tests/conftest.py does too)

import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE_CSV = ROOT / "resources" / "example_library" / "parts.csv"
REQUIREMENTS = ROOT / "resources" / "requirements"


@pytest.fixture(scope="session")
def example_library_file(tmp_path_factory) -> Path:
    """The example parts imported once into a fresh library file (copied for each test)."""
    from partpick.library.store import open_library

    path = tmp_path_factory.mktemp("example") / "example.sqlite"
    library = open_library(path, create=True)
    try:
        library.import_csv(EXAMPLE_CSV)
    finally:
        library.close()
    return path


@pytest.fixture
def library_path(example_library_file, tmp_path) -> Path:
    path = tmp_path / "library.sqlite"
    shutil.copyfile(example_library_file, path)
    return path


@pytest.fixture
def library(library_path):
    from partpick.library.store import open_library

    lib = open_library(library_path)
    yield lib
    lib.close()


@pytest.fixture
def settings(tmp_path):
    """QSettings in a test-only ini file (never the user's own)."""
    from PySide6.QtCore import QSettings

    return QSettings(str(tmp_path / "partpick-test.ini"), QSettings.Format.IniFormat)


class ScriptedPrompt:
    """The commands' Prompt answered from a script: paths and edited parts queued by the test.

    Anything shown is recorded, so a test can assert what the user was told.
    """

    def __init__(self) -> None:
        self.paths: list = []
        self.parts: list = []
        self.confirmations: list = []
        self.errors: list = []
        self.infos: list = []
        self.problems: list = []
        self.compared: list = []
        self.substituted: list = []
        self.helped = 0
        self.cancel_after = None  # progress calls before "Cancel" is pressed
        self.progress_calls = 0
        self.progress_log: list = []  # (seconds since the work started, done, total)
        self.exported: list = []
        self.choices: list = []  # queued answers of `choose`
        self.asked: list = []  # (title, text, choices) of every `choose`
        self.quit_answer = None  # the answer to "unsaved changes, quit?" when none is queued
        self.cautions: list = []  # first_run flags of every cautions display
        self.check_sheets: list = []
        self.window = None

    def open_path(self, title, filter):
        return self.paths.pop(0) if self.paths else None

    def save_path(self, title, filter, suggested=""):
        return self.paths.pop(0) if self.paths else None

    def edit_part(self, part, title):
        if not self.parts:
            return None
        answer = self.parts.pop(0)
        return answer(part) if callable(answer) else answer

    def confirm(self, title, text):
        return self.confirmations.pop(0) if self.confirmations else False

    def choose(self, title, text, choices):
        self.asked.append((title, text, list(choices)))
        if self.choices:
            return self.choices.pop(0)
        return self.quit_answer if title == "Quit" else None

    def show_cautions(self, first_run=False):
        self.cautions.append(first_run)

    def show_check_sheet(self, result, part_number):
        self.check_sheets.append(part_number)
        if self.window is not None:
            from partpick.gui.main_window import WindowPrompt

            WindowPrompt(self.window).show_check_sheet(result, part_number)

    def show_error(self, title, text):
        self.errors.append((title, text))

    def show_info(self, title, text):
        self.infos.append((title, text))

    def show_problems(self, title, summary, problems):
        self.problems.append((title, summary, list(problems)))

    def run_with_progress(self, title, work):
        import time

        start = time.perf_counter()

        def progress(done, total):
            self.progress_calls += 1
            self.progress_log.append((time.perf_counter() - start, done, total))

        def cancel():
            return self.cancel_after is not None and self.progress_calls >= self.cancel_after

        return work(progress, cancel)

    def show_compare(self, part_numbers):
        self.compared.append(list(part_numbers))
        if self.window is not None:
            from partpick.gui.main_window import WindowPrompt

            WindowPrompt(self.window).show_compare(part_numbers)

    def show_substitutes(self, part_number):
        self.substituted.append(part_number)
        if self.window is not None:
            from partpick.gui.main_window import WindowPrompt

            WindowPrompt(self.window).show_substitutes(part_number)

    def show_help(self):
        self.helped += 1

    def show_about(self):
        pass

    def export_curves(self, path):
        self.exported.append(path)
        if self.window is not None:
            self.window.curves.export_image(path)

    def quit(self):
        if self.window is not None:
            self.window.close()


@pytest.fixture
def prompt():
    return ScriptedPrompt()


@pytest.fixture
def window(qtbot, library, settings, prompt):
    """The real main window on a temporary example library, with a scripted prompt; closed and checked after."""
    from PySide6.QtCore import QThreadPool

    from partpick.gui.commands import Workbench
    from partpick.gui.main_window import MainWindow

    bench = Workbench(library, prompt=prompt)
    win = MainWindow(bench, settings=settings)
    prompt.window = win
    qtbot.addWidget(win)
    win.show()
    qtbot.waitExposed(win)
    yield win
    prompt.quit_answer = "Discard"  # a test that edited the form is not asked to save at teardown
    win.close()
    assert QThreadPool.globalInstance().waitForDone(10000), "a check was still running after the window closed"
    assert QThreadPool.globalInstance().activeThreadCount() == 0
    from PySide6.QtCore import QCoreApplication, QEvent
    from PySide6.QtWidgets import QApplication

    QCoreApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    leaked = [w for w in QApplication.topLevelWidgets() if w.isVisible()]
    assert leaked == [], f"windows left open: {leaked}"
    # Collect the closed window's cycles now, in the test that made them: a destructor-order defect
    # then fails here, not as a crash at some later test's timer.
    import gc

    del win, bench
    gc.collect()
