"""Invented demo data (not from any datasheet) shared by the tests in this folder."""

import copy


HOSTILE = '<script>alert("x")</script> & Co'

SCHOTTKY = {
    "part_number": "TST-S40", "kind": "schottky", "manufacturer": "Testbench Devices", "package": "SMA",
    "datasheet": "TB-0040 rev A", "vrrm_V": 40.0, "if_avg_A": 2.0, "if_ref_C": 75.0, "ifsm_A": 40.0,
    "ifsm_ms": 8.3, "pd_W": None, "pd_ref_C": None, "tj_max_C": 150.0, "rth_ja_K_per_W": 80.0, "is_A": 2e-6,
    "n": 1.3, "rs_ohm": 0.06, "rs_temp_exponent": None, "eg_eV": None, "is_temp_exponent": None,
    "model_source": "entered", "vf_points": [(0.1, 0.33), (1.0, 0.46)], "vf_max_V": 0.55, "vf_max_at_A": 1.0,
    "ir_A": 5e-4, "ir_vr_V": 40.0, "ir_t_C": 25.0, "ir_double_K": 9.0, "vz_V": None, "vz_tol_pct": None,
    "izt_A": None, "zzt_ohm": None, "izk_A": None, "zzk_ohm": None, "vz_tc_pct_per_K": None, "price": 0.05,
    "lifecycle": "active", "notes": "invented demo part",
}
RECTIFIER = dict(SCHOTTKY, part_number="TST-R100", kind="rectifier", vrrm_V=100.0, if_avg_A=2.0, is_A=5e-9,
                 n=1.9, rs_ohm=0.05, vf_points=[], vf_max_V=1.1, vf_max_at_A=1.0, ir_A=5e-6, ir_vr_V=100.0,
                 price=0.02, lifecycle="nrnd")
EVIL = dict(RECTIFIER, part_number=HOSTILE, if_avg_A=1.0, manufacturer="=HYPERLINK(\"http://x\")", package="-cmd|' /C calc'!A0",
            notes="@SUM(1+1)")
ZENER = {
    "part_number": "TST-Z51", "kind": "zener", "manufacturer": "Testbench Devices", "package": "SOD-123",
    "pd_W": 0.5, "pd_ref_C": 25.0, "tj_max_C": 150.0, "vz_V": 5.1, "vz_tol_pct": 5.0, "izt_A": 0.005,
    "zzt_ohm": 30.0, "izk_A": 0.00025, "zzk_ohm": 500.0, "vz_tc_pct_per_K": 0.02, "vf_points": [],
    "price": 0.03, "lifecycle": "active",
}

SERIES_REQ = {"name": "24 V input protection", "role": "series", "supply_min_V": 18.0, "supply_max_V": 30.0,
              "load_min_A": 0.1, "load_max_A": 1.0, "ambient_min_C": -20.0, "ambient_max_C": 70.0,
              "policy": "commercial", "objective": "balanced", "reverse_V": 30.0}
ZENER_REQ = {"name": "5 V reference", "role": "zener_shunt", "supply_min_V": 10.0, "supply_max_V": 14.0,
             "load_min_A": 0.0, "load_max_A": 0.005, "ambient_min_C": -20.0, "ambient_max_C": 70.0,
             "policy": "commercial", "objective": "balanced",
             "zener": {"target_V": 5.1, "max_regulation_error_pct": 8.0, "resistor_series": "E24",
                       "resistor_tolerance_pct": 5.0, "min_zener_current_A": None, "resistor_ohm": None}}


_LOWER_LIMITS = ("zener_current_min", "output_min")


def _check(name, value, limit, unit, margin, passed, corner, source="policy commercial", reason=None):
    # "margin" in the check's own unit (SPEC §4): limit − value, value − limit for a lower limit.
    own = None if value is None or limit is None else (value - limit if name in _LOWER_LIMITS else limit - value)
    out = {"name": name, "value": value, "limit": limit, "unit": unit, "limit_source": source,
           "margin": own, "margin_pct": margin, "passed": passed, "corner": corner}
    if reason is not None:
        out["reason"] = reason
    return out


def _corner(supply, load, ambient, state):
    return {"supply_V": supply, "load_A": load, "ambient_C": ambient, "state": state}


