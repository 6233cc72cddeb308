"""Invented demo data (not from any datasheet) shared by the tests in this folder."""

SCHOTTKY = {
    "part_number": "TST-S40", "kind": "schottky", "package": "SMA", "vrrm_V": 40.0, "if_avg_A": 2.0,
    "if_ref_C": 75.0, "tj_max_C": 150.0, "rth_ja_K_per_W": 80.0, "pd_W": None, "pd_ref_C": None,
    "is_A": 2e-6, "n": 1.3, "rs_ohm": 0.06, "rs_temp_exponent": None, "eg_eV": None, "is_temp_exponent": None,
    "vf_points": [(0.1, 0.33), (1.0, 0.46)], "vf_max_V": 0.55, "vf_max_at_A": 1.0,
    "ir_A": 5e-4, "ir_vr_V": 40.0, "ir_t_C": 25.0, "ir_double_K": 9.0,
}
ZENER = {
    "part_number": "TST-Z51", "kind": "zener", "package": "SOD-123", "pd_W": 0.5, "pd_ref_C": 25.0,
    "tj_max_C": 150.0, "vz_V": 5.1, "vz_tol_pct": 5.0, "izt_A": 0.005, "zzt_ohm": 30.0, "izk_A": 0.00025,
    "zzk_ohm": 500.0, "vz_tc_pct_per_K": 0.02, "vf_points": [],
}
SERIES_REQ = {"name": "24 V input", "role": "series", "supply_min_V": 18.0, "supply_max_V": 30.0,
              "load_min_A": 0.1, "load_max_A": 1.0, "ambient_min_C": -20.0, "ambient_max_C": 70.0}
ZENER_REQ = {"name": "5 V reference", "role": "zener_shunt", "supply_min_V": 10.0, "supply_max_V": 14.0,
             "load_min_A": 0.0, "load_max_A": 0.005, "ambient_min_C": -20.0, "ambient_max_C": 70.0,
             "zener": {"target_V": 5.1, "max_regulation_error_pct": 8.0, "resistor_series": "E24",
                       "resistor_tolerance_pct": 5.0}}
ZENER_CANDIDATE = {"part_number": "TST-Z51", "metrics": {"series_resistor_ohm": 820.0}, "checks": [
    {"name": "junction_temp", "value": 95.0, "limit": 125.0, "unit": "°C", "limit_source": "policy commercial",
     "margin_pct": 24.0, "passed": True, "corner": None},
    {"name": "zener_power", "value": 0.06, "limit": 0.3, "unit": "W", "limit_source": "policy commercial",
     "margin_pct": 80.0, "passed": True, "corner": None}]}


