"""The ``ac_rectifier`` role (SPEC §4a): checks, metrics and refusals, on invented parts.

Reference values are computed here independently where the role composes
simple rules (PIV per topology, the capacitive-load derating of IF(AV), IFRM
"not rated", a package carrying four legs); the waveform itself is checked
against solve_ivp in tests/physics/test_rectifier.py.
"""

from __future__ import annotations

import json
import math

import pytest

from checks_builders import make_part
from partpick.checks.curves import curves_for
from partpick.checks.requirement import requirement_from_dict
from partpick.checks.service import run_check
from partpick.cli import main
from partpick.errors import InputError

store = pytest.importorskip("partpick.library.store")

AC = {"topology": "bridge", "vac_min_Vrms": 12.0, "vac_max_Vrms": 14.0, "frequency_Hz": 50.0, "source_ohm": 0.8,
      "capacitance_F": 2200e-6}


def _req(ac=None, **keys):
    data = dict(name="rect", role="ac_rectifier", load_min_A=0.2, load_max_A=1.0, ambient_min_C=0.0,
                ambient_max_C=50.0, ac=dict(AC, **(ac or {})))
    data.update(keys)
    return requirement_from_dict(data, "ac.toml")


def _diode(number="AC-D1", **fields):
    base = dict(part_number=number, kind="rectifier", package="SMB", vrrm_V=100.0, if_avg_A=2.0, ifsm_A=60.0,
                ifsm_ms=8.3, tj_max_C=150.0, rth_ja_K_per_W=60.0, is_A=3e-9, n=1.9, rs_ohm=0.05,
                model_source="entered", ir_A=5e-6, ir_vr_V=100.0, ir_t_C=25.0, price=0.1, lifecycle="active")
    base.update(fields)
    return make_part(**base)


def _bridge(number="AC-B1", junction="pn", **fields):
    return _diode(number, **{"kind": "bridge", "package": "SMD-4", "junction": junction, "if_avg_A": 2.0,
                             "rth_ja_K_per_W": 40.0, **fields})


def _checks(candidate):
    return {c["name"]: c for c in candidate["checks"]}


def test_checks_metrics_and_corners_of_a_bridge_package():
    result = run_check(_req(), [_bridge(ifrm_A=20.0)])
    cand = result["candidates"][0]
    checks, metrics = _checks(cand), cand["metrics"]
    assert set(checks) >= {"reverse_voltage", "forward_current", "repetitive_peak", "surge", "surge_peak", "power",
                           "junction_temp", "reverse_runaway"}
    # PIV of a bridge: √2·Vac max (SPEC §4a), against VRRM × the ratings_only limit (100 %)
    assert metrics["peak_inverse_V"] == pytest.approx(math.sqrt(2) * 14.0, rel=1e-12)
    assert checks["reverse_voltage"]["limit"] == pytest.approx(100.0)
    # a bridge's forward current is its DC output (the load) against IF(AV) less 20 % for a capacitive load
    fc = checks["forward_current"]
    assert fc["value"] == pytest.approx(1.0, rel=1e-9)
    assert fc["corner"]["load_A"] == 1.0 and "vac_Vrms" in fc["corner"] and "capacitance_F" in fc["corner"]
    assert fc["limit"] == pytest.approx(2.0 * 0.8 * (150 - fc["corner"]["ambient_C"]) / (150 - 25), rel=1e-9)
    # the package carries four legs: its power is four diodes' (at the worst corner of each)
    assert metrics["dissipation_W"] == pytest.approx(4 * metrics["diode_dissipation_W"], rel=1e-9)
    # each leg carries one pulse per period: half the load on average
    assert metrics["diode_avg_A"] == pytest.approx(0.5, rel=1e-6)
    rp = checks["repetitive_peak"]
    assert rp["limit"] == pytest.approx(20.0) and rp["value"] == pytest.approx(metrics["diode_peak_A"])
    assert metrics["switch_on_peak_A"] > metrics["diode_peak_A"]
    assert any("Mains rectifiers can kill" in c for c in result["cautions"])
    assert any("backward Euler" in m for m in result["method"])
    assert "supply_min_V" not in result["requirement"] and result["requirement"]["ac"]["capacitance_tol_pct"] == 20.0


