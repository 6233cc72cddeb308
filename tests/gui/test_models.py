"""The window's Qt-free models: what a field accepts, when a check may run, what the filter shows."""

from __future__ import annotations

import re

import pytest

from partpick.errors import InputError
from partpick.gui.models import LibraryModel, RequirementModel, ResultModel, describe_corner
from partpick.gui.part_edit_model import PartEditModel, parse_points


class Recorder:
    def __init__(self):
        self.calls = []

    def __call__(self, *args):
        self.calls.append(args)


# -- RequirementModel -------------------------------------------------------------------------------
def test_new_requirement_starts_from_commercial_series():
    model = RequirementModel()
    data = model.requirement_dict()
    assert data["role"] == "series"
    assert data["policy"] == "commercial"  # SPEC §4: the window's new requirements start from it
    assert "zener" not in data


@pytest.mark.parametrize(
    "key, text, expected",
    [
        ("supply_min_V", "4.7", 4.7),
        ("supply_max_V", "13.5 V", 13.5),
        ("load_max_A", "10 mA", 0.010),
        ("load_max_A", "1e-3", 1e-3),
        ("load_min_A", "500u", 500e-6),
        ("ambient_min_C", "-40 °C", -40.0),
        ("inrush_source_ohm", "4.7k", 4700.0),
        ("inrush_capacitance_F", "100 µF", 100e-6),
    ],
)
def test_fields_take_engineering_notation(key, text, expected):
    model = RequirementModel()
    model.set_text(key, text)
    assert model.error(key) == ""
    assert model.value(key) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    "key, text, words",
    [
        ("supply_min_V", "12 A", "unit 'A'"),
        ("supply_min_V", "twelve", "not a number"),
        ("load_max_A", "4.7kk", "'4.7kk' has unit 'k', expected 'A'"),
        ("load_max_A", "1,5", "'1,5' is not a number"),
        ("supply_max_V", "", "required"),
        ("load_min_A", "-1 mA", "below 0"),
        ("kinds", "schottky, diac", "diac"),
    ],
)
def test_bad_entry_keeps_its_text_and_error_and_never_reaches_the_checker(key, text, words):
    model = RequirementModel()
    good = model.value(key)
    settled = Recorder()
    model.values_changed.connect(settled)
    model.set_text(key, text)
    assert words in model.error(key)
    assert model.text(key) == text  # nothing coerced, nothing lost
    assert model.value(key) == good  # the last good value is kept, not garbage
    assert settled.calls == []  # no recheck is asked for
    with pytest.raises(InputError, match=re.escape(words)):
        model.requirement_dict()


def test_fixing_the_entry_clears_the_error_and_asks_for_a_recheck():
    model = RequirementModel()
    model.set_text("supply_min_V", "12 A")
    settled = Recorder()
    model.values_changed.connect(settled)
    model.set_text("supply_min_V", "12 V")
    assert model.error("supply_min_V") == ""
    assert len(settled.calls) == 1
    assert model.requirement_dict()["supply_min_V"] == 12.0


def test_same_value_typed_differently_asks_for_no_recheck():
    model = RequirementModel()
    model.set_text("supply_min_V", "11")  # reset() put 11 V there
    settled = Recorder()
    model.values_changed.connect(settled)
    model.set_text("supply_min_V", "11.0 V")
    assert settled.calls == []


def test_zener_fields_apply_only_to_the_zener_role():
    model = RequirementModel()
    roles = Recorder()
    model.role_changed.connect(roles)
    model.set_text("target_V", "bad")  # an error in a field that does not apply...
    assert model.errors() == {}  # ...does not block a series check
    model.set_text("role", "zener_shunt")
    assert roles.calls == [("zener_shunt",)]
    assert "target_V" in model.errors()  # now it applies and blocks
    model.set_text("target_V", "5.1")
    data = model.requirement_dict()
    assert data["zener"]["target_V"] == 5.1
    assert "max_forward_drop_V" not in data


