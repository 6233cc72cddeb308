"""Operating limits and "What sets the worst case" in the window (SPEC §3a, §6).

`LimitsComputer` (Qt-free apart from two timers) fills them into the latest
result: the shortlist's check runs without them (they cost about twenty
evaluations per candidate); once the shortlist and curves are drawn, the
selected part's limits are computed, and the rest of the first `SHOWN`
candidates right after,
each by `partpick.checks.service.analyse_parts` — the numbers of
``partpick check``'s JSON. `LimitsPanel` shows the selected part's limits and
draws its sensitivity with `partpick.plots.draw_sensitivity` (the report's
chart).
"""

from __future__ import annotations

from PySide6.QtCore import QObject, QTimer
from PySide6.QtGui import QPalette
from PySide6.QtWidgets import QCheckBox, QFormLayout, QLabel, QVBoxLayout, QWidget

from partpick.gui.observer import Signal
from partpick.gui.widgets import format_value

__all__ = ["LimitsComputer", "LimitsPanel", "SHOWN", "LIMIT_WORDS"]

SHOWN = 20
"""Candidates that get operating limits in the window (the first of the shortlist): ``partpick check``'s
`partpick.checks.service.ANALYSED_CANDIDATES` (not imported here: the window shows before scipy loads)."""
REST_DELAY_MS = 30
"""The shortlist and curves are drawn before the rest of the shown candidates' limits are computed."""

LIMIT_WORDS = (("max_ambient_C", "Max ambient", "°C"), ("max_load_A", "Max load", "A"),
               ("max_rth_ja_K_per_W", "Max RthJA", "K/W"), ("max_rth_sa_K_per_W", "Smallest heatsink (RthSA ≤)", "K/W"),
               ("min_copper_area_mm2", "Min copper area", "mm²"))


class LimitsComputer(QObject):
    """Adds operating limits and sensitivity to the result model's candidates: selected part first.

    Signals
    -------
    updated()
        Some candidates gained their limits (the panel and the shortlist re-read).
    """

    def __init__(self, bench, parent=None) -> None:
        super().__init__(parent)
        self._bench = bench
        self._result_id = None
        self._job = None  # (requirement, parts, policies) of the result being filled
        self.updated = Signal()
        self.failed = ""
        # Both steps wait for the event loop, so the shortlist and the curves are drawn first.
        self._first = QTimer(self)
        self._first.setSingleShot(True)
        self._first.setInterval(0)
        self._first.timeout.connect(self._fill_selected)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(REST_DELAY_MS)
        self._timer.timeout.connect(self._fill_rest)
        bench.result.changed.connect(self._result_changed)
        bench.result.selection_changed.connect(self._selection_changed)

    # The inputs of the result now shown: the requirement the form builds and the library's parts.
    def _inputs(self):
        bench = self._bench
        try:
            requirement = bench.requirement.build_requirement()
        except Exception:  # the form has an error: the result is stale and keeps what it has
            return None
        return requirement, bench.library.part_arrays() or list(bench.library.parts), bench.library.policies()

    def _result_changed(self) -> None:
        result = self._bench.result.result
        self._result_id = id(result) if result is not None else None
        self._job = self._inputs() if result is not None else None
        self._first.start()
        self._timer.start()

    def _selection_changed(self) -> None:
        self._first.start()

    def _fill_selected(self) -> None:
        self._fill(self._bench.result.selected[:1])

    @property
    def pending(self) -> bool:
        """The selected part's or the rest of the shown candidates' limits are still to come."""
        return self._first.isActive() or self._timer.isActive()

    def _fill_rest(self) -> None:
        # The shown candidates in one call, as ``partpick check`` computes them (the selected one
        # again: the numbers then come from the very same arrays as the CLI's).
        from partpick.checks.service import not_analysed_block

        candidates = self._bench.result.candidates
        self._fill([c["part_number"] for c in candidates[:SHOWN]], again=True)
        if self._job is None or id(self._bench.result.result) != self._result_id:
            return
        skipped = max(len(candidates) - SHOWN, 0)
        for candidate in candidates[SHOWN:]:
            candidate["operating_limits"] = not_analysed_block(min(SHOWN, len(candidates)), skipped)

    def _fill(self, numbers, again: bool = False) -> None:
        if self._job is None or self._bench.result.result is None or id(self._bench.result.result) != self._result_id:
            return
        # A block without a summary is run_check's "not computed" (the window's check asks for none).
        todo = [n for n in numbers if self._bench.result.candidate(n) is not None
                and (again or (self._bench.result.candidate(n).get("operating_limits") or {}).get("summary") is None)]
        if not todo:
            return
        from partpick.checks.service import analyse_parts

        requirement, parts, policies = self._job
        try:
            blocks = analyse_parts(requirement, parts, todo, policies=policies)
        except Exception as exc:  # shown in the panel, never a traceback
            self.failed = f"operating limits not computed: {type(exc).__name__}: {exc}"
            self.updated.emit()
            return
        self.failed = ""
        for number, block in blocks.items():
            candidate = self._bench.result.candidate(number)
            if candidate is None:
                continue
            candidate["metrics"].update(block["metrics"])
            candidate["operating_limits"] = block["operating_limits"]
            candidate["sensitivity"] = block["sensitivity"]
        self.updated.emit()

    def shutdown(self) -> None:
        self._first.stop()
        self._timer.stop()


