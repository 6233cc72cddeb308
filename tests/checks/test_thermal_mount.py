"""The requirement's [thermal] table, the mount's data needs and the rating reference points (SPEC §3a).

Reference values are hand calculations with the numbers stated beside them, or an independent
self-heating solution by brentq (`reference_models.steady_junction`).
"""

from __future__ import annotations

import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.requirement import requirement_from_toml
from partpick.checks.service import run_check
from partpick.errors import InputError
from partpick.physics.constants import ZERO_CELSIUS_K

import reference_models as ref

_BASE = """name = "t"
role = "series"
supply_min_V = 12.0
supply_max_V = 14.0
load_min_A = 1.0
load_max_A = 5.0
ambient_min_C = 25.0
ambient_max_C = 50.0
"""


def _power_part(**changes):
    # An invented TO-220-style rectifier: RthJC 2 K/W, RthJA 60 K/W on 100 mm², 35 K/W on 1000 mm².
    part = make_part(part_number="PW-1", kind="rectifier", package="TO-220", vrrm_V=200.0, if_avg_A=10.0,
                     tj_max_C=175.0, rth_ja_K_per_W=60.0, rth_ja_area_mm2=100.0, rth_ja_large_K_per_W=35.0,
                     rth_ja_large_area_mm2=1000.0, rth_jc_K_per_W=2.0, is_A=1e-9, n=1.5, rs_ohm=0.01,
                     rs_temp_exponent=0.0, ir_A=1e-6, ir_vr_V=200.0, ir_t_C=25.0)
    part.update(changes)
    return part


def _checks(candidate):
    return {c["name"]: c for c in candidate["checks"]}


@pytest.mark.parametrize("table, message", [
    ('[thermal]\nmount = "bench"\n', "line 11: thermal.mount: 'bench' is not one of board, heatsink"),
    ('[thermal]\nmount = "board"\n', "mount = 'board' needs 'copper_area_mm2'"),
    ('[thermal]\nmount = "heatsink"\n', "mount = 'heatsink' needs 'rth_sa_K_per_W'"),
    ('[thermal]\nmount = "board"\ncopper_area_mm2 = 100.0\nrth_sa_K_per_W = 2.0\n',
     "line 13: thermal.rth_sa_K_per_W: does not apply to mount = 'board'"),
    ('[thermal]\nmount = "heatsink"\nrth_sa_K_per_W = -1.0\n', "line 12: thermal.rth_sa_K_per_W: -1 must not be"),
    ('[thermal]\nmount = "board"\ncopper_area = 100.0\n', "line 12: thermal.copper_area: unknown key in [thermal]"),
])
def test_thermal_table_bad_input_names_line_and_key(table, message):
    with pytest.raises(InputError, match=message.replace("[", r"\[").replace("]", r"\]")):
        requirement_from_toml(_BASE + "\n" + table, "r.toml")


def test_thermal_table_and_one_rthja_are_exclusive():
    with pytest.raises(InputError, match="rth_ja_K_per_W: is given together with a \\[thermal\\] table"):
        requirement_from_toml(_BASE + "rth_ja_K_per_W = 40.0\n[thermal]\nmount = \"heatsink\"\n"
                                      "rth_sa_K_per_W = 2.0\n", "r.toml")


def test_heatsink_interface_default_is_echoed():
    req = requirement_from_toml(_BASE + '[thermal]\nmount = "heatsink"\nrth_sa_K_per_W = 3.0\n', "r.toml")
    assert req.to_dict()["thermal"] == {"mount": "heatsink", "rth_cs_K_per_W": 1.0, "rth_sa_K_per_W": 3.0}


def test_heatsink_mount_without_rthjc_fails_data_missing_naming_it():
    req = make_requirement(load_max_A=5.0, thermal={"mount": "heatsink", "rth_sa_K_per_W": 3.0})
    result = run_check(req, [_power_part(rth_jc_K_per_W=None)])
    checks = _checks(result["candidates"][0])
    assert not result["candidates"][0]["passed"]
    assert "rth_jc_K_per_W" in checks["data_missing"]["reason"]


def test_board_mount_without_the_second_area_fails_data_missing_naming_the_fields():
    req = make_requirement(thermal={"mount": "board", "copper_area_mm2": 300.0})
    result = run_check(req, [_power_part(rth_ja_large_K_per_W=None, rth_ja_large_area_mm2=None)])
    reason = _checks(result["candidates"][0])["data_missing"]["reason"]
    assert "rth_ja_large_K_per_W" in reason and "rth_ja_large_area_mm2" in reason


@pytest.mark.parametrize("area, words", [(300.0, "interpolated linearly in ln(area)"),
                                         (50.0, "extrapolated below the datasheet's smaller area"),
                                         (4000.0, "held flat above the datasheet's larger area")])
def test_board_mount_sheet_states_the_assumption(area, words):
    req = make_requirement(thermal={"mount": "board", "copper_area_mm2": area})
    candidate = run_check(req, [_power_part()])["candidates"][0]
    assert words in _checks(candidate)["junction_temp"]["note"]


