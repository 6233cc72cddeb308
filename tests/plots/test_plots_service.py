"""The curves agree with the checker's own numbers (partpick.checks.service.run_check) for the same part."""

import copy

import numpy as np
import pytest
from plot_data import SCHOTTKY, SERIES_REQ, ZENER, ZENER_REQ

from partpick.checks.curves import curves_for
from partpick.checks.requirement import requirement_from_dict
from partpick.checks.service import run_check

RECTIFIER = dict(SCHOTTKY, part_number="TST-R100", kind="rectifier", vrrm_V=100.0, is_A=5e-9, n=1.9, rs_ohm=0.05,
                 vf_points=[], vf_max_V=1.1, vf_max_at_A=1.0, ir_A=5e-6, ir_vr_V=100.0)


def _checks(candidate):
    return {c["name"]: c for c in candidate["checks"]}


@pytest.mark.parametrize("part", [SCHOTTKY, RECTIFIER], ids=lambda p: p["part_number"])
@pytest.mark.parametrize("policy", ["ratings_only", "commercial"])
def test_series_curves_match_the_check(part, policy):
    req = requirement_from_dict(dict(SERIES_REQ, policy=policy), "series.toml")
    result = run_check(req, [part], library={"location": "test", "content_hash": "h"})
    candidate = result["candidates"][0]
    metrics = candidate["metrics"]
    data = curves_for(req, part, candidate)
    fwd = data["forward"]
    points = fwd["points"][0]
    assert max(points["x"]) == pytest.approx(metrics["forward_drop_V"], abs=1e-12)
    steady = np.array([c["state"] == "steady" for c in points["corners"]])
    # SPEC §4: dissipation is the largest steady VF·I over the corners.
    assert max(points["x"][steady] * points["y"][steady]) == pytest.approx(metrics["dissipation_W"], rel=1e-9)
    steady_tj = [c["junction_temp_C"] for c in points["corners"] if c["state"] == "steady"]
    reverse = [c for c in data["junction_temperature"]["curves"] if c["role"] == "tj_reverse"][0]
    reverse_at_hot = np.interp(SERIES_REQ["ambient_max_C"], reverse["x"], reverse["y"])
    if metrics["junction_temp_C"] is None:
        # The checker finds reverse-state runaway at the hottest ambient: the curve has its gap there.
        assert "runaway" in _checks(candidate)["reverse_runaway"]["note"]
        assert np.isnan(reverse_at_hot)
    else:
        assert max(steady_tj) <= metrics["junction_temp_C"] + 1e-9
        # the curve's stable reverse Tj at the hottest ambient is the checker's (the sheet's note names it)
        import re

        note = _checks(candidate)["reverse_runaway"]["note"]
        stated = re.search(r"settles? at (−?[0-9.]+) °C", note)
        assert stated and float(stated.group(1).replace("−", "-")) == pytest.approx(reverse_at_hot, abs=0.06)
    assert fwd["tangent"]["vth0_V"] == pytest.approx(metrics["vth0_V"], abs=1e-12)
    assert fwd["tangent"]["ron_ohm"] == pytest.approx(metrics["ron_ohm"], rel=1e-12)
    checks = _checks(candidate)
    tj = data["junction_temperature"]
    assert tj["hlines"][0]["value"] == pytest.approx(checks["junction_temp"]["limit"])
    # The power check's share of Pallow, read back into the derating line.
    assert tj["power_fraction"] == pytest.approx(checks["power"]["limit"] / 100.0)
    # The Tj curve passes through the steady corner points at IL max (the curve is nearly straight,
    # so linear interpolation between its samples is good to well under 0.01 K).
    forward_tj = tj["curves"][0]
    for c in points["corners"]:
        if c["state"] == "steady" and c["load_A"] == 1.0:
            assert np.interp(c["ambient_C"], forward_tj["x"], forward_tj["y"]) == pytest.approx(
                c["junction_temp_C"], abs=0.01)


def test_zener_curves_match_the_check():
    zreq = dict(copy.deepcopy(ZENER_REQ), policy="commercial")
    req = requirement_from_dict(zreq, "zener.toml")
    result = run_check(req, [ZENER], library={"location": "test", "content_hash": "h"})
    candidate = result["candidates"][0]
    metrics = candidate["metrics"]
    data = curves_for(req, ZENER, candidate)
    corners = data["breakdown"]["points"][0]
    # Every corner × tolerance end the checker solved, so the extremes are the checker's.
    assert corners["x"].min() == pytest.approx(metrics["output_min_V"], abs=1e-9)
    assert corners["x"].max() == pytest.approx(metrics["output_max_V"], abs=1e-9)
    assert corners["y"].min() == pytest.approx(metrics["zener_current_min_A"], rel=1e-6)
    assert corners["y"].max() == pytest.approx(metrics["zener_current_max_A"], rel=1e-6)
    assert (corners["x"] * corners["y"]).max() == pytest.approx(metrics["zener_power_W"], rel=1e-6)
    assert max(c["junction_temp_C"] for c in corners["corners"]) == pytest.approx(metrics["junction_temp_C"],
                                                                                  abs=1e-6)
    assert data["zener_output"]["resistance_ohm"] == pytest.approx(metrics["series_resistor_ohm"])
    # Zener power limit: 60 % of Pallow under the commercial policy (SPEC §4), read back from the W limit.
    assert data["junction_temperature"]["power_fraction"] == pytest.approx(0.6)
    # The output band is the requirement's ± regulation error.
    band = data["zener_output"]["band"]
    assert (band["low"], band["high"]) == pytest.approx((5.1 * 0.92, 5.1 * 1.08))