def test_checker_reader_error_is_shown_at_the_field_it_names():
    model = RequirementModel()
    model.set_text("ambient_max_C", "298")  # kelvin typed where °C was meant: the checker refuses it
    assert model.error("ambient_max_C") == ""  # the number itself parses
    with pytest.raises(InputError, match="ambient_max_C"):
        model.build_requirement()
    assert "ambient_max_C" in model.field_error("ambient_max_C")
    model.set_text("ambient_max_C", "85")
    assert model.field_error("ambient_max_C") == ""
    assert model.build_requirement().ambient_max_C == 85.0


def test_percentage_fields_read_at_most_x_percent_of_the_rating():
    # SPEC §4: "Current ≤ [% of rating]"; the key is current_limit_pct, the number the same way round
    from partpick.gui.models import REQUIREMENT_FIELDS

    labels = {f.key: f.form_label for f in REQUIREMENT_FIELDS}
    assert labels["current_limit_pct"] == "Current ≤ [% of rating]"
    assert labels["power_limit_pct"] == "Power ≤ [% of rating]"
    assert labels["resistor_power_limit_pct"] == "Resistor power ≤ [% of rating]"
    assert not any(k.endswith("_derating_pct") for k in labels)
    model = RequirementModel()
    model.set_text("current_limit_pct", "60")
    assert model.build_requirement().current_limit_pct == 60.0
    with pytest.raises(InputError, match="current_derating_pct: this key was renamed: write current_limit_pct"):
        model.load_dict({"current_derating_pct": 60.0})


def test_load_dict_round_trip_and_unknown_key():
    model = RequirementModel()
    model.load_dict({"name": "x", "role": "zener_shunt", "supply_min_V": 9.0, "supply_max_V": 15.0,
                     "load_min_A": 0.0, "load_max_A": 0.005, "ambient_min_C": -20.0, "ambient_max_C": 70.0,
                     "zener": {"target_V": 5.1, "max_regulation_error_pct": 5.0, "resistor_series": "E24"}})
    assert model.text("load_max_A") == "5 mA"
    assert model.requirement_dict()["zener"] == {"target_V": 5.1, "max_regulation_error_pct": 5.0,
                                                  "resistor_series": "E24"}
    with pytest.raises(InputError, match="frobnicate"):
        model.load_dict({"frobnicate": 1})


def test_unknown_policy_is_marked():
    model = RequirementModel()
    model.set_policy_names(["commercial", "ratings_only"])
    model.set_text("policy", "strict")
    assert "not one of" in model.error("policy")


# -- LibraryModel -----------------------------------------------------------------------------------
def test_library_filter_by_kind_package_and_text(library):
    model = LibraryModel(library)
    everything = len(model.parts)
    assert everything == len(library.list_parts()) > 100
    changed = Recorder()
    model.filter_changed.connect(changed)
    model.set_filter(kind="zener")
    assert model.visible_parts() and all(p["kind"] == "zener" for p in model.visible_parts())
    package = model.visible_parts()[0]["package"]
    model.set_filter(package=package)
    assert all(p["package"] == package and p["kind"] == "zener" for p in model.visible_parts())
    model.set_filter(kind="", package="", text="5V1")
    assert model.visible_parts() and all("5V1" in p["part_number"] for p in model.visible_parts())
    assert len(changed.calls) == 3
    model.set_filter(text="5V1")  # unchanged: no signal
    assert len(changed.calls) == 3


def test_library_model_content_hash_is_the_stores_and_follows_edits(library):
    model = LibraryModel(library)
    assert model.library_info() == {"location": library.location, "content_hash": library.content_hash()}
    part = dict(model.parts[0], notes="edited in a test")
    model.save_part(part, replace=part["part_number"])
    assert model.library_info()["content_hash"] == library.content_hash()
    assert model.get_part(part["part_number"])["notes"] == "edited in a test"