def test_board_mount_rthja_and_tj_by_hand():
    # 300 mm²: 60 + (35 − 60)·ln 3/ln 10 = 60 − 25·0.47712 = 48.072 K/W (hand calculation).
    req = make_requirement(load_min_A=1.0, load_max_A=1.0, thermal={"mount": "board", "copper_area_mm2": 300.0})
    part = _power_part()
    candidate = run_check(req, [part])["candidates"][0]
    rth = 60.0 - 25.0 * 0.4771212547
    assert "48.1 K/W" in _checks(candidate)["junction_temp"]["note"]
    Ta = 50.0 + ZERO_CELSIUS_K
    tj = ref.steady_junction(1.0, Ta, rth, is0=1e-9, n=1.5, rs=0.01)
    assert candidate["metrics"]["junction_temp_C"] == pytest.approx(tj - ZERO_CELSIUS_K, abs=1e-3)


def test_heatsink_interface_default_is_stated():
    req = make_requirement(thermal={"mount": "heatsink", "rth_sa_K_per_W": 3.0})
    note = _checks(run_check(req, [_power_part()])["candidates"][0])["junction_temp"]["note"]
    assert "RthCS 1 K/W (default: an insulating pad, from memory)" in note
    assert "= 6 K/W" in note  # 2 + 1 + 3


def test_heatsink_rthsa_to_infinity_fails():
    # 10 kK/W (the largest the file accepts) is no heatsink at all: 5 A of forward loss cannot leave.
    req = make_requirement(load_max_A=5.0, thermal={"mount": "heatsink", "rth_sa_K_per_W": 1e4})
    candidate = run_check(req, [_power_part()])["candidates"][0]
    assert not candidate["passed"]
    assert {"power", "junction_temp"} & set(candidate["failed_checks"])


def test_heatsink_rthsa_to_zero_gives_tcase_plus_p_rthjc():
    # An ideal sink (RthSA → 0) at ambient: the case sits at Ta + P·RthCS and Tj = Tcase + P·RthJC.
    req = make_requirement(load_min_A=5.0, load_max_A=5.0, ambient_min_C=50.0,
                           thermal={"mount": "heatsink", "rth_cs_K_per_W": 0.5, "rth_sa_K_per_W": 0.0})
    metrics = run_check(req, [_power_part()])["candidates"][0]["metrics"]
    P, tj = metrics["dissipation_W"], metrics["junction_temp_C"]
    t_case = 50.0 + P * 0.5
    assert tj == pytest.approx(t_case + P * 2.0, rel=1e-9)
    # and independently (brentq on Tj = Ta + V(I, Tj)·I·(RthJC + RthCS)):
    ref_tj = ref.steady_junction(5.0, 50.0 + ZERO_CELSIUS_K, 2.5, is0=1e-9, n=1.5, rs=0.01) - ZERO_CELSIUS_K
    assert tj == pytest.approx(ref_tj, abs=1e-4)


def test_design_rthja_sets_pallow_from_the_thermal_resistance_in_use():
    # SPEC §3: Pallow(Ta) = (Tj max − Ta)/RthJA in use; at 50 °C, Tj max 175 °C, 25 K/W: 5.0 W.
    req = make_requirement(load_min_A=1.0, load_max_A=1.0, ambient_min_C=50.0, rth_ja_K_per_W=25.0)
    candidate = run_check(req, [_power_part(pd_W=2.0)])["candidates"][0]
    power = _checks(candidate)["power"]
    p = candidate["metrics"]["dissipation_W"]
    assert power["value"] == pytest.approx(100.0 * p / 5.0, rel=1e-9)


def test_lead_rated_pd_gives_rthjl_never_rthja():
    # A Pd rated at the lead (no RthJA, no mount): the part lacks an RthJA and says so.
    part = _power_part(rth_ja_K_per_W=None, rth_ja_area_mm2=None, rth_ja_large_K_per_W=None,
                       rth_ja_large_area_mm2=None, pd_W=5.0, pd_ref_point="lead", pd_ref_C=75.0)
    candidate = run_check(make_requirement(), [part])["candidates"][0]
    assert "pd_W rated at ambient or rth_ja_K_per_W" in _checks(candidate)["data_missing"]["reason"]
    # The same Pd rated at the ambient gives RthJA = (175 − 75)/5 = 20 K/W and no data_missing.
    part.update(pd_ref_point="ambient")
    candidate = run_check(make_requirement(), [part])["candidates"][0]
    assert "data_missing" not in _checks(candidate)


def test_lead_rated_if_avg_derates_from_the_lead_temperature():
    # IF(AV) 10 A rated at a lead of 100 °C, RthJL 4 K/W, RthJA 10 K/W, 90 °C ambient: at each corner the lead is at Tj − P·RthJL
    # and the limit is 10 A·(Tj max − Tlead)/(Tj max − 100 °C) (SPEC §3a), hand-checked at the worst corner.
    part = _power_part(if_ref_point="lead", if_ref_C=100.0, rth_jl_K_per_W=4.0)
    req = make_requirement(load_min_A=5.0, load_max_A=5.0, ambient_min_C=90.0, ambient_max_C=90.0,
                           rth_ja_K_per_W=10.0)
    candidate = run_check(req, [part])["candidates"][0]
    check = _checks(candidate)["forward_current"]
    m = candidate["metrics"]
    t_lead = m["junction_temp_C"] - m["dissipation_W"] * 4.0
    assert 100.0 < t_lead < 175.0  # the derating applies: Tlead = Ta + P·(RthJA − RthJL) ≈ 90 + 6·P
    expected = 10.0 * min(1.0, (175.0 - t_lead) / (175.0 - 100.0))
    assert check["limit"] == pytest.approx(expected, rel=1e-6)
