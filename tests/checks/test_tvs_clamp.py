"""The ``tvs_clamp`` role (SPEC §4a): requirement table and every check by hand calculation.

The part is invented: VWM 30 V, VBR 33.3…36.8 V at 1 mA, VC 48.4 V at IPP 12.4 A, 600 W for 10/1000 µs
and 3500 W for 8/20 µs, +0.1 %/K, IR 1 µA at 30 V, Tj max 150 °C. The method (straight clamp line through
the datasheet's two points, linear temperature derating, log–log between two rating points) is
common practice; the numbers below are worked by hand from it.
"""

from __future__ import annotations

import math

import pytest

from checks_builders import make_part
from partpick.checks.requirement import requirement_from_toml
from partpick.checks.service import run_check
from partpick.errors import InputError

BASE = """\
name = "input"
role = "tvs_clamp"
policy = "commercial"
ambient_min_C = -40.0
ambient_max_C = 85.0

[surge]
line_max_V = 28.8
protected_max_V = 60.0
surge_V = 1000.0
surge_source_ohm = 42.0
"""


def _tvs(number="TV-1", **extra):
    fields = dict(part_number=number, kind="tvs", package="SMB", vwm_V=30.0, vbr_min_V=33.3, vbr_max_V=36.8,
                  it_A=1e-3, vc_V=48.4, ipp_A=12.4, ppp_W=600.0, ppp_waveform="10/1000", ppp2_W=3500.0,
                  ppp2_waveform="8/20", bidirectional="false", vbr_tc_pct_per_K=0.1, ir_A=1e-6, ir_vr_V=30.0,
                  ir_t_C=25.0, tj_max_C=150.0, lifecycle="active", price=0.08)
    fields.update(extra)
    return make_part(**fields)


def _check(candidate, name):
    return next(c for c in candidate["checks"] if c["name"] == name)


def test_surge_point_and_checks_by_hand():
    cand = run_check(requirement_from_toml(BASE, "in.toml"), [_tvs()])["candidates"][0]
    m = cand["metrics"]
    rd = (48.4 - 36.8) / (12.4 - 1e-3)                       # 0.935559 Ω
    vbr_low_cold = 33.3 * (1 + 0.001 * (-40 - 25))           # 31.13550 V
    vbr_high_hot = 36.8 * (1 + 0.001 * (85 - 25))            # 39.00800 V
    ip_low = (1000 - vbr_low_cold) / (42 + rd)               # 22.5656 A
    ip_high = (1000 - vbr_high_hot) / (42 + rd)
    vc_high = vbr_high_hot + rd * ip_high                    # 59.95 V
    assert rd == pytest.approx(0.935559, rel=1e-5)
    assert m["surge_current_A"] == pytest.approx(ip_low, rel=1e-9)
    assert m["clamp_voltage_V"] == pytest.approx(vc_high, rel=1e-9)
    assert m["pulse_power_W"] == pytest.approx(max(ip_low * (vbr_low_cold + rd * ip_low), ip_high * vc_high),
                                               rel=1e-9)
    # Rating at 20 µs from the two points is the 8/20 point itself; derated at 85 °C: 3500·65/125 = 1820 W;
    # commercial allows 80 % of it: 1456 W.
    pulse = _check(cand, "pulse_power")
    assert pulse["limit"] == pytest.approx(0.8 * 3500 * 65 / 125, rel=1e-9)
    assert pulse["corner"]["ambient_C"] == 85.0
    assert m["pulse_rating_W"] == pytest.approx(1820.0, rel=1e-9)
    assert "two rating points" in pulse["note"]
    clamp = _check(cand, "clamp_voltage")
    assert clamp["limit"] == pytest.approx(54.0) and clamp["passed"] is False
    assert clamp["corner"] == {"vbr_end": "high", "ambient_C": 85.0, "state": "surge"}
    assert "beyond" in clamp["note"]  # 22.6 A is above IPP 12.4 A
    standoff = _check(cand, "standoff")
    assert standoff["value"] == 30.0 and standoff["limit"] == 28.8 and standoff["passed"]
    bd = _check(cand, "breakdown_margin")
    assert bd["value"] == pytest.approx(vbr_low_cold) and bd["corner"]["ambient_C"] == -40.0


def test_one_rating_point_moves_by_square_root_and_high_reliability_halves():
    text = BASE.replace('policy = "commercial"', 'policy = "high_reliability"')
    cand = run_check(requirement_from_toml(text, "in.toml"), [_tvs(ppp2_W=None, ppp2_waveform=None)])
    pulse = _check(cand["candidates"][0], "pulse_power")
    # 600 W · (20/1000)^(−1/2) = 4242.64 W at 25 °C (common practice, from memory); at 85 °C × 65/125;
    # high_reliability 50 % (transient suppressors, MIL-STD-975M appendix A as transcribed).
    assert pulse["limit"] == pytest.approx(0.5 * 600 * math.sqrt(50) * 65 / 125, rel=1e-9)
    assert "t^(−1/2)" in pulse["note"]