def test_library_model_part_arrays_are_built_once_and_follow_edits(library):
    """The rechecks share one PartArrays per library state; it gives the CLI's result (the same parts)."""
    from partpick.checks.requirement import requirement_from_dict
    from partpick.checks.service import run_check

    model = LibraryModel(library)
    arrays = model.part_arrays()
    assert model.part_arrays() is arrays  # no conversion on the next recheck
    assert arrays.part_number.tolist() == [p["part_number"] for p in model.parts]
    req = requirement_from_dict(dict(name="t", role="series", supply_min_V=10.0, supply_max_V=14.0, load_min_A=0.1,
                                     load_max_A=1.0, ambient_min_C=-20.0, ambient_max_C=60.0), "test")
    assert run_check(req, arrays, top=10) == run_check(req, model.parts, top=10)
    part = dict(model.parts[0], price=12.5)
    model.save_part(part, replace=part["part_number"])
    changed = model.part_arrays()
    assert changed is not arrays
    assert changed.raw["price"][0] == 12.5 and arrays.raw["price"][0] != 12.5  # the old snapshot is untouched


def test_free_part_number_for_duplicates(library):
    model = LibraryModel(library)
    number = model.parts[0]["part_number"]
    assert model.free_part_number(number) == f"{number}-copy"


# -- ResultModel ------------------------------------------------------------------------------------
def _result(*passes):
    return {"requirement": {"role": "series"}, "candidates": [
        {"part_number": f"P{i}", "passed": ok, "rank": i + 1, "checks": [], "failed_checks": []}
        for i, ok in enumerate(passes)]}


def test_status_line_and_selection_follow_the_result():
    model = ResultModel()
    model.set_result(_result(True, True, False), 12.4, 3)
    assert model.status_text() == "2 of 3 parts pass · 12 ms"
    assert model.selected == ["P0"]  # the top part is shown first
    model.set_selected(["P2", "P1"])
    model.set_result(_result(True, False), 3.0, 2)  # P2 is gone
    assert model.selected == ["P1"]
    model.set_stale("Not rechecked: Supply min: required")
    assert model.status_text().startswith("Not rechecked: Supply min: required — showing the last good result")


def test_corner_in_words():
    corner = {"supply_V": 11.0, "load_A": 1.0, "ambient_C": -20.0, "state": "cold_start"}
    assert describe_corner(corner) == "11 V · 1 A · −20 °C · cold start"


# -- Part editor model -------------------------------------------------------------------------------
def test_points_paste_formats():
    expected = [0.01, 0.62, 0.1, 0.72, 1.0, 0.93]

    def flat(points):
        return [x for pair in points for x in pair]

    assert flat(parse_points("10 mA, 0.62\n100m, 720 mV\n1 A\t0.93")) == pytest.approx(expected)
    assert flat(parse_points("0.01:0.62;0.1:0.72;1:0.93")) == pytest.approx(expected)
    assert flat(parse_points("0.01 0.62\n\n0.1 0.72\n1 0.93\n")) == pytest.approx(expected)
    with pytest.raises(InputError, match="entry 2"):
        parse_points("0.01, 0.62\n0.1")
    with pytest.raises(InputError, match="entry 1 VF"):
        parse_points("10 mA, 0.62 A")


def test_part_editor_model_marks_the_field_and_refuses_until_valid():
    model = PartEditModel(None, existing=["TAKEN-1"])
    assert not model.is_valid()
    assert "part_number" in model.field_problems
    for name, text in (("part_number", "NEW-1"), ("vrrm_V", "40 V"), ("if_avg_A", "1 A"),
                       ("is_A", "1e-14"), ("n", "1.9"), ("rs_ohm", "50m")):
        model.set_text(name, text)
    assert model.is_valid(), model.problems
    part = model.part()
    assert part["is_A"] == 1e-14 and part["rs_ohm"] == pytest.approx(0.05) and part["vrrm_V"] == 40.0
    model.set_text("vrrm_V", "40 A")
    assert "unit 'A'" in model.error("vrrm_V") and not model.is_valid()
    model.set_text("vrrm_V", "40")
    model.set_text("tj_max_C", "20")  # below the field's 25 °C minimum
    assert "Tj max [°C]" in model.error("tj_max_C") and not model.is_valid()  # the label on screen, not the key
    model.set_text("tj_max_C", "150")
    model.set_text("part_number", "TAKEN-1")
    assert "already in the library" in model.error("part_number")