class LimitsPanel(QWidget):
    """The selected part's operating limits, their notes, and the sensitivity bar chart."""

    def __init__(self, result_model, computer: LimitsComputer, shortlist=None, parent=None) -> None:
        super().__init__(parent)
        self.setObjectName("limits_panel")
        self.model = result_model
        self.computer = computer
        self.shortlist = shortlist
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        self.title = QLabel(self)
        self.title.setObjectName("limits_title")
        self.summary = QLabel(self)
        self.summary.setWordWrap(True)
        self.summary.setObjectName("limits_summary")
        layout.addWidget(self.title)
        layout.addWidget(self.summary)
        form = QFormLayout()
        self.values: dict[str, QLabel] = {}
        self._rows: dict[str, QLabel] = {}
        for key, label, _unit in LIMIT_WORDS:
            value = QLabel(self)
            value.setObjectName(f"limit_{key}")
            value.setWordWrap(True)
            form.addRow(label, value)
            self.values[key] = value
        self._form = form
        layout.addLayout(form)
        self.column_box = QCheckBox("Max ambient column in the shortlist", self)
        self.column_box.setObjectName("max_ambient_column")
        self.column_box.setToolTip("Show each candidate's max ambient (its operating limit) in the shortlist.")
        layout.addWidget(self.column_box)
        import pyqtgraph as pg

        self.plot = pg.PlotWidget(self)
        self.plot.setBackground(self.palette().color(QPalette.ColorRole.Base))
        self.plot.setObjectName("sensitivity_plot")
        self.plot.setMinimumHeight(170)
        layout.addWidget(self.plot, 1)
        self.column_box.toggled.connect(self._column_toggled)
        result_model.changed.connect(self._update)
        result_model.selection_changed.connect(self._update)
        computer.updated.connect(self._update)
        self._update()

    def _column_toggled(self, on: bool) -> None:
        if self.shortlist is not None:
            self.shortlist.table_model.set_extra_columns(("max_ambient_C",) if on else ())

    def _update(self) -> None:
        if self.shortlist is not None and self.column_box.isChecked():
            self.shortlist.table_model.refresh_extra()
        number = self.model.selected[0] if self.model.selected else None
        candidate = self.model.candidate(number) if number else None
        if candidate is None:
            self.title.setText("Operating limits: no part selected")
            self.summary.setText(self.computer.failed)
            for label in self.values.values():
                label.setText("")
            self.plot.getPlotItem().clear()  # partpick.plots loads at the first drawing, after start-up
            return
        from partpick.plots import draw_sensitivity

        self.title.setText(f"<b>Operating limits of {candidate['part_number']}</b>")
        block = candidate.get("operating_limits") or {}
        self.summary.setText(self.computer.failed or block.get("summary") or block.get("reason")
                             or "computing…")
        notes = block.get("notes") or {}
        metrics = candidate.get("metrics") or {}
        for key, _label, unit in LIMIT_WORDS:
            shown = key in metrics
            row_label = self._form.labelForField(self.values[key])
            self.values[key].setVisible(shown)
            if row_label is not None:
                row_label.setVisible(shown)
            text = format_value(metrics.get(key), unit) if metrics.get(key) is not None else "—"
            if notes.get(key):
                text += f"  ({notes[key]})"
            self.values[key].setText(text)
        draw_sensitivity(self.plot.getPlotItem(), candidate.get("sensitivity"))
