"""The roles against the independent brentq references over seeded grids of invented parts, extremes included."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.service import run_check
from reference_models import forward_voltage, shunt_point, steady_junction

ZERO_C = 273.15
RNG = np.random.default_rng(20261201)
SERIES_GRID = [
    dict(is_A=float(10 ** RNG.uniform(-15, -4)), n=float(RNG.uniform(1.0, 2.0)), rs_ohm=float(RNG.uniform(0, 0.5)),
         rth_ja_K_per_W=float(RNG.uniform(10, 200)), schottky=bool(RNG.random() < 0.5))
    for _ in range(24)
] + [dict(is_A=1e-15, n=1.0, rs_ohm=0.0, rth_ja_K_per_W=10.0, schottky=False),   # extremes of the grid
     dict(is_A=1e-4, n=2.0, rs_ohm=0.5, rth_ja_K_per_W=200.0, schottky=True)]


def test_series_metrics_match_brentq_over_a_grid():
    parts = []
    for i, g in enumerate(SERIES_GRID):
        parts.append(make_part(part_number=f"G{i:02d}", kind="schottky" if g["schottky"] else "rectifier",
                               vrrm_V=100.0, if_avg_A=5.0, tj_max_C=175.0, rth_ja_K_per_W=g["rth_ja_K_per_W"],
                               is_A=g["is_A"], n=g["n"], rs_ohm=g["rs_ohm"], ir_A=1e-9, ir_vr_V=100.0,
                               rs_temp_exponent=0.0))  # Rs held constant: the grid reaches 0.5 Ω at 200 K/W
    req = make_requirement(supply_min_V=5.0, supply_max_V=30.0, load_min_A=0.01, load_max_A=1.0,
                           ambient_min_C=-55.0, ambient_max_C=85.0)
    result = run_check(req, parts)
    by = {c["part_number"]: c["metrics"] for c in result["candidates"]}
    for i, g in enumerate(SERIES_GRID):
        eg, m = (0.69, 2.0) if g["schottky"] else (1.11, 3.0)  # SPEC §3 defaults per kind
        model = dict(is0=g["is_A"], n=g["n"], rs=g["rs_ohm"], eg=eg, m=m, p=0.0)
        drops, powers, tjs = [], [], []
        for load, amb in itertools.product((0.01, 1.0), (-55.0, 85.0)):
            Ta = amb + ZERO_C
            T = steady_junction(load, Ta, g["rth_ja_K_per_W"], **model)
            drops += [forward_voltage(load, Ta, **model), forward_voltage(load, T, **model)]
            powers.append(load * forward_voltage(load, T, **model))
            tjs.append(T - ZERO_C)
        got = by[f"G{i:02d}"]
        assert got["forward_drop_V"] == pytest.approx(max(drops), abs=1e-7), g
        assert got["output_min_V"] == pytest.approx(5.0 - max(drops), abs=1e-7), g
        assert got["dissipation_W"] == pytest.approx(max(powers), rel=1e-6), g
        # The reverse state (1 nA-class leakage) stays at the ambient; Tj is the forward maximum.
        assert got["junction_temp_C"] == pytest.approx(max(tjs + [85.0]), abs=1e-5), g


ZENER_GRID = [
    dict(vz=float(RNG.choice([2.7, 3.3, 4.7, 5.6, 6.8, 9.1, 12.0, 15.0])), tol=float(RNG.choice([1.0, 2.0, 5.0])),
         izt=float(RNG.choice([1e-3, 5e-3, 20e-3])), zzt=float(RNG.uniform(2, 80)), zzk_factor=float(RNG.uniform(2, 50)),
         tc=float(RNG.uniform(-0.08, 0.1)), pd=float(RNG.choice([0.25, 0.5, 1.0])))
    for _ in range(10)
]


@pytest.mark.parametrize("g", ZENER_GRID, ids=[f"Z{i}" for i in range(len(ZENER_GRID))])
def test_zener_metrics_match_brentq_over_a_grid(g):
    izk = g["izt"] * 0.05
    zzk = g["zzt"] * g["zzk_factor"]
    vs_min, vs_max, il_max = 1.5 * g["vz"] + 2.0, 2.5 * g["vz"] + 5.0, 2e-3
    # A resistor that keeps Iz well above Izk at every point (review mode: the resistor is given).
    R = round((vs_min - g["vz"] * (1 + g["tol"] / 100) - 0.2 * g["vz"]) / (il_max + 4 * izk), 1)
    part = make_part(part_number="ZG", kind="zener", vz_V=g["vz"], vz_tol_pct=g["tol"], izt_A=g["izt"],
                     zzt_ohm=g["zzt"], izk_A=izk, zzk_ohm=zzk, vz_tc_pct_per_K=g["tc"], pd_W=g["pd"], tj_max_C=175.0)
    req = make_requirement(role="zener_shunt", supply_min_V=vs_min, supply_max_V=vs_max, load_min_A=0.0,
                           load_max_A=il_max, ambient_min_C=-40.0, ambient_max_C=85.0,
                           zener=dict(target_V=g["vz"], max_regulation_error_pct=20.0, resistor_ohm=R,
                                      resistor_tolerance_pct=5.0))
    m = run_check(req, [part])["candidates"][0]["metrics"]
    rth = (175.0 - 25.0) / g["pd"]
    shape = dict(izt=g["izt"], zzt=g["zzt"], izk=izk, zzk=zzk)
    pts = []
    for vs, il, amb, ve, re in itertools.product((vs_min, vs_max), (0.0, il_max), (-40.0, 85.0), (-1, 1), (-1, 1)):
        V, Iz, Tj = shunt_point(vs, R * (1 + re * 0.05), il, amb + ZERO_C, rth, g["vz"] * (1 + ve * g["tol"] / 100),
                                g["tc"] / 100, **shape)
        pts.append((V, Iz, Tj - ZERO_C))
    assert m["zener_current_min_A"] == pytest.approx(min(p[1] for p in pts), rel=1e-6)
    assert m["zener_current_max_A"] == pytest.approx(max(p[1] for p in pts), rel=1e-6)
    assert m["output_min_V"] == pytest.approx(min(p[0] for p in pts), abs=1e-8)
    assert m["output_max_V"] == pytest.approx(max(p[0] for p in pts), abs=1e-8)
    assert m["zener_power_W"] == pytest.approx(max(p[0] * p[1] for p in pts), rel=1e-6)
    assert m["junction_temp_C"] == pytest.approx(max(p[2] for p in pts), abs=1e-5)
