"""Curves of the coil and surge clamps: the same numbers as the check (SPEC §2: the window shows the JSON's)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from partpick.checks.curves import curves_for
from partpick.checks.requirement import load_requirement
from partpick.checks.service import run_check
from partpick.library.store import open_library

ROOT = Path(__file__).resolve().parents[2]
REQS = ROOT / "resources" / "requirements"


@pytest.fixture(scope="module")
def parts():
    with open_library(ROOT / "library.sqlite.example") as lib:
        return {p["part_number"]: p for p in lib.list_parts()}


@pytest.mark.parametrize("name", ["solenoid_valve_24V_diode", "solenoid_valve_24V_zener"])
def test_coil_curves_match_the_check(parts, name):
    req = load_requirement(REQS / f"{name}.toml")
    cand = run_check(req, list(parts.values()), part="TCF1-200")["candidates"][0]
    curves = curves_for(req, parts["TCF1-200"], cand)
    current, voltage = curves["coil_current"], curves["switch_voltage"]
    labels = [c["label"] for c in current["curves"]]
    assert labels[0] == "diode only" and (len(labels) == 2) == ("zener" in name)
    for c in current["curves"] + voltage["curves"]:
        assert np.isfinite(c["x"]).all() and np.isfinite(c["y"]).all()
        assert np.all(np.diff(c["x"]) >= 0)            # time runs forward
    for c in current["curves"]:
        assert np.all(np.diff(c["y"]) <= 0)             # the current only decays
    m = cand["metrics"]
    # Drawn at supply max and the coldest ambient: the check's largest turn-off current and switch voltage.
    assert current["curves"][-1]["y"][0] == pytest.approx(m["coil_current_A"], rel=1e-9)
    assert max(c["y"].max() for c in voltage["curves"]) == pytest.approx(m["switch_voltage_V"], rel=1e-9)
    if "zener" in name:
        # The Zener curve reaches the drop-out current sooner than the diode alone.
        release = current["points"][0]["x"]
        assert release[1] < release[0]
        assert release[1] <= m["release_time_s"] * (1 + 1e-9)


def test_surge_curves_match_the_check(parts):
    req = load_requirement(REQS / "surge_input_24V.toml")
    cand = run_check(req, list(parts.values()), part="TCT15-30U")["candidates"][0]
    curves = curves_for(req, parts["TCT15-30U"], cand)
    m = cand["metrics"]
    points = curves["clamp_line"]["points"][0]
    assert points["x"].max() == pytest.approx(m["surge_current_A"], rel=1e-9)
    assert points["y"].max() == pytest.approx(m["clamp_voltage_V"], rel=1e-9)
    rating = curves["pulse_rating"]
    assert rating["points"][1]["y"][0] == pytest.approx(m["pulse_power_W"], rel=1e-9)
    derated = next(c for c in rating["curves"] if c["label"].startswith("derated"))
    at = np.argmin(np.abs(derated["x"] - 20e-6))
    assert derated["y"][at] == pytest.approx(m["pulse_rating_W"], rel=0.05)  # nearest sample to 20 µs
    assert rating["log_x"] and rating["log_y"]
