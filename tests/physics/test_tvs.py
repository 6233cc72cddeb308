"""TVS clamp line, surge point and pulse rating: hand calculations with stated numbers.

The part is invented (a 24 V-class unidirectional TVS): VBR 26.7…29.5 V at
IT = 1 mA, VC = 38.9 V at IPP = 15.4 A, PPP = 600 W for 10/1000 µs.
The method is the datasheet's straight clamp line through (IT, VBR max) and
(IPP, VC) (common practice). Pulse-rating scaling by t^(−1/2) and linear
derating to zero at Tj max are common practice (from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from partpick.physics.constants import T0_K, ZERO_CELSIUS_K
from partpick.physics.tvs import (breakdown_voltage_at, clamp_voltage, derated_pulse_rating, dynamic_resistance,
                                  pulse_rating_for, surge_current)

VBR_MIN, VBR_MAX, IT, VC, IPP, PPP = 26.7, 29.5, 1e-3, 38.9, 15.4, 600.0


def test_clamp_line_and_surge_point_by_hand():
    # Rd = (38.9 − 29.5)/(15.4 − 0.001) = 9.4/15.399 = 0.610429 Ω.
    rd = dynamic_resistance(VC, VBR_MAX, IPP, IT)
    assert rd == pytest.approx(0.610429, rel=1e-5)
    # A 1 kV, 42 Ω surge (the usual coupling network on a line): at VBR min the current is
    # (1000 − 26.7)/(42 + 0.610429) = 22.841 A; at VBR max (1000 − 29.5)/42.610429 = 22.776 A.
    ip_low = surge_current(1000.0, 42.0, VBR_MIN, rd)
    ip_high = surge_current(1000.0, 42.0, VBR_MAX, rd)
    assert ip_low == pytest.approx(973.3 / 42.610429, rel=1e-6)
    assert ip_high == pytest.approx(970.5 / 42.610429, rel=1e-6)
    # Clamp at VBR max: 29.5 + 0.610429·22.7761 = 43.403 V; pulse power 43.403·22.776 = 988.6 W.
    vc = clamp_voltage(VBR_MAX, rd, ip_high)
    assert vc == pytest.approx(43.4030, rel=1e-5)
    assert vc * ip_high == pytest.approx(988.55, rel=1e-4)
    # Below breakdown nothing flows.
    assert surge_current(20.0, 2.0, VBR_MIN, rd) == 0.0


def test_breakdown_temperature_coefficient():
    # +0.1 %/K: at −40 °C, 26.7·(1 − 0.1·65/100) = 24.9645 V; at 85 °C, 26.7·1.06 = 28.302 V.
    assert breakdown_voltage_at(VBR_MIN, 0.1, ZERO_CELSIUS_K - 40.0) == pytest.approx(24.9645, rel=1e-9)
    assert breakdown_voltage_at(VBR_MIN, 0.1, ZERO_CELSIUS_K + 85.0) == pytest.approx(28.302, rel=1e-9)
    assert breakdown_voltage_at(VBR_MIN, 0.1, T0_K) == pytest.approx(VBR_MIN)


def test_pulse_rating_one_point_square_root_rule():
    # 600 W at 1000 µs moved to 20 µs by t^(−1/2): 600·√50 = 4242.64 W (common practice, from memory).
    assert pulse_rating_for(20e-6, PPP, 1000e-6) == pytest.approx(600.0 * math.sqrt(50.0), rel=1e-12)
    # to 10 ms: 600/√10 = 189.74 W.
    assert pulse_rating_for(10e-3, PPP, 1000e-6) == pytest.approx(189.7367, rel=1e-6)


def test_pulse_rating_two_points_log_log():
    # 600 W at 1000 µs and 3000 W at 20 µs: k = ln(3000/600)/ln(20/1000) = −0.411409;
    # at 50 µs: 600·(0.05)^k = 600·3.42968 = 2057.8 W.
    k = math.log(5.0) / math.log(0.02)
    assert k == pytest.approx(-0.411409, rel=1e-5)
    expected = 600.0 * 0.05 ** k
    assert expected == pytest.approx(2057.8, rel=1e-4)
    assert pulse_rating_for(50e-6, PPP, 1000e-6, 3000.0, 20e-6) == pytest.approx(expected, rel=1e-12)
    # A NaN second point falls back to the one-point rule, per element.
    got = pulse_rating_for(np.array([50e-6, 50e-6]), PPP, 1000e-6, np.array([3000.0, np.nan]),
                           np.array([20e-6, np.nan]))
    assert got[1] == pytest.approx(600.0 * math.sqrt(20.0), rel=1e-12)


def test_pulse_rating_never_beyond_range():
    got = pulse_rating_for(np.array([5e-6, 10e-6, 10e-3, 20e-3]), PPP, 1000e-6)
    assert np.isnan(got[0]) and np.isnan(got[3])
    assert np.isfinite(got[1]) and np.isfinite(got[2])


def test_linear_temperature_derating():
    # 600 W, Tj max 150 °C: at 85 °C 600·65/125 = 312 W; at 25 °C and below the full 600 W; at 150 °C none.
    tj = ZERO_CELSIUS_K + 150.0
    assert derated_pulse_rating(PPP, ZERO_CELSIUS_K + 85.0, tj) == pytest.approx(312.0, rel=1e-12)
    assert derated_pulse_rating(PPP, ZERO_CELSIUS_K - 40.0, tj) == pytest.approx(600.0)
    assert derated_pulse_rating(PPP, tj, tj) == 0.0


def test_bad_input_is_refused():
    with pytest.raises(ValueError, match="VC > VBR max"):
        dynamic_resistance(29.0, 29.5, 15.4, 1e-3)
    with pytest.raises(ValueError, match="IPP > IT"):
        dynamic_resistance(38.9, 29.5, 1e-3, 1e-3)
    with pytest.raises(ValueError, match="decay_time must be > 0"):
        pulse_rating_for(0.0, PPP, 1e-3)
    with pytest.raises(ValueError, match="ideal source into an ideal clamp"):
        surge_current(100.0, 0.0, 20.0, 0.0)
