"""The thermal path: board copper in ln(area), heatsink stack, reference points (SPEC §3a).

JEDEC JESD51 (from memory) defines the standard test boards and still-air conditions under which a
datasheet RthJA is measured: it is the source of the caution that a datasheet RthJA is a test-board
figure, not of any number below. The numbers here are stated and worked by hand.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from partpick.physics.thermal_path import (allowed_power_at, board_thermal_resistance,
                                           copper_area_for_thermal_resistance, heatsink_for_thermal_resistance,
                                           heatsink_thermal_resistance, rated_path_resistance, reference_temperature)

# A stated datasheet pair (invented): 80 K/W on 100 mm², 40 K/W on 1000 mm² of copper.
A1, R1, A2, R2 = 100.0, 80.0, 1000.0, 40.0


def test_board_rthja_by_hand_between_the_two_areas():
    # Hand calculation: R(A) = R1 + (R2 − R1)·ln(A/A1)/ln(A2/A1).
    # 200 mm²: 80 − 40·ln 2/ln 10 = 80 − 40·0.30103 = 67.959 K/W.
    r, extrapolated = board_thermal_resistance(200.0, A1, R1, A2, R2)
    assert r == pytest.approx(67.959, abs=1e-3)
    assert extrapolated is False
    # The geometric mean of the two areas (316.23 mm²) lies half way in ln(area): 60 K/W.
    r, _ = board_thermal_resistance(math.sqrt(A1 * A2), A1, R1, A2, R2)
    assert r == pytest.approx(60.0, rel=1e-12)


def test_board_rthja_extrapolated_below_and_flat_above():
    # 50 mm²: the line extended, 80 + 40·0.30103 = 92.041 K/W, flagged.
    r, extrapolated = board_thermal_resistance(50.0, A1, R1, A2, R2)
    assert r == pytest.approx(92.041, abs=1e-3)
    assert extrapolated is True
    # Above the larger area the datasheet says nothing: held at 40 K/W.
    r, extrapolated = board_thermal_resistance(5000.0, A1, R1, A2, R2)
    assert r == pytest.approx(40.0)
    assert extrapolated is False


def test_copper_area_inverts_the_board_line():
    areas = np.geomspace(20.0, 1000.0, 41)
    r, _ = board_thermal_resistance(areas, A1, R1, A2, R2)
    back, below = copper_area_for_thermal_resistance(r, A1, R1, A2, R2)
    np.testing.assert_allclose(back, areas, rtol=1e-10)
    np.testing.assert_array_equal(below, areas < A1)
    # 60 K/W needs the geometric mean; 30 K/W is beyond the datasheet's range (more copper is not known to help).
    assert copper_area_for_thermal_resistance(60.0, A1, R1, A2, R2)[0] == pytest.approx(316.228, abs=1e-3)
    assert math.isinf(copper_area_for_thermal_resistance(30.0, A1, R1, A2, R2)[0])


def test_board_line_refuses_contradictory_points():
    with pytest.raises(ValueError, match="large_area"):
        board_thermal_resistance(100.0, 100.0, 80.0, 50.0, 40.0)
    with pytest.raises(ValueError, match="large_resistance"):
        board_thermal_resistance(100.0, 100.0, 40.0, 1000.0, 80.0)


def test_heatsink_stack_by_hand():
    # RthJC 1.5 + RthCS 1.0 (pad) + RthSA 3.0 = 5.5 K/W; at 50 °C ambient and Tj max 150 °C:
    # Pallow = (150 − 50)/5.5 = 18.18 W.
    r = heatsink_thermal_resistance(1.5, 1.0, 3.0)
    assert r == pytest.approx(5.5)
    assert allowed_power_at(323.15, 423.15, r) == pytest.approx(100.0 / 5.5, rel=1e-12)
    assert allowed_power_at(430.0, 423.15, r) == 0.0
    # The smallest heatsink for RthJA ≤ 8 K/W: 8 − 1.5 − 1.0 = 5.5 K/W.
    assert heatsink_for_thermal_resistance(8.0, 1.5, 1.0) == pytest.approx(5.5)


def test_reference_point_temperature_and_rated_path():
    # Tj 120 °C, 2 W through RthJL 15 K/W: the lead sits at 90 °C.
    assert reference_temperature(393.15, 2.0, 15.0) == pytest.approx(363.15)
    # Pd 5 W rated at a lead of 75 °C, Tj max 175 °C: RthJL = 100/5 = 20 K/W (never an RthJA).
    assert rated_path_resistance(5.0, 448.15, 348.15) == pytest.approx(20.0)
