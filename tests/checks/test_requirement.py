"""Requirement files: every key of SPEC §5, defaults in one place, and every refusal with file, line and key."""

from __future__ import annotations

import pytest

from partpick.checks.requirement import (DEFAULTS, ZENER_DEFAULTS, load_requirement, requirement_from_dict,
                                         requirement_from_toml, requirement_to_toml)
from partpick.errors import InputError

SERIES = """\
name = "OR-ing"
role = "series"
supply_min_V = 11.0
supply_max_V = 13.0
load_min_A = 0.5
load_max_A = 3.0
ambient_min_C = -20.0
ambient_max_C = 70.0
"""

ZENER = SERIES.replace('role = "series"', 'role = "zener_shunt"') + """
[zener]
target_V = 5.1
max_regulation_error_pct = 5.0
"""


def test_minimal_series_requirement_echoes_every_default():
    req = requirement_from_toml(SERIES, "r.toml")
    d = req.to_dict()
    assert d["policy"] == "ratings_only"  # SPEC §4: no policy → ratings only
    assert d["objective"] == "balanced"
    assert d["reverse_V"] == 13.0  # default: the supply reversed
    for key in DEFAULTS:
        assert key in d
    assert req.reverse_voltage == 13.0


def test_a_reverse_transient_is_not_the_continuous_reverse_voltage():
    # SPEC §3: a pulse is checked against the peak rating only; leakage and runaway use reverse_V
    req = requirement_from_toml(SERIES + "reverse_V = 12.0\nreverse_transient_V = 40.0\n", "r.toml")
    assert req.reverse_voltage == 12.0 and req.reverse_transient_V == 40.0
    assert req.hands_over and not requirement_from_toml(SERIES + "handover = false\n", "r.toml").hands_over


def test_handover_must_be_true_or_false():
    with pytest.raises(InputError, match="handover.*not true or false"):
        requirement_from_toml(SERIES + 'handover = "yes"\n', "r.toml")


def test_zener_defaults_follow_the_series():
    req = requirement_from_toml(ZENER, "z.toml")
    z = req.to_dict()["zener"]
    assert z["resistor_series"] == ZENER_DEFAULTS["resistor_series"] == "E24"
    assert z["resistor_tolerance_pct"] == 5.0  # E24 → 5 % (common practice)
    req96 = requirement_from_toml(ZENER + 'resistor_series = "E96"\n', "z.toml")
    assert req96.zener.resistor_tolerance == 1.0  # E96 → 1 % (common practice)


def test_toml_round_trip_is_exact(tmp_path):
    text = ZENER + "min_zener_current_A = 0.001\nresistor_ohm = 680.0\n"
    text = text.replace("[zener]", 'policy = "commercial"\nkinds = ["zener"]\nmax_price = 0.5\n\n[zener]')
    req = requirement_from_toml(text, "z.toml")
    again = requirement_from_toml(requirement_to_toml(req), "again.toml")
    assert again == req
    path = tmp_path / "req.toml"
    path.write_text(requirement_to_toml(req), encoding="utf-8")
    assert load_requirement(path) == req


