"""Operating limits and "what sets the worst case" against brute force (SPEC §3a).

The references never bisect and never use the override hook: they rerun the whole check
(`partpick.checks.service.evaluate` / `run_check`) with a changed requirement or part at many
values and read pass/fail or the smallest margin off the ordinary result. The parts are invented.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.limits import AMBIENT_TOL_K, RELATIVE_TOL
from partpick.checks.partdata import PART_DEFAULTS
from partpick.checks.service import analyse_candidates, evaluate, run_check


def _series_parts():
    common = dict(ir_t_C=25.0, lifecycle="active", rs_temp_exponent=0.0)
    return [
        make_part(part_number="LS-1", kind="rectifier", package="SMB", vrrm_V=100.0, if_avg_A=3.0, tj_max_C=150.0,
                  rth_ja_K_per_W=50.0, is_A=1e-9, n=1.6, rs_ohm=0.03, ir_A=1e-6, ir_vr_V=100.0, **common),
        make_part(part_number="LS-2", kind="schottky", package="SMB", vrrm_V=40.0, if_avg_A=3.0, tj_max_C=125.0,
                  rth_ja_K_per_W=60.0, is_A=2e-6, n=1.05, rs_ohm=0.02, ir_A=2e-4, ir_vr_V=40.0, **common),
        make_part(part_number="LS-3", kind="rectifier", package="SMA", vrrm_V=50.0, if_avg_A=1.0, tj_max_C=150.0,
                  rth_ja_K_per_W=120.0, is_A=1e-9, n=1.7, rs_ohm=0.08, ir_A=5e-6, ir_vr_V=50.0, **common),
        make_part(part_number="LS-4", kind="fast_recovery", package="SMC", vrrm_V=200.0, if_avg_A=5.0,
                  tj_max_C=175.0, rth_ja_K_per_W=35.0, is_A=5e-8, n=1.9, rs_ohm=0.02, ir_A=1e-5, ir_vr_V=200.0,
                  **common),
    ]


def _series_requirement(**keys):
    base = dict(supply_min_V=11.0, supply_max_V=14.0, load_min_A=0.2, load_max_A=1.0, ambient_min_C=-20.0,
                ambient_max_C=60.0, policy="commercial")
    base.update(keys)
    return make_requirement(**base)


def _zener_parts():
    common = dict(kind="zener", package="SOD-123", vz_tol_pct=5.0, izt_A=5e-3, zzt_ohm=10.0, izk_A=0.25e-3,
                  zzk_ohm=600.0, tj_max_C=150.0)
    return [make_part(part_number="LZ-1", vz_V=5.1, vz_tc_pct_per_K=0.02, pd_W=0.5, **common),
            make_part(part_number="LZ-2", vz_V=5.1, vz_tc_pct_per_K=-0.03, pd_W=0.3, **common),
            make_part(part_number="LZ-3", vz_V=4.7, vz_tc_pct_per_K=0.0, rth_ja_K_per_W=400.0, **common)]


def _zener_requirement(**zener):
    z = dict(target_V=5.1, max_regulation_error_pct=8.0)
    z.update(zener)
    return make_requirement(role="zener_shunt", supply_min_V=9.0, supply_max_V=15.0, load_min_A=0.0,
                            load_max_A=4e-3, ambient_min_C=-20.0, ambient_max_C=70.0, policy="commercial", zener=z)


def _passes(requirement, parts) -> np.ndarray:
    ev = evaluate(requirement, parts)
    order = {n: i for i, n in enumerate(ev.parts.part_number.tolist())}
    return np.array([ev.ranking.passed[order[p["part_number"]]] for p in parts])


def _scan_edge(requirement, parts, key, coarse, fine_count=101):
    """Per part: the last passing value of an increasing scan of ``key`` (coarse, then fine), NaN if none."""
    table = np.array([_passes(dataclasses.replace(requirement, **{key: float(x)}), parts) for x in coarse])
    edges = []
    for j, part in enumerate(parts):
        ok = table[:, j]
        if not ok[0]:
            edges.append(np.nan)
            continue
        fails = np.flatnonzero(~ok)
        if not fails.size:
            edges.append(np.inf)
            continue
        k = fails[0]
        fine = np.linspace(coarse[k - 1], coarse[k], fine_count)
        fine_ok = np.array([_passes(dataclasses.replace(requirement, **{key: float(x)}), [part])[0] for x in fine])
        first_fail = np.flatnonzero(~fine_ok)[0]
        edges.append((fine[first_fail - 1], fine[1] - fine[0]))
    return edges


def _limits(requirement, parts):
    ev = evaluate(requirement, parts)
    order = [int(np.flatnonzero(ev.parts.part_number == p["part_number"])[0]) for p in parts]
    limits, sens = analyse_candidates(ev, order)
    return ev, limits, sens


def _assert_within(found, edge, absolute, relative):
    if isinstance(edge, float) and np.isnan(edge):
        assert np.isnan(found)
        return
    if isinstance(edge, float) and np.isinf(edge):
        return  # passes to the scan's end: nothing to compare
    last_pass, step = edge
    tol = max(absolute, relative * abs(last_pass))
    # Bisection ends with a passing value within tol below the true edge; the scan brackets the edge in one step.
    assert last_pass - tol - 1e-9 <= found <= last_pass + step + 1e-9


@pytest.mark.parametrize("make", ["series", "zener"])
def test_max_ambient_agrees_with_a_brute_force_scan(make):
    req, parts = (_series_requirement(), _series_parts()) if make == "series" else (_zener_requirement(),
                                                                                    _zener_parts())
    _, limits, _ = _limits(req, parts)
    if make == "zener":  # hold the chosen resistor in the scan too (review mode with that value)
        ev = evaluate(req, parts)
        chosen = {n: r for n, r in zip(ev.parts.part_number, ev.result.internals["resistor_ohm"])}
    grid = np.arange(req.ambient_min_C, 176.0, 1.0)
    for j, part in enumerate(parts):
        r = req
        if make == "zener":
            if not np.isfinite(chosen[part["part_number"]]):
                continue
            r = dataclasses.replace(req, zener=dataclasses.replace(req.zener,
                                                                   resistor_ohm=float(chosen[part["part_number"]])))
        edge = _scan_edge(r, [part], "ambient_max_C", grid[grid <= part["tj_max_C"]])[0]
        _assert_within(limits.values["max_ambient_C"][j], edge, AMBIENT_TOL_K, 0.0)
    assert np.isfinite(limits.values["max_ambient_C"]).sum() >= 2  # the test compares real edges


def test_max_load_agrees_with_a_brute_force_scan():
    req, parts = _series_requirement(), _series_parts()
    _, limits, _ = _limits(req, parts)
    grid = np.geomspace(1e-3, 10.0, 60) * req.load_max_A
    edges = _scan_edge(req, parts, "load_max_A", grid)
    for j, edge in enumerate(edges):
        _assert_within(limits.values["max_load_A"][j], edge, 0.0, RELATIVE_TOL)
    assert np.isfinite(limits.values["max_load_A"]).sum() >= 2


def test_max_rthja_agrees_with_a_brute_force_scan_of_the_design_rthja():
    # The whole check rerun with the requirement's one RthJA for every part (SPEC §3) at each value.
    req, parts = _series_requirement(), _series_parts()
    _, limits, _ = _limits(req, parts)
    for j, part in enumerate(parts):
        grid = np.geomspace(1e-3, 10.0, 60) * part["rth_ja_K_per_W"]
        edge = _scan_edge(req, [part], "rth_ja_K_per_W", grid)[0]
        _assert_within(limits.values["max_rth_ja_K_per_W"][j], edge, 0.0, RELATIVE_TOL)
    assert np.isfinite(limits.values["max_rth_ja_K_per_W"]).sum() >= 2


def test_a_failing_part_says_where_it_would_pass():
    # 75 °C ambient is too hot for some of the parts; each says how far it would hold.
    req, parts = _series_requirement(ambient_max_C=75.0), _series_parts()
    result = run_check(req, parts)
    failing = [c for c in result["candidates"] if not c["passed"]]
    assert failing
    for c in failing:
        amb = c["metrics"]["max_ambient_C"]
        if amb is not None:
            assert amb < 75.0
            assert f"would pass up to {amb:.1f} °C ambient".replace("-", "−") in c["operating_limits"]["summary"]


def test_heatsink_limit_is_the_smallest_heatsink_that_holds():
    part = make_part(part_number="HS-1", kind="rectifier", package="TO-220", vrrm_V=200.0, if_avg_A=10.0,
                     tj_max_C=175.0, rth_jc_K_per_W=2.0, rth_ja_K_per_W=60.0, is_A=1e-9, n=1.5, rs_ohm=0.01,
                     rs_temp_exponent=0.0, ir_A=1e-6, ir_vr_V=200.0)
    req = _series_requirement(load_min_A=1.0, load_max_A=5.0, thermal={"mount": "heatsink", "rth_sa_K_per_W": 4.0})
    c = run_check(req, [part])["candidates"][0]
    sa = c["metrics"]["max_rth_sa_K_per_W"]
    assert sa == pytest.approx(c["metrics"]["max_rth_ja_K_per_W"] - 2.0 - 1.0, rel=1e-12)
    # Brute force: the full check with that heatsink passes, 2 % more RthSA fails.
    assert run_check(dataclasses.replace(req, thermal=dataclasses.replace(req.thermal, rth_sa_K_per_W=sa)),
                     [part])["candidates"][0]["passed"]
    worse = dataclasses.replace(req.thermal, rth_sa_K_per_W=sa * 1.02 + 0.01)
    assert not run_check(dataclasses.replace(req, thermal=worse), [part])["candidates"][0]["passed"]


def test_board_limit_is_the_least_copper_that_holds_or_beyond_the_range():
    part = make_part(part_number="BD-1", kind="rectifier", package="DPAK", vrrm_V=200.0, if_avg_A=5.0,
                     tj_max_C=150.0, rth_ja_K_per_W=90.0, rth_ja_area_mm2=60.0, rth_ja_large_K_per_W=45.0,
                     rth_ja_large_area_mm2=650.0, is_A=1e-9, n=1.5, rs_ohm=0.02, rs_temp_exponent=0.0, ir_A=1e-6,
                     ir_vr_V=200.0)
    req = _series_requirement(load_min_A=0.5, load_max_A=1.5, thermal={"mount": "board", "copper_area_mm2": 100.0})
    c = run_check(req, [part])["candidates"][0]
    area = c["metrics"]["min_copper_area_mm2"]
    assert 60.0 / 10 < area < 650.0
    on = lambda a: run_check(dataclasses.replace(req, thermal=dataclasses.replace(req.thermal, copper_area_mm2=a)),  # noqa: E731
                             [part])["candidates"][0]["passed"]
    assert on(area * 1.0001) and not on(area * 0.97)
    # 2 A on the same part: even 650 mm² does not hold (it would need RthJA ≈ 44 K/W).
    c = run_check(dataclasses.replace(req, load_max_A=2.0), [part])["candidates"][0]
    assert c["metrics"]["min_copper_area_mm2"] is None
    assert "beyond the datasheet's range" in c["operating_limits"]["notes"]["min_copper_area_mm2"]


def _smallest(candidate):
    return min(c["margin_pct"] for c in candidate["checks"])


def _moved(value, key, sign):
    """SPEC §3a steps: +1 K for temperatures, ±1 %, and from zero a one-sided absolute step."""
    if key.endswith("_C") or key == "tj_margin_K":
        return value + sign * 1.0
    if value == 0:
        step = 0.01 if key.endswith("_pct_per_K") else 1e-3  # 0.01 %/K, 1 mA
        return step if sign > 0 else 0.0
    return value * (1 + sign * 0.01)


def _part_value(part, key):
    if part[key] is not None:
        return part[key]
    pn, schottky = PART_DEFAULTS[key]  # a field the checker defaults enters through its default
    return schottky if part["kind"] == "schottky" else pn


def _heatsink_part(**changes):
    part = make_part(part_number="HS-1", kind="rectifier", package="TO-220", vrrm_V=200.0, if_avg_A=10.0,
                     tj_max_C=175.0, rth_jc_K_per_W=2.0, rth_ja_K_per_W=60.0, is_A=1e-9, n=1.5, rs_ohm=0.01,
                     rs_temp_exponent=0.0, ir_A=1e-6, ir_vr_V=200.0)
    part.update(changes)
    return part


@pytest.mark.parametrize("make", ["series", "zener", "heatsink"])
def test_sensitivities_agree_with_finite_differences_of_two_full_runs(make):
    if make == "series":
        req, parts = _series_requirement(), _series_parts()
    elif make == "heatsink":  # the mount's own values are inputs too ([thermal].rth_sa_K_per_W, rth_cs_K_per_W)
        req = _series_requirement(load_min_A=1.0, load_max_A=5.0,
                                  thermal={"mount": "heatsink", "rth_cs_K_per_W": 1.0, "rth_sa_K_per_W": 12.0})
        parts = [_heatsink_part(), _heatsink_part(part_number="HS-2", rth_jc_K_per_W=3.5, is_A=3e-9)]
    else:  # review mode: the resistor is the requirement's, so every run holds it without the hook
        req, parts = _zener_requirement(resistor_ohm=820.0), _zener_parts()
    result = run_check(req, parts)
    compared = 0
    for candidate in result["candidates"]:
        part = next(p for p in parts if p["part_number"] == candidate["part_number"])
        entries = candidate["sensitivity"]
        assert entries is not None and len(entries) <= 5
        changes = [abs(e["margin_change_pct"]) for e in entries]
        assert changes == sorted(changes, reverse=True)
        for e in entries:
            key = e["input"]
            runs = []
            for sign in (+1, -1):
                if key in part:  # a part column
                    runs.append(run_check(req, [dict(part, **{key: _moved(_part_value(part, key), key, sign)})]))
                else:
                    table, _, name = key.rpartition(".")
                    if table:
                        sub = getattr(req, table)
                        moved = dataclasses.replace(req, **{table: dataclasses.replace(
                            sub, **{name: _moved(getattr(sub, name), name, sign)})})
                    else:
                        moved = dataclasses.replace(req, **{key: _moved(getattr(req, key), key, sign)})
                    runs.append(run_check(moved, [part]))
            central = e["step"] in ("+1 %", "+1 K")
            expected = (0.5 if central else 1.0) * (_smallest(runs[0]["candidates"][0])
                                                    - _smallest(runs[1]["candidates"][0]))
            assert e["margin_change_pct"] == pytest.approx(expected, rel=1e-6, abs=1e-9)
            compared += 1
    assert compared >= (10 if make != "heatsink" else 6)
    if make == "heatsink":
        inputs = {e["input"] for c in result["candidates"] for e in c["sensitivity"]}
        assert "thermal.rth_sa_K_per_W" in inputs


@pytest.mark.parametrize("name", ["solenoid_valve_24V_zener.toml", "surge_input_24V.toml"])
def test_clamp_roles_max_ambient_agrees_with_a_brute_force_scan(name):
    # The roles added later get their limits through the same hook (Role.evaluate with Overrides).
    from pathlib import Path

    from partpick.checks.requirement import load_requirement
    from partpick.library.store import open_library

    root = Path(__file__).resolve().parents[2]
    with open_library(root / "library.sqlite.example") as lib:
        parts = lib.list_parts()
    req = load_requirement(root / "resources" / "requirements" / name)
    ev = evaluate(req, parts)
    shown = ev.ranking.order[:4]
    chosen = [ev.parts.parts[i] for i in shown]
    _, limits, _ = _limits(req, chosen)
    grid = np.arange(req.ambient_min_C, 176.0, 1.0)
    compared = 0
    for j, part in enumerate(chosen):
        edge = _scan_edge(req, [part], "ambient_max_C", grid[grid <= part["tj_max_C"]])[0]
        _assert_within(limits.values["max_ambient_C"][j], edge, AMBIENT_TOL_K, 0.0)
        compared += np.isfinite(limits.values["max_ambient_C"][j])
    assert compared >= 1
