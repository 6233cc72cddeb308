"""The main window: requirement form, shortlist, curves and library, arranged for the job.

Left: the Requirement (what the circuit demands) — edited first and most.
Centre: the Shortlist over the Curves, in a splitter — the answer and why.
Right: the Library of parts — the source, edited now and then.
The side panels are docks (movable, floatable, closable from View); the
layout, the splitter and the recent libraries are kept in QSettings.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QByteArray, QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QDockWidget,
    QFileDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressDialog,
    QSplitter,
    QApplication,
)

from partpick.gui.commands import COMMANDS, MENUS, Workbench, import_csv_file, run_command
from partpick.gui.curves_view import CurvesView
from partpick.gui.library_view import LibraryView
from partpick.gui.limits_view import LimitsComputer, LimitsPanel
from partpick.gui.recompute import Rechecker
from partpick.gui.requirement_view import RequirementView
from partpick.gui.shortlist_view import ShortlistView

__all__ = ["MainWindow", "WindowPrompt", "default_settings"]

SETTINGS_ORGANISATION = "partpick"
SETTINGS_APPLICATION = "partpick"


def default_settings() -> QSettings:
    return QSettings(SETTINGS_ORGANISATION, SETTINGS_APPLICATION)


class WindowPrompt:
    """The `Prompt` of the commands, answered with the window's dialogs."""

    def __init__(self, window: "MainWindow") -> None:
        self.window = window

    def open_path(self, title, filter):
        path, _ = QFileDialog.getOpenFileName(self.window, title, self._folder(), filter)
        return path or None

    def save_path(self, title, filter, suggested=""):
        start = str(Path(self._folder()) / suggested) if suggested else self._folder()
        path, _ = QFileDialog.getSaveFileName(self.window, title, start, filter)
        return path or None

    def _folder(self) -> str:
        return str(self.window.settings.value("folders/last", str(Path.home())))

    def edit_part(self, part, title):
        from partpick.gui.part_editor import PartEditor

        dialog = PartEditor(part, title=title, existing=self.window.bench.library.part_numbers(),
                            parent=self.window)
        try:
            return dialog.part() if dialog.exec() else None
        finally:
            dialog.deleteLater()

    def confirm(self, title, text):
        return QMessageBox.question(self.window, title, text) == QMessageBox.StandardButton.Yes

    def choose(self, title, text, choices):
        box = QMessageBox(QMessageBox.Icon.Question, title, text, QMessageBox.StandardButton.NoButton, self.window)
        buttons = {}
        for index, choice in enumerate(choices):
            role = (QMessageBox.ButtonRole.RejectRole if choice in ("Cancel", "Quit")
                    else QMessageBox.ButtonRole.AcceptRole if index == 0 else QMessageBox.ButtonRole.ActionRole)
            buttons[box.addButton(choice, role)] = choice
        box.exec()
        answer = buttons.get(box.clickedButton())
        box.deleteLater()
        return answer

    def show_cautions(self, first_run=False):
        from partpick.gui.dialogs import CautionsDialog

        self.window.open_dialog(CautionsDialog(first_run, self.window))

    def show_check_sheet(self, result, part_number):
        from partpick.gui.dialogs import CheckSheetDialog

        self.window.open_dialog(CheckSheetDialog(result, part_number, self.window.bench.library.get_part(part_number),
                                                 self.window))

    def show_error(self, title, text):
        QMessageBox.warning(self.window, title, text)

    def show_info(self, title, text):
        QMessageBox.information(self.window, title, text)

    def show_problems(self, title, summary, problems):
        from partpick.gui.dialogs import ProblemsDialog

        dialog = ProblemsDialog(title, summary, problems, self.window)
        dialog.exec()
        dialog.deleteLater()

    def run_with_progress(self, title, work):
        dialog = QProgressDialog(title, "Cancel", 0, 1000, self.window)
        dialog.setWindowTitle("partpick")
        dialog.setWindowModality(Qt.WindowModality.WindowModal)
        dialog.setMinimumDuration(0)
        dialog.setValue(0)
        self.window.progress_dialog = dialog
        dialog.show()  # at once: the work below may take seconds before its first progress report
        QApplication.processEvents()

        def progress(done, total):
            dialog.setValue(int(1000 * done / total) if total else 0)
            QApplication.processEvents()

        try:
            return work(progress, dialog.wasCanceled)
        finally:
            dialog.reset()
            dialog.deleteLater()
            self.window.progress_dialog = None

    def show_compare(self, part_numbers):
        from partpick.gui.compare_view import CompareDialog

        self.window.open_dialog(CompareDialog(self.window.bench, part_numbers, self.window))

    def show_substitutes(self, part_number):
        from partpick.gui.compare_view import SubstitutesDialog

        self.window.open_dialog(SubstitutesDialog(self.window.bench, part_number, self.window))

    def show_help(self):
        from partpick.gui.dialogs import HelpDialog

        self.window.open_dialog(HelpDialog(self.window))

    def show_about(self):
        from partpick.gui.dialogs import about_text

        QMessageBox.about(self.window, "About partpick", about_text())

    def export_curves(self, path):
        self.window.curves.export_image(path)

    def quit(self):
        self.window.close()