def test_fit_preview_recovers_a_known_model():
    # Round trip: points generated from a known Shockley model (Is 1e-14 A, n 1.8, Rs 0.1 Ω at
    # 25 °C) with the physics core's forward_voltage; the editor's fit must give the model back.
    import numpy as np

    from partpick.physics.constants import T0_K
    from partpick.physics.junction import forward_voltage

    current = np.array([1e-3, 1e-2, 1e-1, 1.0])
    voltage = forward_voltage(current, 1e-14, 1.8, 0.1, T0_K)
    model = PartEditModel(None)
    model.set_text("vf_points", "\n".join(f"{float(i)!r}, {float(v)!r}" for i, v in zip(current, voltage, strict=True)))
    preview = model.fit_preview()
    assert preview.error == ""
    assert preview.fit.ideality == pytest.approx(1.8, rel=1e-3)
    assert preview.fit.series_resistance == pytest.approx(0.1, rel=1e-2)
    assert max(abs(r) for r in preview.residuals_mV) < 0.1
    curve_i, curve_v = preview.curve
    assert np.all(np.isfinite(curve_v)) and np.all(np.diff(curve_v) > 0)
    model.use_fit(preview)
    assert model.values["model_source"] == "fitted"
    assert model.values["n"] == pytest.approx(1.8, rel=1e-3)


def test_fit_refused_says_why():
    model = PartEditModel(None)
    model.set_text("vf_points", "10 mA, 0.7\n100 mA, 0.6")
    preview = model.fit_preview()
    assert preview.fit is None
    assert preview.error.startswith("Fit refused:") and "monotonic" in preview.error


def test_status_line_counts_beyond_the_listed_candidates():
    model = ResultModel()
    result = _result(True, False)
    result["summary"] = {"candidates": 10000, "passing": 3000, "listed": 2}
    model.set_result(result, 5.2, 10000)
    assert model.status_text() == "3000 of 10000 parts pass · 5 ms · first 2 listed"


def test_a_roles_own_table_is_a_form_group_of_its_fields():
    # The AC rectifier's [ac] table (declared in its role module) becomes the form's "ac.*" fields.
    from partpick.gui.models import FIELDS_BY_KEY, ROLE_GROUPS

    assert ROLE_GROUPS["ac_rectifier"] == "AC rectifier"
    spec = FIELDS_BY_KEY["ac.capacitance_F"]
    assert (spec.table, spec.toml_key, spec.unit, spec.roles) == ("ac", "capacitance_F", "F", ("ac_rectifier",))
    model = RequirementModel()
    model.set_text("role", "ac_rectifier")
    assert not model.applies("supply_min_V") and model.applies("ac.source_ohm") and not model.applies("target_V")
    for key, text in (("ac.topology", "bridge"), ("ac.vac_min_Vrms", "207"), ("ac.vac_max_Vrms", "253 V"),
                      ("ac.frequency_Hz", "50"), ("ac.source_ohm", "6"), ("ac.capacitance_F", "47 µF")):
        model.set_text(key, text)
    data = model.requirement_dict()
    assert "supply_min_V" not in data and "zener" not in data
    assert data["ac"] == {"topology": "bridge", "vac_min_Vrms": 207.0, "vac_max_Vrms": 253.0, "frequency_Hz": 50.0,
                          "source_ohm": 6.0, "capacitance_F": pytest.approx(47e-6)}
    req = model.build_requirement()
    assert req.table("ac").capacitive_derate_pct == 20.0
    model.set_text("ac.source_ohm", "0")  # the field takes 0 (its minimum); the checker's reader refuses it
    with pytest.raises(InputError, match="ac.source_ohm"):
        model.build_requirement()
    again = RequirementModel()
    again.load_dict(req.to_dict())  # what the window saves it reads back
    assert again.requirement_dict()["ac"]["capacitance_F"] == pytest.approx(47e-6)