def test_repetitive_peak_without_ifrm_is_reported_not_rated_never_a_silent_pass():
    cand = run_check(_req(), [_diode()])["candidates"][0]
    rp = _checks(cand)["repetitive_peak"]
    assert rp["limit"] is None and rp["margin_pct"] is None
    assert rp["value"] == pytest.approx(cand["metrics"]["diode_peak_A"])
    assert rp["note"].startswith("not rated") and "reason" not in rp


def test_capacitive_derating_key_and_per_diode_current_of_discrete_diodes():
    cand = run_check(_req({"capacitive_derate_pct": 50.0, "topology": "center_tap"}), [_diode()])["candidates"][0]
    fc = _checks(cand)["forward_current"]
    assert fc["value"] == pytest.approx(0.5, rel=1e-6)  # centre tap: each diode half the load
    assert fc["limit"] == pytest.approx(2.0 * 0.5 * (150 - fc["corner"]["ambient_C"]) / 125, rel=1e-9)
    assert cand["metrics"]["peak_inverse_V"] == pytest.approx(2 * math.sqrt(2) * 14.0)  # 2·√2·Vac max


def test_bridge_packages_only_for_the_bridge_topology():
    result = run_check(_req({"topology": "half_wave"}), [_bridge(), _diode()])
    assert [c["part_number"] for c in result["candidates"]] == ["AC-D1"]


def test_hot_schottky_bridge_runs_away_in_the_reverse_state():
    # An invented Schottky bridge with heavy leakage: 20 mA at 40 V and 25 °C, 60 K/W for four legs.
    leaky = _bridge("AC-SB", junction="schottky", vrrm_V=40.0, is_A=2e-6, n=1.1, ir_A=2e-2, ir_vr_V=40.0,
                    rth_ja_K_per_W=60.0, tj_max_C=125.0)
    cand = run_check(_req(ambient_max_C=70.0), [leaky])["candidates"][0]
    runaway = _checks(cand)["reverse_runaway"]
    assert runaway["passed"] is False and "runaway" in runaway["reason"]
    assert runaway["corner"]["state"] == "reverse"


def test_output_min_and_ripple_checks_and_data_missing():
    req = _req({"min_dc_V": 30.0, "max_ripple_Vpp": 0.1})
    cand = run_check(req, [_diode(ir_A=None)])["candidates"][0]
    checks = _checks(cand)
    assert checks["output_min"]["passed"] is False and checks["ripple"]["passed"] is False
    assert checks["output_min"]["value"] == pytest.approx(cand["metrics"]["dc_min_V"])
    assert "ir_A" in checks["data_missing"]["reason"] and checks["reverse_runaway"]["value"] is None


def test_curves_of_the_worst_corner():
    cand = run_check(_req(), [_bridge()])["candidates"][0]
    data = curves_for(_req(), _bridge(), cand)
    cycle, current = data["ac_cycle"], data["ac_current"]
    assert cycle["corner"] == _checks(cand)["repetitive_peak"]["corner"]
    assert current["peak_A"] == pytest.approx(cand["metrics"]["diode_peak_A"], rel=0.01)
    assert cycle["ripple_Vpp"] <= cand["metrics"]["ripple_Vpp"] * (1 + 1e-6)
    assert data["forward"]["band"]["high"] == pytest.approx(current["peak_A"], rel=0.01)
    assert data["junction_temperature"] is not None and data["power"] is not None


@pytest.mark.parametrize(("change", "pattern"), [
    ({"ac": {"topology": "full"}}, r"ac\.topology: 'full' is not one of bridge, center_tap, half_wave"),
    ({"ac": {"vac_min_Vrms": 15.0}}, r"ac\.vac_min_Vrms: 15 V is above vac_max_Vrms"),
    ({"ac": {"source_ohm": 0.0}}, r"ac\.source_ohm: 0 is out of range"),
    ({"ac": {"capacitance_F": "2200 uF"}}, r"ac\.capacitance_F: '2200 uF' is not a number"),
    ({"ac": {"capacitance_tol_pct": 120.0}}, r"ac\.capacitance_tol_pct: 120 is out of range"),
    ({"ac": {"frequncy_Hz": 50.0}}, r"unknown key in \[ac\] \(did you mean 'frequency_Hz'\?\)"),
    ({"supply_min_V": 12.0}, r"supply_min_V: role 'ac_rectifier' does not use this key: .*vac_min_Vrms"),
    ({"min_output_V": 12.0}, r"min_output_V: role 'ac_rectifier' does not use this key: use \[ac\] min_dc_V"),
])
def test_bad_ac_input_is_refused_naming_the_key(change, pattern):
    with pytest.raises(InputError, match=pattern):
        _req(**{k: v for k, v in change.items() if k != "ac"}, ac=change.get("ac"))