class MainWindow(QMainWindow):
    """partpick's one window over a `Workbench`."""

    def __init__(self, bench: Workbench, *, settings: QSettings | None = None, parent=None) -> None:
        super().__init__(parent)
        self.bench = bench
        self.settings = settings if settings is not None else default_settings()
        if bench.prompt is None:
            bench.prompt = WindowPrompt(self)
        self.progress_dialog = None
        self.dialogs: list = []
        self.setObjectName("main_window")
        self.setWindowTitle("partpick")
        self.setAcceptDrops(True)
        self.setDockOptions(QMainWindow.DockOption.AllowTabbedDocks | QMainWindow.DockOption.AnimatedDocks)

        self.shortlist = ShortlistView(bench.result, self)
        self.curves = CurvesView(bench.result, bench.library, self)
        self.splitter = QSplitter(Qt.Orientation.Vertical, self)
        self.splitter.setObjectName("shortlist_curves_splitter")
        self.splitter.addWidget(self.shortlist)
        self.splitter.addWidget(self.curves)
        self.splitter.setStretchFactor(0, 2)
        self.splitter.setStretchFactor(1, 3)
        self.setCentralWidget(self.splitter)

        self.requirement_view = RequirementView(bench.requirement, self)
        self.library_view = LibraryView(bench.library, self)
        self.requirement_dock = self._dock("Requirement", "requirement_dock", self.requirement_view,
                                           Qt.DockWidgetArea.LeftDockWidgetArea)
        self.library_dock = self._dock("Library", "library_dock", self.library_view,
                                       Qt.DockWidgetArea.RightDockWidgetArea)

        self.status_label = QLabel(self)
        self.location_label = QLabel(self)
        # SPEC §7 on the main window: one line in the status area, the full text on click.
        from partpick.checks.cautions import SHORT_CAUTION

        from PySide6.QtWidgets import QToolButton

        self.caution_label = QToolButton(self)  # flat, in the status bar's own colours (light and dark)
        self.caution_label.setText(f"⚠ {SHORT_CAUTION}")
        self.caution_label.setAutoRaise(True)
        self.caution_label.setObjectName("caution_label")
        self.caution_label.setToolTip("Click for the cautions in full (Help ▸ Cautions)")
        self.caution_label.clicked.connect(lambda: self.run_command("help.cautions"))
        self.statusBar().addWidget(self.status_label, 1)
        self.statusBar().addPermanentWidget(self.caution_label)
        self.statusBar().addPermanentWidget(self.location_label)

        self.actions: dict[str, QAction] = {}
        self._build_menus()
        self.library_view.bind_actions(self.actions)
        self.shortlist.bind_actions(self.actions)
        self.curves.export_button.setDefaultAction(self.actions["curves.export"])

        self.rechecker = Rechecker(bench, parent=self)
        self.limits = LimitsComputer(bench, parent=self)
        self.limits_panel = LimitsPanel(bench.result, self.limits, self.shortlist, self)
        self.limits_dock = self._dock("Operating limits", "limits_dock", self.limits_panel,
                                      Qt.DockWidgetArea.RightDockWidgetArea)
        self.splitDockWidget(self.library_dock, self.limits_dock, Qt.Orientation.Vertical)
        bench.result.state_changed.connect(self._update_status)
        bench.result.changed.connect(self._update_status)
        bench.library.library_changed.connect(self._update_location)
        bench.library.parts_changed.connect(self._update_part_selection)
        bench.selection_changed.connect(self._update_part_selection)
        bench.recent_changed.connect(self._update_recent)
        bench.undo_stack.canUndoChanged.connect(self._undo_stack_changed)
        bench.undo_stack.canRedoChanged.connect(self._undo_stack_changed)
        bench.undo_stack.indexChanged.connect(self._undo_stack_changed)
        self.library_view.selection_changed.connect(self._parts_selected)
        self.library_view.activated.connect(lambda _pn: self.run_command("part.edit"))
        self.curves.readout.connect(lambda text: self.statusBar().showMessage(text, 4000))

        self._restore_settings()
        self._update_location()
        self._update_recent()
        self._update_actions()
        self._update_status()
        if bench.library.library is not None:
            self.rechecker.run_now()

    # -- construction -------------------------------------------------------
    def _dock(self, title: str, name: str, widget, area) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(name)
        dock.setWidget(widget)
        dock.setFeatures(QDockWidget.DockWidgetFeature.DockWidgetMovable
                         | QDockWidget.DockWidgetFeature.DockWidgetFloatable
                         | QDockWidget.DockWidgetFeature.DockWidgetClosable)
        self.addDockWidget(area, dock)
        return dock

    def _build_menus(self) -> None:
        bar = self.menuBar()
        menus = {name: bar.addMenu(f"&{name}") for name in MENUS}
        view = bar.addMenu("&View")
        bar.insertMenu(menus["Help"].menuAction(), view)
        for command in COMMANDS.values():
            action = QAction(command.title, self)
            action.setObjectName(command.id)
            if command.shortcuts:
                action.setShortcuts([QKeySequence(s) for s in command.shortcuts])
            tip = command.tip or command.title.replace("&", "").rstrip("…")
            shortcut = f" ({command.shortcuts[0]})" if command.shortcuts else ""
            action.setToolTip(tip + shortcut)
            action.setStatusTip(tip)
            action.triggered.connect(lambda _checked=False, c=command.id: self.run_command(c))
            menus[command.menu].addAction(action)
            self.actions[command.id] = action
            if command.id == "library.open":
                self.recent_menu = menus["Library"].addMenu("Recent libraries")
            if command.id == "requirement.open":
                self.recent_requirements_menu = menus["File"].addMenu("Recent requirements")
            if command.id in ("requirement.save_as", "report.export", "edit.redo"):
                menus[command.menu].addSeparator()
        menus["File"].insertSeparator(self.actions["app.quit"])
        for dock in (self.requirement_dock, self.library_dock):
            view.addAction(dock.toggleViewAction())

    def run_command(self, command_id: str):
        """Run a registered command on this window's workbench (menus, shortcuts, buttons, tests);
        any error it meets becomes a dialog (`commands.run_command`)."""
        return run_command(self.bench, command_id)

    def open_dialog(self, dialog) -> None:
        """Show a non-modal dialog, kept until closed (and closed with the window)."""
        self.dialogs = [d for d in self.dialogs if d.isVisible()]
        dialog.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
        dialog.destroyed.connect(lambda *_: self.dialogs.remove(dialog) if dialog in self.dialogs else None)
        self.dialogs.append(dialog)
        dialog.show()

    # -- model → widgets ----------------------------------------------------
    def _update_status(self) -> None:
        self.status_label.setText(self.bench.result.status_text())

    def _update_location(self) -> None:
        location = self.bench.library.location
        marker = " (read-only)" if self.bench.read_only else ""
        self.location_label.setText(f"Library: {location}{marker}" if location else "No library")
        self.setWindowTitle(f"partpick — {Path(location).name}{marker}" if location else "partpick")
        self._update_actions()

    def _update_recent(self) -> None:
        self.recent_menu.clear()
        for location in self.bench.recent_libraries:
            action = self.recent_menu.addAction(location)
            action.triggered.connect(lambda _c=False, loc=location: self._open_recent(loc))
        self.recent_menu.setEnabled(bool(self.bench.recent_libraries))
        self.recent_requirements_menu.clear()
        for path in self.bench.recent_requirements:
            action = self.recent_requirements_menu.addAction(path)
            action.triggered.connect(lambda _c=False, p=path: self._open_recent_requirement(p))
        self.recent_requirements_menu.setEnabled(bool(self.bench.recent_requirements))

    def _open_recent_requirement(self, path: str) -> None:
        from partpick.gui.commands import load_requirement_file

        try:
            load_requirement_file(self.bench, path)
        except Exception as exc:  # noqa: BLE001 — a dialog, never a traceback (SPEC §6)
            self.bench.prompt.show_error("Open requirement", str(exc))

    def _open_recent(self, location: str) -> None:
        try:
            self.bench.open_library_at(location)
        except Exception as exc:  # noqa: BLE001 — a dialog, never a traceback (SPEC §6)
            self.bench.prompt.show_error("Open library", str(exc))

    def _update_actions(self) -> None:
        has_part = bool(self.bench.selected_parts)
        writable = not self.bench.read_only
        for command in COMMANDS.values():
            if command.needs_part or command.edits_library:
                self.actions[command.id].setEnabled((has_part or not command.needs_part)
                                                    and (writable or not command.edits_library))
        stack = self.bench.undo_stack
        self.actions["edit.undo"].setEnabled(stack.canUndo())
        self.actions["edit.redo"].setEnabled(stack.canRedo())
        self.actions["edit.undo"].setText(f"&Undo {stack.undoText()}".rstrip())
        self.actions["edit.redo"].setText(f"&Redo {stack.redoText()}".rstrip())

    def _parts_selected(self, part_numbers: list) -> None:
        self.bench.select_parts(part_numbers)

    def _update_part_selection(self) -> None:
        """The workbench's part selection → the library table (and the part commands' state)."""
        if self.library_view.selected_part_numbers() != self.bench.selected_parts:
            self.library_view.show_selection(self.bench.selected_parts)
        self._update_actions()

    def _undo_stack_changed(self, *_args) -> None:
        self._update_actions()

    # -- settings -----------------------------------------------------------
    def _restore_settings(self) -> None:
        s = self.settings
        geometry = s.value("window/geometry")
        if isinstance(geometry, QByteArray) and not geometry.isEmpty():
            self.restoreGeometry(geometry)
        else:
            self._first_size()
        state = s.value("window/state")
        if isinstance(state, QByteArray) and not state.isEmpty():
            self.restoreState(state)
        splitter = s.value("window/splitter")
        if isinstance(splitter, QByteArray) and not splitter.isEmpty():
            self.splitter.restoreState(splitter)
        else:
            self.splitter.setSizes([320, 480])
        for kind in ("libraries", "requirements"):
            recent = s.value(f"{kind}/recent", [])
            if isinstance(recent, str):
                recent = [recent]
            name = f"recent_{kind}"
            current = getattr(self.bench, name)
            setattr(self.bench, name,
                    list(dict.fromkeys(current + [r for r in (recent or []) if r]))[: self.bench.MAX_RECENT])

    def _first_size(self) -> None:
        """The first-run size: 1400 × 860 where the screen allows, never larger than the screen's
        available area (a 1366 × 768 laptop keeps its task bar and title bar)."""
        width, height = 1400, 860
        screen = self.screen() or QApplication.primaryScreen()
        if screen is not None:
            area = screen.availableGeometry()
            width, height = min(width, area.width() - 16), min(height, area.height() - 48)
        self.resize(width, height)
        # The centre (shortlist and curves) gets the most; the library panel is looked at now and then.
        side = max(240, min(350, width * 2 // 9)), max(240, min(430, width // 5))
        self.resizeDocks([self.requirement_dock, self.library_dock], list(side), Qt.Orientation.Horizontal)

    def show_first_run(self) -> None:
        """On the first run, the cautions (SPEC §7), once per user."""
        if not self.settings.value("cautions/shown", False, type=bool):
            self.settings.setValue("cautions/shown", True)
            self.bench.prompt.show_cautions(first_run=True)

    def save_settings(self) -> None:
        s = self.settings
        s.setValue("window/geometry", self.saveGeometry())
        s.setValue("window/state", self.saveState())
        s.setValue("window/splitter", self.splitter.saveState())
        s.setValue("libraries/recent", list(self.bench.recent_libraries))
        s.setValue("requirements/recent", list(self.bench.recent_requirements))
        s.sync()

    def _detach(self) -> None:
        """Disconnect every view from the Qt-free models (they may outlive the window); once."""
        from partpick.gui.observer import disconnect_owner

        if getattr(self, "_detached", False):
            return
        self._detached = True

        for model in (self.bench.requirement, self.bench.library, self.bench.result, self.bench):
            disconnect_owner(model, self)
        for signal in (self.bench.undo_stack.canUndoChanged, self.bench.undo_stack.canRedoChanged,
                       self.bench.undo_stack.indexChanged):
            try:
                signal.disconnect(self._undo_stack_changed)
            except (RuntimeError, TypeError):
                pass

    # -- events -------------------------------------------------------------
    def closeEvent(self, event) -> None:  # noqa: N802
        from partpick.gui.commands import unsaved_requirement_answer

        if not getattr(self, "_closing", False):
            if not unsaved_requirement_answer(self.bench):
                event.ignore()
                return
            self._closing = True
        self.save_settings()
        self.rechecker.shutdown()
        self.limits.shutdown()
        self._detach()
        for dialog in list(self.dialogs):
            dialog.close()
        self.curves.shutdown()
        super().closeEvent(event)

    def dragEnterEvent(self, event) -> None:  # noqa: N802
        if self._dropped_csv(event.mimeData()):
            event.acceptProposedAction()
        else:
            event.ignore()

    def dropEvent(self, event) -> None:  # noqa: N802
        paths = self._dropped_csv(event.mimeData())
        if not paths:
            event.ignore()
            return
        event.acceptProposedAction()
        # Import after the drop returns, so the drag source is not kept waiting on a dialog.
        QTimer.singleShot(0, lambda: [import_csv_file(self.bench, p) for p in paths])

    @staticmethod
    def _dropped_csv(mime) -> list[str]:
        if not mime.hasUrls():
            return []
        return [u.toLocalFile() for u in mime.urls() if u.isLocalFile() and u.toLocalFile().lower().endswith(".csv")]
