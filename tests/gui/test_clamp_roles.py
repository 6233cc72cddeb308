"""The coil and surge clamps in the window: their own form groups, the same shortlist as the CLI, their tabs."""

from __future__ import annotations

import pytest

from test_window import REQUIREMENTS, choose, cli_json, settle, type_into


def test_coil_clamp_typed_into_the_form(qtbot, window, library_path, tmp_path):
    choose(qtbot, window, "role", "inductive_clamp")
    view = window.requirement_view
    assert view.groups["inductive_clamp"].isVisible() and not view.groups["Zener"].isVisible()
    assert not view.rows["load_max_A"][1].isVisible()  # a coil clamp has no load current
    type_into(qtbot, window, "name", "Flyback diode, 24 V solenoid valve (diode only)")
    for key, text in (("supply_min_V", "21.6"), ("supply_max_V", "26.4"), ("ambient_min_C", "-20"),
                      ("ambient_max_C", "70"), ("coil.inductance_H", "300 m"), ("coil.resistance_ohm", "72"),
                      ("coil.switch_max_V", "60 V"), ("coil.dropout_A", "100 mA")):
        type_into(qtbot, window, key, text)
    settle(qtbot, window)
    shown = window.bench.result.result
    toml = tmp_path / "valve.toml"
    toml.write_text((REQUIREMENTS / "solenoid_valve_24V_diode.toml").read_text(encoding="utf-8"), encoding="utf-8")
    expected = cli_json(library_path, toml, tmp_path)
    assert [c["part_number"] for c in shown["candidates"]] == [c["part_number"] for c in expected["candidates"]]
    assert shown["candidates"][0]["metrics"] == pytest.approx(expected["candidates"][0]["metrics"])
    tabs = window.curves.tabs
    for key in ("coil_current", "switch_voltage"):
        assert tabs.isTabVisible(tabs.indexOf(window.curves.pages[key]))
    assert not tabs.isTabVisible(tabs.indexOf(window.curves.pages["clamp_line"]))
    tabs.setCurrentWidget(window.curves.pages["coil_current"])
    assert window.curves.pages["coil_current"].items[0][0], "the coil current plot is empty"


def test_surge_clamp_bad_entry_is_marked_at_the_field(qtbot, window):
    choose(qtbot, window, "role", "tvs_clamp")
    view = window.requirement_view
    assert view.groups["tvs_clamp"].isVisible()
    assert not view.rows["supply_max_V"][1].isVisible()  # ambient only
    assert view.rows["max_leakage_A"][1].isVisible()  # the leakage check at the line maximum
    type_into(qtbot, window, "surge.surge_source_ohm", "-2")
    qtbot.waitUntil(lambda: bool(window.bench.requirement.field_error("surge.surge_source_ohm")), timeout=3000)
    assert "-2 is below 0 Ω" in window.bench.requirement.field_error("surge.surge_source_ohm")