@pytest.mark.parametrize(("text", "pattern"), [
    (SERIES + "supply_max = 12\n", r"r\.toml, line 9: supply_max: unknown key \(did you mean 'supply_max_V'\?\)"),
    (SERIES.replace('"series"', '"seris"'), r"line 2: role: 'seris' is not a role .*did you mean 'series'"),
    (SERIES.replace("supply_min_V = 11.0", "supply_min_V = 15.0"),
     r"line 3: supply_min_V: 15 V is above supply_max_V = 13 V \(min above max\)"),
    (SERIES.replace("load_min_A = 0.5", "load_min_A = -0.5"), r"line 5: load_min_A: -0.5 must not be negative"),
    (SERIES.replace("ambient_max_C = 70.0", "ambient_max_C = 298.0"),
     r"line 8: ambient_max_C: 298 is out of range \(allowed: -75 ≤ value ≤ 200\)"),
    (SERIES.replace("ambient_min_C = -20.0", "ambient_min_C = -80.0"), r"line 7: ambient_min_C: -80 is out of range"),
    (SERIES.replace("ambient_min_C = -20.0", "ambient_min_C = 80.0"), r"ambient_min_C: 80 °C is above ambient_max_C"),
    (SERIES.replace("load_max_A = 3.0", 'load_max_A = "3 A"'), r"line 6: load_max_A: '3 A' is not a number"),
    (SERIES.replace("load_max_A = 3.0", "load_max_A = true"), r"load_max_A: True is not a number"),
    (SERIES.replace('name = "OR-ing"', "name = 5"), r"line 1: name: 5 is not text"),
    (SERIES.replace("supply_min_V = 11.0\n", ""), r"required key 'supply_min_V' is missing"),
    (SERIES + 'objective = "cheap"\n', r"objective: 'cheap' is not an objective"),
    (SERIES + 'kinds = ["shotky"]\n', r"kinds: 'shotky' is not one of .*did you mean 'schottky'"),
    (SERIES + 'lifecycle = "active"\n', r"lifecycle: 'active' is not a list of text"),
    (SERIES + "inrush_capacitance_F = 1e-4\n", r"inrush_capacitance_F: is given without inrush_source_ohm"),
    (SERIES + "current_limit_pct = 120\n", r"current_limit_pct: 120 is out of range"),
    # the names of earlier versions (SPEC §4): bad input naming the new key
    (SERIES + "current_derating_pct = 60\n", r"line 9: current_derating_pct: this key was renamed: write current_limit_pct = 60"),
    (SERIES + "power_derating_pct = 50\n", r"line 9: power_derating_pct: .*write power_limit_pct = 50"),
    (ZENER.replace("[zener]", "resistor_power_derating_pct = 50\n[zener]"),
     r"resistor_power_derating_pct: .*write resistor_power_limit_pct = 50"),
    (SERIES + "max_leakage_A = -1e-6\n", r"max_leakage_A: -1e-06 is out of range"),
    (SERIES + "supply_max_V = 14\n", r"not valid TOML: .*line 9"),
    (SERIES + "[zener\n", r"not valid TOML"),
    (SERIES.replace('"series"', '"zener_shunt"'), r"role 'zener_shunt' needs a \[zener\] table"),
    (ZENER.replace("max_regulation_error_pct = 5.0\n", ""), r"\[zener\] required key 'max_regulation_error_pct'"),
    (ZENER + "target = 5\n", r"line 13: zener\.target: unknown key in \[zener\] \(did you mean 'target_V'\?\)"),
    (ZENER + 'resistor_series = "E25"\n', r"zener\.resistor_series: 'E25' is not one of E12, E24, E48, E96"),
    (ZENER + "resistor_ohm = 0\n", r"line 13: zener\.resistor_ohm: 0 is out of range"),
    (ZENER.replace("target_V = 5.1", "target_V = 20.0"), r"target_V: 20 V is not below supply_max_V"),
    (SERIES.replace("load_max_A = 3.0", "load_max_A = 0.0").replace("load_min_A = 0.5", "load_min_A = 0.0"),
     r"load_max_A: 0 A: a series diode needs a load current above 0"),
])
def test_refusals_name_file_line_key_and_value(text, pattern):
    with pytest.raises(InputError, match=pattern):
        requirement_from_toml(text, "r.toml")


def test_unreadable_and_non_utf8_files(tmp_path):
    with pytest.raises(InputError, match=r"missing\.toml: cannot read the requirement file"):
        load_requirement(tmp_path / "missing.toml")
    bad = tmp_path / "latin1.toml"
    bad.write_bytes('name = "Grüße"\n'.encode("latin-1"))
    with pytest.raises(InputError, match=r"latin1\.toml: not UTF-8 text"):
        load_requirement(bad)


def test_from_dict_refuses_a_non_table():
    with pytest.raises(InputError, match=r"src: a requirement must be a table"):
        requirement_from_dict(["name"], "src")


def test_with_changes_revalidates():
    req = requirement_from_toml(SERIES, "r.toml")
    assert req.with_changes(supply_max_V=14.0).supply_max_V == 14.0
    with pytest.raises(InputError, match=r"supply_min_V: 11 V is above supply_max_V = 10 V"):
        req.with_changes(supply_max_V=10.0)


@pytest.mark.parametrize(("text", "pattern"), [
    (SERIES.replace("supply_max_V = 13.0", "supply_max_V = inf"), r"line 4: supply_max_V: inf is not a finite number"),
    (SERIES.replace("load_max_A = 3.0", "load_max_A = nan"), r"load_max_A: nan is not a finite number"),
    (SERIES.replace('name = "OR-ing"', 'name = "  "'), r"line 1: name: is empty"),
    (SERIES + "kinds = []\n", r"kinds: is an empty list"),
    (SERIES + "packages = [1, 2]\n", r"packages: \[1, 2\] is not a list of text"),
    (SERIES.replace('role = "series"', 'role = "zener_shunt"') + "zener = 5\n", r"zener: 5 must be a table"),
])
def test_more_refusals(text, pattern):
    with pytest.raises(InputError, match=pattern):
        requirement_from_toml(text, "r.toml")