def series_result(first_part=SCHOTTKY):
    hot = _corner(18.0, 1.0, 70.0, "steady")
    cold = _corner(18.0, 1.0, -20.0, "cold_start")
    rev = _corner(30.0, 0.1, 70.0, "reverse")
    candidates = []
    for rank, (part, passed) in enumerate(((first_part, True), (RECTIFIER, True), (EVIL, False)), start=1):
        checks = [
            _check("forward_drop", 0.587, None, "V", None, True, cold, source="not limited"),
            _check("reverse_voltage", 30.0, 0.8 * part["vrrm_V"], "V",
                   100 * (0.8 * part["vrrm_V"] - 30.0) / (0.8 * part["vrrm_V"]),
                   30.0 <= 0.8 * part["vrrm_V"], rev),
            _check("forward_current", 1.0, 0.8 * part["if_avg_A"], "A",
                   100 * (0.8 * part["if_avg_A"] - 1.0) / (0.8 * part["if_avg_A"]), 1.0 <= 0.8 * part["if_avg_A"], hot),
            _check("power", 0.48, 0.8 * 0.97, "W", 38.1, True, hot),
            _check("junction_temp", 108.4, 125.0, "°C", 13.3, True, hot),
            _check("reverse_runaway", None, 125.0, "°C", None, passed, rev,
                   reason="no stable reverse-state Tj below the limit (thermal runaway)" if not passed else None),
        ]
        failed = [c["name"] for c in sorted(checks, key=lambda c: c["margin_pct"] if c["margin_pct"] is not None
                                            else -1e9) if not c["passed"]]
        candidates.append({
            "rank": rank, "part_number": part["part_number"], "kind": part["kind"], "package": part["package"],
            "passed": not failed, "failed_checks": failed, "checks": checks,
            "metrics": {"forward_drop_V": 0.587, "output_min_V": 17.41, "output_max_V": 29.63,
                        "dissipation_W": 0.48, "junction_temp_C": 108.4, "reverse_voltage_V": 30.0,
                        "reverse_headroom_V": part["vrrm_V"] - 30.0, "reverse_stress_pct": 3000.0 / part["vrrm_V"],
                        "leakage_A": 2.1e-3, "reverse_power_W": 0.063, "vth0_V": 0.499, "ron_ohm": 0.0884},
        })
    return {
        "partpick_version": "0.1.0",
        "requirement": copy.deepcopy(SERIES_REQ),
        "policy": {"name": "commercial", "description": "ours: reverse ≤ 80 % of VRRM",
                   "limits": {"pn": {"reverse_pct": {"value": 80.0, "source": "policy commercial"},
                                     "tj_cap_C": {"value": 125.0, "source": "policy commercial"}},
                              "schottky": {"reverse_pct": {"value": 75.0, "source": "policy commercial"}}}},
        "library": {"location": "/home/a&b/<lib>.sqlite", "content_hash": "sha256:0123abcd"},
        "candidates": candidates,
        "subject_passed": True,
    }


def zener_result():
    corner = {"supply_V": 14.0, "load_A": 0.0, "ambient_C": 70.0, "state": "steady", "vz_end": "high",
              "resistor_end": "low"}
    checks = [_check("feasible", 820.0, None, "Ω", None, True, None, source="requirement"),
              _check("zener_current_min", 0.00117, 0.00025, "A", 368.0, True,
                     dict(corner, supply_V=10.0, load_A=0.005, ambient_C=-20.0, vz_end="low", resistor_end="high")),
              _check("zener_power", 0.062, 0.6 * 0.5, "W", 79.0, True, corner),
              _check("junction_temp", 95.1, 125.0, "°C", 23.9, True, corner),
              _check("regulation_error", 9.7, 8.0, "%", -21.3, False, corner, source="requirement"),
              _check("resistor_power", 0.1, 0.6 * 0.25, "W", 33.0, True, corner)]
    return {
        "partpick_version": "0.1.0",
        "requirement": copy.deepcopy(ZENER_REQ),
        "policy": {"name": "commercial", "limits": {"zener": {"power_pct": {"value": 60.0,
                                                                            "source": "policy commercial"}}}},
        "library": {"location": "example", "content_hash": "sha256:feed"},
        "candidates": [{"rank": 1, "part_number": "TST-Z51", "kind": "zener", "package": "SOD-123",
                        "passed": False, "failed_checks": ["regulation_error"], "checks": checks,
                        "metrics": {"series_resistor_ohm": 820.0, "resistor_power_W": 0.1,
                                    "resistor_power_class_W": 0.25, "zener_current_min_A": 0.00117,
                                    "zener_current_max_A": 0.0108, "zener_power_W": 0.062,
                                    "regulation_error_pct": 9.7, "output_min_V": 4.6, "output_max_V": 5.59,
                                    "junction_temp_C": 95.1, "line_regulation_mV_per_V": 35.3,
                                    "load_regulation_mV_per_mA": -28.9}}],
        "subject_passed": False,
    }


