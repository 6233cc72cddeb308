"""The ``inductive_clamp`` role (SPEC §4a): requirement table, turn-off, checks at their worst point.

References for the numbers (independent of the role's code path):
- copper R(T) = R20·(1 + 0.00393·(T − 20 °C)) (common practice);
- the decay L·di/dt = −(R·i + Vf(i) + Vz) time-stepped with `scipy.integrate.solve_ivp`
  (Radau), integrating the diode's energy, ∫i²dt and ∫i dt alongside; the role integrates over the
  current instead;
- the Shockley forward voltage written out here, n·VT·ln(1 + I/Is) + I·Rs, VT = k·T/q (CODATA);
- Zth(t) = RthJA·√(t/τ) below τ (SPEC §4a; the √t law of one-dimensional heat flow, from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import constants
from scipy.integrate import solve_ivp

from checks_builders import make_part
from partpick.checks.requirement import requirement_from_toml
from partpick.checks.service import run_check
from partpick.errors import InputError

BASE = """\
name = "valve"
role = "inductive_clamp"
policy = "commercial"
supply_min_V = 21.6
supply_max_V = 26.4
ambient_min_C = -20.0
ambient_max_C = 70.0

[coil]
inductance_H = 0.3
resistance_ohm = 72.0
switch_max_V = 60.0
dropout_A = 0.1
"""
ZENER = BASE + 'clamp = "diode_zener"\nzener_V = 15.0\nzener_pd_W = 1.3\nmax_release_s = 0.004\n'
REPETITIVE = ZENER + "switching_hz = 5.0\nduty_pct = 50.0\n"

IS, N, RS = 5e-9, 1.85, 0.08  # invented flyback diode, 25 °C model


def _diode(number="FB-1", **extra):
    fields = dict(part_number=number, kind="fast_recovery", package="SMA", vrrm_V=200.0, if_avg_A=1.0,
                  ifsm_A=30.0, ifsm_ms=8.3, ifrm_A=10.0, trr_s=75e-9, qrr_C=30e-9, tj_max_C=150.0,
                  rth_ja_K_per_W=75.0, tau_th_s=0.3, is_A=IS, n=N, rs_ohm=RS, model_source="entered",
                  eg_eV=1.11, is_temp_exponent=3.0, rs_temp_exponent=0.0, lifecycle="active", price=0.05)
    fields.update(extra)
    return make_part(**fields)


def _vf(i, T):
    """Shockley with Rs at junction temperature T [K], Is(T) by the standard law (SPEC §3)."""
    T0 = 298.15
    vt = constants.k * T / constants.e
    Is = IS * (T / T0) ** (3.0 / N) * math.exp(1.11 * constants.e / (N * constants.k) * (1 / T0 - 1 / T))
    return N * vt * math.log1p(i / Is) + i * RS


def _reference(L, R, I0, i_end, T, vz):
    def rhs(t, y):
        i = max(y[0], 0.0)
        vf = _vf(i, T) if i > 0 else 0.0
        return [-(R * i + vf + vz) / L, vf * i, i * i, i]

    stop = lambda t, y: y[0] - i_end  # noqa: E731
    stop.terminal = True
    sol = solve_ivp(rhs, [0, 10.0], [I0, 0, 0, 0], method="Radau", rtol=1e-10, atol=1e-14, events=stop)
    return sol.t_events[0][0], sol.y_events[0][0]


def _check(candidate, name):
    return next(c for c in candidate["checks"] if c["name"] == name)


def test_occasional_turn_off_matches_independent_calculation():
    req = requirement_from_toml(BASE, "valve.toml")
    out = run_check(req, [_diode()], part="FB-1")
    cand = out["candidates"][0]
    m = cand["metrics"]
    # Lowest winding resistance: −20 °C, −10 %: 72·(1 + 0.00393·(−40))·0.9 = 54.6134 Ω → I0 = 26.4/R.
    R = 72.0 * (1 + 0.00393 * (-40.0)) * 0.9
    assert R == pytest.approx(54.61344, rel=1e-6)
    I0 = 26.4 / R
    assert m["coil_current_A"] == pytest.approx(I0, rel=1e-9)
    T = 253.15
    # The release time to 0.1 A is longest where the current is highest and the drop lowest (hot diode,
    # but the hot winding carries less current): compare the cold corner, which the sheet names.
    t_ref, y = _reference(0.3, R, I0, 0.1, T, 0.0)
    _, full = _reference(0.3, R, I0, I0 * 1e-7, T, 0.0)
    assert m["diode_energy_J"] == pytest.approx(full[1], rel=5e-3)
    assert m["diode_i2t_A2s"] == pytest.approx(full[2], rel=5e-3)
    assert m["release_time_s"] >= t_ref * (1 - 5e-3)
    # switch voltage: supply max + Vf(I0) at the cold corner (the largest Vf and current), no Zener.
    assert m["switch_voltage_V"] == pytest.approx(26.4 + _vf(I0, T), rel=1e-6)
    sv = _check(cand, "switch_voltage")
    assert sv["limit"] == pytest.approx(48.0) and sv["corner"]["ambient_C"] == -20.0
    # occasional: peak against IFSM (commercial surge 100 %), I²t against IFSM²·t/2.
    peak = _check(cand, "peak_current")
    assert peak["value"] == pytest.approx(I0) and peak["limit"] == pytest.approx(30.0)
    surge = _check(cand, "surge")
    assert surge["limit"] == pytest.approx(30.0**2 * 8.3e-3 / 2)
    assert "power" not in [c["name"] for c in cand["checks"]]  # no average power for occasional switching
    assert cand["passed"] is True


def test_pulse_heating_follows_square_root_law():
    req = requirement_from_toml(BASE, "valve.toml")
    cand = run_check(req, [_diode()], part="FB-1")["candidates"][0]
    tj = _check(cand, "junction_temp")
    Ta = tj["corner"]["ambient_C"]
    T = Ta + 273.15
    supply = tj["corner"]["supply_V"]
    R = 72.0 * (1 + 0.00393 * (Ta - 20.0)) * 0.9
    I0 = supply / R
    _, full = _reference(0.3, R, I0, I0 * 1e-7, T, 0.0)
    P = _vf(I0, T) * I0
    t = full[1] / P
    rise = P * 75.0 * min(1.0, math.sqrt(t / 0.3))
    assert tj["value"] == pytest.approx(Ta + rise, rel=5e-3)
    # Without tau_th_s the steady RthJA (conservative), and the sheet says so.
    cand = run_check(req, [_diode(tau_th_s=None)], part="FB-1")["candidates"][0]
    tj2 = _check(cand, "junction_temp")
    assert tj2["value"] > tj["value"] and "conservative" in tj2["note"]


def test_zener_speeds_release_and_raises_switch_voltage():
    diode = run_check(requirement_from_toml(BASE + "max_release_s = 0.004\n", "v.toml"), [_diode()])
    zener = run_check(requirement_from_toml(ZENER, "v.toml"), [_diode()])
    d, z = diode["candidates"][0], zener["candidates"][0]
    assert "release_time" in d["failed_checks"]
    # One event: the Zener's mean power while the coil decays is held to its steady rating — conservative,
    # and the sheet says so (a Zener's ms pulse rating is higher).
    assert z["failed_checks"] == ["zener_power"]
    assert "surge curve" in _check(z, "zener_power")["note"]
    rel = _check(z, "release_time")
    assert rel["corner"]["zener_end"] == "low"  # the slowest release is at the low Vz end
    sv = _check(z, "switch_voltage")
    assert sv["corner"]["zener_end"] == "high" and sv["corner"]["supply_V"] == 26.4
    Ta = sv["corner"]["ambient_C"]
    R = 72.0 * (1 + 0.00393 * (Ta - 20.0)) * 0.9
    assert sv["value"] == pytest.approx(26.4 + _vf(26.4 / R, Ta + 273.15) + 15.0 * 1.05, rel=1e-6)
    # The release at the low end against time stepping with Vz = 14.25 V.
    Ta = rel["corner"]["ambient_C"]
    R = 72.0 * (1 + 0.00393 * (Ta - 20.0)) * 0.9
    t_ref, _ = _reference(0.3, R, rel["corner"]["supply_V"] / R, 0.1, Ta + 273.15, 14.25)
    assert rel["value"] == pytest.approx(t_ref, rel=5e-3)


def test_repetitive_switching_checks_average_power_and_ifrm():
    out = run_check(requirement_from_toml(REPETITIVE, "v.toml"), [_diode(), _diode("FB-2", ifrm_A=None)])
    by = {c["part_number"]: c for c in out["candidates"]}
    names = [c["name"] for c in by["FB-1"]["checks"]]
    assert "power" in names and "zener_power" in names and "surge" not in names
    peak = _check(by["FB-1"], "peak_current")
    assert peak["limit"] == pytest.approx(0.8 * 10.0)  # commercial: 80 % of IFRM
    # Without IFRM the average current against IF(AV), and the peak said "not rated".
    peak2 = _check(by["FB-2"], "peak_current")
    assert "not rated" in peak2["note"] and peak2["value"] < 0.1
    zp = _check(by["FB-1"], "zener_power")
    assert zp["limit"] == pytest.approx(0.6 * 1.3)  # commercial Zener power 60 % of zener_pd_W
    # 5 Hz at 50 %: the coil decays fully in 100 ms off-time, so the average Zener power is 5 × energy.
    assert by["FB-1"]["metrics"]["zener_power_W"] == pytest.approx(5.0 * by["FB-1"]["metrics"]["zener_energy_J"],
                                                                    rel=1e-6)


def test_recovery_applies_when_current_flows_at_turn_on():
    fast = ZENER.replace('clamp = "diode_zener"\nzener_V = 15.0\nzener_pd_W = 1.3\nmax_release_s = 0.004\n', "")
    fast += "switching_hz = 2000.0\nduty_pct = 50.0\n"
    out = run_check(requirement_from_toml(fast, "v.toml"), [_diode(), _diode("SLOW", trr_s=40e-6, qrr_C=5e-6)])
    by = {c["part_number"]: c for c in out["candidates"]}
    rec = _check(by["FB-1"], "recovery")
    assert rec["limit"] == pytest.approx(0.05 / 2000.0)  # 5 % of the period (common practice)
    assert rec["passed"]
    assert "recovery" in by["SLOW"]["failed_checks"]
    # Qrr·Vs·f: 5 µC · 26.4 V · 2 kHz = 0.264 W in the switch.
    assert by["SLOW"]["metrics"]["recovery_loss_W"] == pytest.approx(5e-6 * 26.4 * 2000.0)


def test_missing_model_is_data_missing():
    out = run_check(requirement_from_toml(BASE, "v.toml"), [_diode(is_A=None, n=None, rs_ohm=None,
                                                                   model_source=None)])
    cand = out["candidates"][0]
    dm = _check(cand, "data_missing")
    assert "is_A" in dm["reason"] and not cand["passed"]
    assert cand["metrics"]["coil_current_A"] is None


def test_high_reliability_surge_limit_on_the_peak_and_its_square_on_i2t():
    text = BASE.replace('policy = "commercial"', 'policy = "high_reliability"')
    cand = run_check(requirement_from_toml(text, "v.toml"), [_diode()])["candidates"][0]
    assert _check(cand, "peak_current")["limit"] == pytest.approx(15.0)
    assert _check(cand, "surge")["limit"] == pytest.approx(0.25 * 30.0**2 * 8.3e-3 / 2)


@pytest.mark.parametrize(("text", "pattern"), [
    (BASE.replace("inductance_H = 0.3", "inductance_H = 0"), r"line 10: coil\.inductance_H: 0 is out of range"),
    (BASE.replace("inductance_H = 0.3", 'inductance_H = "0.3 H"'), r"coil\.inductance_H: '0.3 H' is not a number"),
    (BASE.replace("resistance_ohm = 72.0", "resistance_ohm = -1"), r"line 11: coil\.resistance_ohm: -1"),
    (BASE + "resistance_tol_pct = 60\n", r"coil\.resistance_tol_pct: 60 is out of range"),
    (BASE.replace("switch_max_V = 60.0", "switch_max_V = 0"), r"coil\.switch_max_V: 0 is out of range"),
    (BASE + "switch_limit_pct = 120\n", r"coil\.switch_limit_pct: 120 is out of range"),
    (BASE + "switching_hz = -5\n", r"coil\.switching_hz: -5 must not be negative"),
    (BASE + "switching_hz = 100\n", r"coil\.switching_hz: 100 Hz needs duty_pct"),
    (BASE + "duty_pct = 50\n", r"coil\.duty_pct: is given with switching_hz = 0"),
    (BASE + "switching_hz = 100\nduty_pct = 100\n", r"coil\.duty_pct: 100 % leaves no off-time"),
    (BASE.replace("dropout_A = 0.1", "dropout_A = 0"), r"coil\.dropout_A: 0 is out of range"),
    (BASE.replace("dropout_A = 0.1\n", "") + "max_release_s = 0.01\n", r"coil\.max_release_s: needs dropout_A"),
    (BASE + "max_release_s = 0\n", r"coil\.max_release_s: 0 is out of range"),
    (BASE + 'clamp = "zener"\n', r"coil\.clamp: 'zener' is not one of diode, diode_zener"),
    (BASE + 'clamp = "diode_zener"\nzener_pd_W = 1.0\n', r"coil\.clamp: 'diode_zener' needs zener_V"),
    (BASE + 'clamp = "diode_zener"\nzener_V = 15.0\n', r"coil\.clamp: 'diode_zener' needs zener_pd_W"),
    (BASE + "zener_V = 15.0\n", r"coil\.zener_V: is given but clamp is 'diode'"),
    (BASE + "zener_tol_pct = 2\n", r"coil\.zener_tol_pct: is given but clamp is 'diode'"),
    (ZENER + "zener_tol_pct = 80\n", r"coil\.zener_tol_pct: 80 is out of range"),
    (ZENER.replace("zener_pd_W = 1.3", "zener_pd_W = 0"), r"coil\.zener_pd_W: 0 is out of range"),
    (BASE + "inductanse_H = 1\n", r"unknown key in \[coil\] \(did you mean 'inductance_H'\?\)"),
    (BASE.replace("inductance_H = 0.3\n", ""), r"\[coil\] required key 'inductance_H' is missing"),
    (BASE.split("[coil]")[0], r"role 'inductive_clamp' needs an \[coil\] table"),
    (BASE.replace("ambient_min_C", "load_max_A = 1.0\nambient_min_C"),
     r"load_max_A: role 'inductive_clamp' does not use this key: a coil clamp has no load current"),
    (BASE.replace("supply_min_V = 21.6\n", ""), r"required key 'supply_min_V' is missing"),
])
def test_bad_coil_input_is_refused(text, pattern):
    with pytest.raises(InputError, match=pattern):
        requirement_from_toml(text, "valve.toml")


def test_bad_coil_input_exits_2(tmp_path, capsys):
    from partpick.cli import main

    bad = tmp_path / "bad.toml"
    bad.write_text(BASE.replace("inductance_H = 0.3", "inductance_H = -0.3"), encoding="utf-8")
    assert main(["check", str(bad), "--library", str(tmp_path / "none.sqlite")]) == 2
    assert "coil.inductance_H" in capsys.readouterr().err


def test_round_trip_and_echo():
    from partpick.checks.requirement import requirement_to_toml

    req = requirement_from_toml(REPETITIVE, "v.toml")
    assert requirement_from_toml(requirement_to_toml(req), "again.toml") == req
    echoed = req.to_dict()
    assert echoed["coil"]["resistance_tol_pct"] == 10.0 and echoed["coil"]["switch_limit_pct"] == 80.0
    assert "load_min_A" not in echoed


def test_vectorised_equals_one_by_one():
    parts = [_diode(f"FB-{k}", is_A=IS * 10**k, rth_ja_K_per_W=50.0 + 10 * k) for k in range(4)]
    req = requirement_from_toml(REPETITIVE, "v.toml")
    together = {c["part_number"]: c for c in run_check(req, parts)["candidates"]}
    for part in parts:
        alone = run_check(req, [part])["candidates"][0]
        for key, value in alone["metrics"].items():
            other = together[part["part_number"]]["metrics"][key]
            assert (value is None and other is None) or other == pytest.approx(value, rel=1e-9), key
    assert np.isfinite([c["metrics"]["junction_temp_C"] for c in together.values()]).all()