def test_direction_and_leakage_and_default_tc():
    text = BASE + "bidirectional_line = true\n"
    text = text.replace("[surge]", "max_leakage_A = 1e-5\n\n[surge]")
    out = run_check(requirement_from_toml(text, "in.toml"),
                    [_tvs(), _tvs("TV-B", bidirectional="true", vbr_tc_pct_per_K=None)])
    by = {c["part_number"]: c for c in out["candidates"]}
    assert "direction" in by["TV-1"]["failed_checks"]
    assert _check(by["TV-B"], "direction")["passed"]
    # Leakage at the line max and 85 °C: 1 µA · 2^(60/10) · max(1, 28.8/30) = 64 µA (doubling every 10 K).
    leak = _check(by["TV-1"], "leakage")
    assert leak["value"] == pytest.approx(64e-6, rel=1e-9) and not leak["passed"]
    assert "+0.1 %/K assumed" in _check(by["TV-B"], "breakdown_margin")["note"]


def test_standoff_below_line_fails_and_missing_data_is_named():
    out = run_check(requirement_from_toml(BASE, "in.toml"), [_tvs("LOW", vwm_V=26.0), _tvs("NO-VC", vc_V=None)])
    by = {c["part_number"]: c for c in out["candidates"]}
    assert "standoff" in by["LOW"]["failed_checks"]
    dm = _check(by["NO-VC"], "data_missing")
    assert "vc_V" in dm["reason"] and by["NO-VC"]["metrics"]["clamp_voltage_V"] is None


@pytest.mark.parametrize(("text", "pattern"), [
    (BASE.replace("line_max_V = 28.8", "line_max_V = 0"), r"in\.toml, line 8: surge\.line_max_V: 0 is out of range"),
    (BASE.replace("protected_max_V = 60.0", "protected_max_V = 20"), r"line 9: surge\.protected_max_V: 20 V is not "
                                                                      r"above line_max_V"),
    (BASE + "clamp_limit_pct = 0\n", r"surge\.clamp_limit_pct: 0 is out of range"),
    (BASE + "clamp_limit_pct = 101\n", r"surge\.clamp_limit_pct: 101 is out of range"),
    (BASE.replace("surge_V = 1000.0", "surge_V = 20"), r"surge\.surge_V: 20 V is not above line_max_V"),
    (BASE.replace("surge_V = 1000.0", "surge_V = '1 kV'"), r"surge\.surge_V: '1 kV' is not a number"),
    (BASE.replace("surge_source_ohm = 42.0", "surge_source_ohm = 0"), r"surge\.surge_source_ohm: 0 is out of range"),
    (BASE + 'surge_waveform = "1.2/50"\n', r"surge\.surge_waveform: '1\.2/50' is not one of 8/20"),
    (BASE + 'bidirectional_line = "yes"\n', r"surge\.bidirectional_line: 'yes' is not true or false"),
    (BASE + "line_min_V = 10\n", r"unknown key in \[surge\]"),
    (BASE.replace("surge_V = 1000.0\n", ""), r"\[surge\] required key 'surge_V' is missing"),
    (BASE.replace("ambient_min_C", "supply_max_V = 24.0\nambient_min_C"),
     r"supply_max_V: role 'tvs_clamp' does not use this key: a surge clamp has no DC supply"),
    (BASE.replace("ambient_min_C", "load_max_A = 1.0\nambient_min_C"), r"load_max_A: role 'tvs_clamp' does not use"),
    (BASE.replace("ambient_min_C", "tj_margin_K = 10\nambient_min_C"), r"tj_margin_K: role 'tvs_clamp' does not use"),
    (BASE.split("[surge]")[0], r"role 'tvs_clamp' needs an \[surge\] table"),
])
def test_bad_surge_input_is_refused(text, pattern):
    with pytest.raises(InputError, match=pattern):
        requirement_from_toml(text, "in.toml")


def test_bad_surge_input_exits_2(tmp_path, capsys):
    from partpick.cli import main

    bad = tmp_path / "bad.toml"
    bad.write_text(BASE + 'surge_waveform = "8-20"\n', encoding="utf-8")
    assert main(["check", str(bad), "--library", str(tmp_path / "none.sqlite")]) == 2
    assert "surge.surge_waveform" in capsys.readouterr().err