def test_part_editor_refuses_n_below_1_and_shows_range_errors_beside_a_parse_error():
    """SPEC §5: n must be 1 … 4 for an entered model; one field that does not parse must not hide the
    range errors of the others; messages use the editor's labels, not file keys."""
    from partpick.gui.part_edit_model import PartEditModel

    model = PartEditModel({"part_number": "X1", "kind": "rectifier", "vrrm_V": 100.0, "if_avg_A": 1.0,
                           "is_A": 1e-9, "n": 1.5, "rs_ohm": 0.1, "tj_max_C": 150.0, "pd_W": 1.0})
    assert model.is_valid()
    model.set_text("n", "0.5")
    assert not model.is_valid() and "outside 1 … 4" in model.error("n")
    model.set_text("if_avg_A", "1xx")  # does not parse
    model.set_text("vrrm_V", "-5")  # out of range
    assert "expected 'A'" in model.error("if_avg_A")
    assert "out of range" in model.error("vrrm_V") and "outside 1 … 4" in model.error("n")
    assert "vrrm_V" not in model.error("vrrm_V") and "VRRM [V]" in model.error("vrrm_V")


def test_check_table_with_part_is_the_full_check_sheet(tmp_path):
    """`partpick check REQ --part P --format table` prints every check of P, not one shortlist row."""
    import json
    from pathlib import Path

    from partpick.cli import main
    from partpick.report.words import CHECK_LABELS

    root = Path(__file__).resolve().parents[2]
    toml = root / "resources" / "requirements" / "reverse_polarity_24V.toml"
    library = root / "library.sqlite.example"
    out_json = tmp_path / "r.json"
    main(["check", str(toml), "--library", str(library), "--format", "json", "--output", str(out_json), "--top", "1"])
    candidate = json.loads(out_json.read_text(encoding="utf-8"))["candidates"][0]
    out = tmp_path / "sheet.txt"
    main(["check", str(toml), "--library", str(library), "--part", candidate["part_number"], "--output", str(out)])
    text = out.read_text(encoding="utf-8")
    assert f"Check sheet: {candidate['part_number']}" in text
    for check in candidate["checks"]:
        assert CHECK_LABELS.get(check["name"], check["name"]) in text
    assert "Worst-case values:" in text


def test_zener_group_carries_the_resistor_rating_derating_short_circuit_and_yield_keys():
    from partpick.checks.requirement import ZENER_KEYS
    from partpick.gui.models import FIELDS_BY_KEY

    # Every [zener] key has a field in the window's Zener group.
    assert {k for k, f in FIELDS_BY_KEY.items() if f.table == "zener"} == set(ZENER_KEYS)
    model = RequirementModel()
    model.set_text("role", "zener_shunt")
    for key, text in (("resistor_rating_W", "250 mW"), ("resistor_rated_ambient_C", "85"),
                      ("resistor_zero_power_C", "150"), ("short_circuit", "false"), ("vz_distribution", "uniform")):
        model.set_text(key, text)
    zener = model.requirement_dict()["zener"]
    assert zener["resistor_rating_W"] == pytest.approx(0.25) and zener["short_circuit"] is False
    assert zener["resistor_rated_ambient_C"] == 85.0 and zener["resistor_zero_power_C"] == 150.0
    assert zener["vz_distribution"] == "uniform"
    built = model.build_requirement().zener
    assert built.short_circuit is False and built.vz_distribution == "uniform" and built.resistor_rating_W == 0.25
    model.set_text("vz_distribution", "gauss")
    assert "is not one of normal, uniform" in model.errors()["vz_distribution"]


def test_a_refused_fit_shows_the_best_model_and_its_residuals():
    model = PartEditModel(None)
    model.set_text("vf_points", "10 mA, 0.65\n100 mA, 0.75\n1 A, 0.92\n5 A, 1.15")
    preview = model.fit_preview()
    assert preview.fit is None and preview.refused is not None  # never usable as the part's model
    assert "misses the points" in preview.error and "What to change" in preview.error
    assert len(preview.residuals_mV) == 4 and max(abs(r) for r in preview.residuals_mV) > 5.0
    curve_i, curve_v = preview.curve
    assert all(v == v and abs(v) < 10 for v in curve_v)  # finite volts along the best model
