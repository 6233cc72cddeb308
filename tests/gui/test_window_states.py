"""What a user must never meet (SPEC §6): empty results, failed opens, escaped errors, lost edits.

Each test drives the real window both ways: it sets the models or types into the widgets and reads
the other side back.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from PySide6.QtCore import Qt

REQUIREMENTS = Path(__file__).resolve().parents[2] / "resources" / "requirements"
SERIES_TOML = REQUIREMENTS / "reverse_polarity_24V.toml"
ZENER_TOML = REQUIREMENTS / "zener_5V1_reference.toml"


def type_into(qtbot, window, key: str, text: str) -> None:
    field = window.requirement_view.editor(key)
    field.edit.setFocus()
    field.edit.selectAll()
    qtbot.keyClicks(field.edit, text)


def settle(qtbot, window, timeout=5000):
    with qtbot.waitSignal(window.rechecker.checked, timeout=timeout):
        pass


def load(window, path) -> None:
    from partpick.gui.commands import load_requirement_file

    load_requirement_file(window.bench, path)
    window.rechecker.run_now()


def assert_empty_state(window, reason_words: str) -> None:
    shortlist, curves = window.shortlist, window.curves
    assert not shortlist.table.isVisible() and shortlist.empty_label.isVisible()
    assert reason_words in shortlist.empty_label.text()
    page = curves.current_page()
    assert page.empty_label.isVisible() and "No part selected" in page.empty_label.text()
    assert all(not w.isVisible() for column in page.widgets for w in column)
    status = window.status_label.text()
    assert status.startswith("No candidates:") and reason_words in status
    assert not re.search(r"\d+ of \d+ parts pass", status)  # no stale counts over an empty list


# -- empty results --------------------------------------------------------------------------------
@pytest.mark.parametrize("toml", [SERIES_TOML, ZENER_TOML], ids=["series", "zener_shunt"])
def test_every_role_through_a_package_filter_that_matches_nothing(qtbot, window, toml):
    load(window, toml)
    assert window.shortlist.table_model.rowCount() > 0
    window.bench.requirement.edit_text("packages", "XYZ-99")  # the model side
    settle(qtbot, window)
    assert_empty_state(window, "the package filter XYZ-99 matches no part")
    # ... and back from the widget side: "Any" on the list filter brings the shortlist back.
    window.requirement_view.editor("packages").choose([])
    settle(qtbot, window)
    assert window.shortlist.table.isVisible() and window.shortlist.table_model.rowCount() > 0
    assert re.fullmatch(r"\d+ of \d+ parts pass · \d+ ms", window.status_label.text())


def test_kinds_zener_with_the_series_role_says_why(qtbot, window):
    load(window, SERIES_TOML)
    chooser = window.requirement_view.editor("kinds")
    assert "zener" in chooser.choices()  # offered from the library, not typed
    chooser.choose(["zener"])
    assert window.bench.requirement.value("kinds") == ["zener"]  # widget → model
    settle(qtbot, window)
    assert_empty_state(window, "the Kinds filter (zener) keeps no kind the Series diode role considers")


def test_a_new_empty_library_says_it_has_no_parts(qtbot, window, tmp_path):
    window.bench.prompt.paths.append(str(tmp_path / "empty.sqlite"))
    window.run_command("library.new")
    assert window.bench.prompt.errors == []
    settle(qtbot, window)
    assert_empty_state(window, "the library has no parts yet")
    load(window, ZENER_TOML)
    assert_empty_state(window, "the library has no parts yet")


def test_no_zener_parts_in_the_library(qtbot, window):
    from partpick.gui.undo import DeleteParts

    zeners = [p["part_number"] for p in window.bench.library.parts if p["kind"] == "zener"]
    window.bench.undo_stack.push(DeleteParts(window.bench.library, zeners))
    load(window, ZENER_TOML)
    assert_empty_state(window, "no Zener parts in this library")


def test_clearing_the_shortlist_selection_shows_no_part_selected(qtbot, window):
    load(window, SERIES_TOML)
    window.shortlist.table.clearSelection()  # the user's Ctrl+click on the last selected row
    assert window.bench.result.selected == []
    page = window.curves.current_page()
    assert page.empty_label.isVisible() and "No part selected" in page.empty_label.text()
    assert window.curves.curve_sets == []
    for key in ("junction_temperature", "power"):  # every tab copes, not only the first
        window.curves.tabs.setCurrentWidget(window.curves.pages[key])
        assert window.curves.pages[key].empty_label.isVisible()
    window.bench.prompt.paths.append(str(Path(window.settings.fileName()).parent / "none.png"))
    window.run_command("curves.export")
    assert window.bench.prompt.errors and "no part selected" in window.bench.prompt.errors[-1][1]


def test_curves_drop_the_previous_requirements_part(qtbot, window):
    load(window, SERIES_TOML)
    rows = window.shortlist.table_model.rowCount()
    window.shortlist.select_rows([rows - 1])
    chosen = window.bench.result.selected
    load(window, REQUIREMENTS / "oring_12V.toml")
    top = window.bench.result.candidates[0]["part_number"]
    assert window.bench.result.selected == [top] != chosen
    assert [c["part_number"] for c in window.curves.curve_sets] == [top]


# -- opening libraries, command errors ------------------------------------------------------------
def test_a_failed_open_keeps_the_previous_library_open_and_bound(qtbot, window, tmp_path):
    bench = window.bench
    before = bench.library.library
    count = len(bench.library.parts)
    bogus = tmp_path / "notes.sqlite"
    bogus.write_text("not a database", encoding="utf-8")
    bench.prompt.paths.append(str(bogus))
    window.run_command("library.open")
    assert bench.prompt.errors and bench.prompt.errors[-1][0] == "Open library"
    assert bench.library.library is before and len(bench.library.parts) == count
    assert window.location_label.text().endswith("library.sqlite")
    # Imports still go to the library the window shows.
    csv = tmp_path / "one.csv"
    csv.write_text("part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm,tj_max_C,pd_W\n"
                   "TEST-ONE,rectifier,100,1,1e-9,1.8,0.05,150,1\n", encoding="utf-8")
    bench.prompt.paths.append(str(csv))
    window.run_command("library.import")
    assert before.get_part("TEST-ONE") is not None
    assert bogus.read_text(encoding="utf-8") == "not a database"


def test_a_library_whose_parts_cannot_be_read_is_not_bound(window, monkeypatch, library_path, tmp_path):
    """The store opens it, but reading its parts fails: the window must stay on the previous one."""
    from partpick.errors import LibraryError
    from partpick.library.store import open_library

    bench = window.bench
    before = bench.library.library
    other = open_library(tmp_path / "other.sqlite", create=True)

    def broken():
        raise LibraryError("other.sqlite: part X: vrrm_V holds text")

    monkeypatch.setattr(other, "list_parts", broken)
    with pytest.raises(LibraryError):
        bench.library.set_library(other)
    assert bench.library.library is before


@pytest.mark.parametrize("command_id,suffix", [("report.export", "r.html"), ("library.export", "p.csv"),
                                               ("requirement.save_as", "q.toml"), ("curves.export", "c.png")])
def test_writing_into_a_missing_folder_is_a_dialog(window, tmp_path, command_id, suffix):
    window.bench.prompt.paths.append(str(tmp_path / "no-such-folder" / suffix))
    window.run_command(command_id)  # no exception escapes
    assert window.bench.prompt.errors, f"{command_id}: nothing shown"
    assert "no-such-folder" in window.bench.prompt.errors[-1][1] or "No such file" in window.bench.prompt.errors[-1][1]


def test_an_unexpected_error_in_a_command_is_a_dialog(window, monkeypatch):
    from partpick.gui import commands

    def boom(bench):
        raise ZeroDivisionError("division by zero")

    original = commands.COMMANDS["shortlist.compare"]
    monkeypatch.setitem(commands.COMMANDS, "shortlist.compare", original.__class__(
        original.id, original.title, original.menu, original.shortcuts, boom))
    window.actions["shortlist.compare"].trigger()
    title, text = window.bench.prompt.errors[-1]
    assert title == "Compare selected" and "division by zero" in text and "ZeroDivisionError" in text


# -- requirement edits: undo, quit --------------------------------------------------------------------
def test_requirement_edits_undo_and_redo(qtbot, window):
    bench = window.bench
    old = bench.requirement.text("supply_max_V")
    type_into(qtbot, window, "supply_max_V", "15 V")
    assert bench.requirement.value("supply_max_V") == pytest.approx(15.0)
    assert bench.undo_stack.count() == 1  # one step for one field's typing
    window.actions["edit.undo"].trigger()
    assert bench.requirement.text("supply_max_V") == old
    assert window.requirement_view.editor("supply_max_V").text() == old  # model → widget
    window.actions["edit.redo"].trigger()
    assert bench.requirement.value("supply_max_V") == pytest.approx(15.0)
    load(window, ZENER_TOML)
    assert bench.requirement.role == "zener_shunt"
    window.actions["edit.undo"].trigger()  # the whole load is one step
    assert bench.requirement.role == "series"
    assert bench.requirement.value("supply_max_V") == pytest.approx(15.0)


def test_quitting_with_an_unsaved_requirement_asks(qtbot, window, tmp_path):
    prompt = window.bench.prompt
    type_into(qtbot, window, "name", "My edited requirement")
    prompt.choices.append("Cancel")
    window.close()
    assert window.isVisible() and prompt.asked[-1][0] == "Quit"
    assert "My edited requirement" in prompt.asked[-1][1]
    out = tmp_path / "saved.toml"
    prompt.choices.append("Save")
    prompt.paths.append(str(out))
    window.close()
    assert not window.isVisible()
    assert "My edited requirement" in out.read_text(encoding="utf-8")


def test_quitting_a_saved_requirement_does_not_ask(window):
    window.close()
    assert not window.isVisible() and window.bench.prompt.asked == []


# -- fields -------------------------------------------------------------------------------------------
def test_the_unicode_minus_the_app_writes_is_accepted(qtbot, window):
    from PySide6.QtCore import QEvent
    from PySide6.QtGui import QKeyEvent
    from PySide6.QtWidgets import QApplication

    field = window.requirement_view.editor("ambient_min_C").edit
    field.setFocus()
    field.selectAll()
    # U+2212, as the corner labels write it, typed as a key event carrying the character
    # (QTest.keyClicks handles only Latin-1).
    for event_type in (QEvent.Type.KeyPress, QEvent.Type.KeyRelease):
        QApplication.sendEvent(field, QKeyEvent(event_type, Qt.Key.Key_unknown, Qt.KeyboardModifier.NoModifier, "−"))
    qtbot.keyClicks(field, "40")
    assert field.text() == "−40"
    assert window.bench.requirement.error("ambient_min_C") == ""
    assert window.bench.requirement.value("ambient_min_C") == pytest.approx(-40.0)
    window.bench.requirement.set_value("ambient_min_C", -25.0)
    assert window.requirement_view.editor("ambient_min_C").text().replace("−", "-").startswith("-25")


def test_placeholders_are_per_field(window):
    view = window.requirement_view
    assert view.editor("max_leakage_A").edit.placeholderText() == "e.g. 100 µA"
    assert view.editor("load_max_A").edit.placeholderText() != view.editor("max_leakage_A").edit.placeholderText()
    assert all(view.editor(k).edit.placeholderText() for k in ("supply_min_V", "min_output_V", "inrush_source_ohm"))


def test_list_filters_offer_only_what_the_library_holds(window):
    bench = window.bench
    packages = window.requirement_view.editor("packages").choices()
    assert set(packages) == {p["package"] for p in bench.library.parts if p.get("package")}
    lifecycle = window.requirement_view.editor("lifecycle").choices()
    assert set(lifecycle) == {p["lifecycle"] for p in bench.library.parts if p.get("lifecycle")}


# -- shortlist ------------------------------------------------------------------------------------------
def test_zener_shortlist_shows_the_resistor_and_its_power_class(window):
    from partpick.units import format_engineering

    load(window, ZENER_TOML)
    model = window.shortlist.table_model
    headers = [model.headerData(c, Qt.Orientation.Horizontal) for c in range(model.columnCount())]
    r_col, class_col = headers.index("Resistor"), headers.index("Resistor class")
    top = model.candidate_at(0)
    assert model.index(0, r_col).data() == format_engineering(top["metrics"]["series_resistor_ohm"], "Ω")
    assert model.index(0, class_col).data() == format_engineering(top["metrics"]["resistor_power_class_W"], "W")
    load(window, SERIES_TOML)
    headers = [model.headerData(c, Qt.Orientation.Horizontal) for c in range(model.columnCount())]
    assert "Resistor" not in headers


def test_shortlist_sorts_by_any_column_and_keeps_the_selection(qtbot, window):
    load(window, SERIES_TOML)
    model, table = window.shortlist.table_model, window.shortlist.table
    headers = [model.headerData(c, Qt.Orientation.Horizontal) for c in range(model.columnCount())]
    window.shortlist.select_rows([0])
    selected = window.bench.result.selected
    part_col = headers.index("Part")
    table.sortByColumn(part_col, Qt.SortOrder.DescendingOrder)  # a click on the header, twice
    numbers = [model.candidate_at(r)["part_number"] for r in range(model.rowCount())]
    assert numbers == sorted(numbers, key=str.casefold, reverse=True)
    assert window.bench.result.selected == selected
    rows = {i.row() for i in table.selectionModel().selectedRows()}
    assert [model.candidate_at(r)["part_number"] for r in rows] == selected
    check_col = len([h for h in headers if h in ("Rank", "Part", "Kind", "Package", "Result",
                                                  "First failing check")])
    table.sortByColumn(check_col, Qt.SortOrder.AscendingOrder)
    name = model.check_names[0]
    margins = [next(c for c in model.candidate_at(r)["checks"] if c["name"] == name).get("margin_pct")
               for r in range(model.rowCount())]
    known = [m for m in margins if m is not None]
    assert known == sorted(known)


def test_shortlist_context_menu_offers_the_row_commands(qtbot, window):
    load(window, SERIES_TOML)
    table = window.shortlist.table
    rect = table.visualRect(window.shortlist.table_model.index(1, 1))
    table.customContextMenuRequested.emit(rect.center())
    menu = window.shortlist.context_menu
    titles = [a.text().replace("&", "") for a in menu.actions() if a.text()]
    assert {"Show check sheet", "Compare selected", "Find substitutes", "Export report…"} <= set(titles)
    assert window.bench.result.selected == [window.shortlist.table_model.candidate_at(1)["part_number"]]
    sheet = next(a for a in menu.actions() if a.text().replace("&", "") == "Show check sheet")
    sheet.trigger()
    menu.close()
    assert window.bench.prompt.check_sheets == window.bench.result.selected
    dialog = next(d for d in window.dialogs if d.objectName() == "check_sheet_dialog")
    html = dialog.browser.toPlainText()
    for check in dialog.candidate["checks"]:
        from partpick.report.words import CHECK_LABELS

        assert CHECK_LABELS.get(check["name"], check["name"]) in html


# -- cautions -----------------------------------------------------------------------------------------
def test_cautions_are_on_the_main_window_and_shown_on_first_run(qtbot, window):
    from partpick.checks.cautions import ASSUMPTION_CAUTIONS

    label = window.caution_label
    assert label.isVisible() and "verify" in label.text()
    qtbot.mouseClick(label, Qt.MouseButton.LeftButton)
    assert window.bench.prompt.cautions == [False]
    window.show_first_run()
    window.show_first_run()  # once per user
    assert window.bench.prompt.cautions == [False, True]
    from partpick.gui.dialogs import CautionsDialog

    dialog = CautionsDialog(True, window)
    assert all(c.split(":")[0][:40] in dialog.text.text() for c in ASSUMPTION_CAUTIONS)
    dialog.deleteLater()


# -- size ---------------------------------------------------------------------------------------------
def test_the_first_window_fits_a_1366_by_768_screen(window, monkeypatch):
    from PySide6.QtCore import QRect

    screen = window.screen()
    monkeypatch.setattr(type(screen), "availableGeometry", lambda self: QRect(0, 0, 1366, 728))
    window._first_size()
    assert window.width() <= 1366 and window.height() <= 728


# -- substitutes --------------------------------------------------------------------------------------
def test_substitutes_is_a_sortable_coloured_view_that_opens_check_sheets(qtbot, window):
    from partpick.gui.compare_view import substitute_cell

    load(window, ZENER_TOML)
    bench = window.bench
    bench.result.set_selected([bench.result.candidates[0]["part_number"]])
    window.run_command("shortlist.substitutes")
    dialog = next(d for d in window.dialogs if d.objectName() == "substitutes_dialog")
    count = len(dialog.candidates)
    assert count >= 1
    assert dialog.summary.text().startswith(f"{count} part{'s' if count != 1 else ''} pass{'es' if count == 1 else ''} ")
    headers = [dialog.table.horizontalHeaderItem(c).text() for c in range(dialog.table.columnCount())]
    life = headers.index("Δ Lifecycle")
    texts = [dialog.table.item(r, life).text() for r in range(dialog.table.rowCount())]
    assert not any("{" in t for t in texts)  # never a raw dict
    # Colours: lower price is better, a higher one is worse; a move towards obsolete is worse.
    assert substitute_cell("price", -0.01)[1] == 1 and substitute_cell("price", 0.02)[1] == -1
    assert substitute_cell("lifecycle", {"from": "active", "to": "nrnd"}) == ("active → nrnd", -1, 1)
    assert substitute_cell("smallest_margin_pct", 3.0)[1] == 1
    # Sorting by a delta column orders by the value.
    price = headers.index("Δ Price") if "Δ Price" in headers else None
    if price is not None and dialog.table.rowCount() > 1:
        dialog.table.sortByColumn(price, Qt.SortOrder.AscendingOrder)
        keys = [dialog.table.item(r, price).data(Qt.ItemDataRole.UserRole) for r in range(dialog.table.rowCount())]
        assert keys == sorted(keys)
    dialog.open_check_sheet(0)
    assert bench.prompt.check_sheets == [dialog.part_at(0)]


# -- long imports ---------------------------------------------------------------------------------------
def test_a_large_import_reports_progress_from_its_first_rows(window, tmp_path):
    """7,480 rows: progress starts during the dry run that judges the rows, not after it (the window
    froze 3.4 s before the first progress). The time to first progress is measured in bench_gui.py."""
    import csv

    bench = window.bench
    exported = tmp_path / "example.csv"
    bench.library.library.export_csv(exported)
    with open(exported, newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    big = tmp_path / "big.csv"
    with open(big, "w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]))
        writer.writeheader()
        for i in range(7480):
            writer.writerow(dict(rows[i % len(rows)], part_number=f"{rows[i % len(rows)]['part_number']}-B{i:05d}"))
    before = len(bench.library.parts)
    bench.prompt.paths.append(str(big))
    window.run_command("library.import")
    log = bench.prompt.progress_log
    assert len(bench.library.parts) == before + 7480
    assert len(log) >= 20
    first_done, first_total = log[0][1], log[0][2]
    assert first_done / first_total < 0.05  # the first report comes within the first rows of the dry run
    assert [d / t for _, d, t in log] == sorted(d / t for _, d, t in log)  # never goes backwards
    assert log[-1][1] == log[-1][2]


def test_library_table_sorts_by_any_column_and_has_a_row_menu(qtbot, window):
    from partpick.gui.library_view import LIBRARY_COLUMNS

    view = window.library_view
    model, table = view.table_model, view.table
    view.select_part(model.part_at(3)["part_number"])
    chosen = window.bench.selected_parts
    column = LIBRARY_COLUMNS.index("vrrm_V")
    table.sortByColumn(column, Qt.SortOrder.DescendingOrder)
    values = [model.part_at(r).get("vrrm_V") for r in range(model.rowCount())]
    known = [v for v in values if v is not None]
    assert known == sorted(known, reverse=True) and values[: len(known)] == known  # unknown last
    assert view.selected_part_numbers() == chosen == window.bench.selected_parts
    table.sortByColumn(LIBRARY_COLUMNS.index("part_number"), Qt.SortOrder.AscendingOrder)
    numbers = [model.part_at(r)["part_number"] for r in range(model.rowCount())]
    assert numbers == sorted(numbers, key=str.casefold)
    rect = table.visualRect(model.index(0, 0))
    table.customContextMenuRequested.emit(rect.center())
    titles = [a.text().replace("&", "") for a in view.context_menu.actions() if a.text()]
    view.context_menu.close()
    assert {"Edit part…", "Duplicate part", "Delete part", "Add part…", "Copy part number"} <= set(titles)
    assert window.bench.selected_parts == [numbers[0]]