AC_TOML = """\
name = "rect"
role = "ac_rectifier"
load_min_A = 0.2
load_max_A = 1.0
ambient_min_C = 0.0
ambient_max_C = 50.0

[ac]
topology = "bridge"
vac_min_Vrms = 12.0
vac_max_Vrms = 14.0
frequency_Hz = 50.0
source_ohm = 0.8
capacitance_F = 2200e-6
"""


@pytest.mark.parametrize(("old", "new", "message"), [
    ("source_ohm = 0.8", "source_ohm = -1", "bad.toml, line 13: ac.source_ohm: -1 is out of range"),
    ('topology = "bridge"', 'topology = "fullwave"', "bad.toml, line 9: ac.topology: 'fullwave' is not one of"),
    ("frequency_Hz = 50.0", "", "bad.toml: [ac] required key 'frequency_Hz' is missing"),
    ("load_min_A = 0.2", "supply_min_V = 12.0", "bad.toml, line 3: supply_min_V: role 'ac_rectifier' does not use"),
])
def test_cli_refuses_bad_ac_input_with_exit_2_and_one_line(tmp_path, capsys, old, new, message):
    lib = tmp_path / "lib.sqlite"
    with store.open_library(lib, create=True) as library:
        library.save_part(_diode())
    bad = tmp_path / "bad.toml"
    bad.write_text(AC_TOML.replace(old, new), encoding="utf-8")
    assert main(["check", str(bad), "--library", str(lib)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and message in err


def test_cli_table_and_html_carry_the_mains_caution(tmp_path, capsysbinary):
    lib = tmp_path / "lib.sqlite"
    with store.open_library(lib, create=True) as library:
        library.save_part(_diode())
    good = tmp_path / "good.toml"
    good.write_text(AC_TOML, encoding="utf-8")
    assert main(["check", str(good), "--library", str(lib)]) in (0, 3)
    out = capsysbinary.readouterr().out.decode("utf-8")
    assert "CAUTION: Mains rectifiers can kill" in out and "DC min" in out
    html = tmp_path / "r.html"
    assert main(["check", str(good), "--library", str(lib), "--format", "html", "--output", str(html)]) in (0, 3)
    text = html.read_text(encoding="utf-8")
    assert "Mains rectifiers can kill" in text and "Method and assumptions" in text and "AC cycle" in text
    assert main(["check", str(good), "--library", str(lib), "--format", "csv"]) in (0, 3)
    header = capsysbinary.readouterr().out.decode("utf-8").splitlines()[0]
    assert "dc_min_V" in header and "switch_on_i2t_A2s" in header


def test_curves_of_several_parts_in_one_solve_equal_one_by_one():
    from partpick.checks.curves import curves_for_many

    parts = [_bridge(), _diode(), _bridge("AC-B2", is_A=2e-8, rs_ohm=0.1)]
    result = run_check(_req(), parts)
    by_number = {c["part_number"]: c for c in result["candidates"]}
    cands = [by_number[p["part_number"]] for p in parts if p["part_number"] in by_number]
    kept = [p for p in parts if p["part_number"] in by_number]
    many = curves_for_many(_req(), kept, cands)
    for part, cand, got in zip(kept, cands, many):
        one = curves_for(_req(), part, cand)
        for section in ("ac_current", "forward", "junction_temperature"):
            assert got[section]["title"] == one[section]["title"]
            for a, b in zip(got[section]["curves"], one[section]["curves"]):
                assert a["y"] == pytest.approx(b["y"], rel=0.01, abs=1e-6), (section, a["label"])


def test_a_load_the_source_cannot_supply_is_a_reason_not_a_crash():
    # 14 V rms behind 100 Ω delivers at most ~0.1 A into a short: a 1 A load has no steady state.
    result = run_check(_req({"source_ohm": 100.0}), [_bridge(ifrm_A=20.0)])
    text = json.dumps(result, allow_nan=False)  # no NaN anywhere
    cand = result["candidates"][0]
    assert cand["passed"] is False
    fc = _checks(cand)["forward_current"]
    assert fc["value"] is None and "cannot supply the load" in fc["reason"]
    assert "cannot supply the load" in _checks(cand)["junction_temp"]["reason"]
    assert cand["metrics"]["dc_min_V"] is None and "NaN" not in text
