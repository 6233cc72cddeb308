"""Fixtures for the checker tests."""

from __future__ import annotations

import pytest

from checks_builders import make_part


@pytest.fixture
def silicon_part():
    """An invented silicon rectifier with round-number model parameters."""
    # rs_temp_exponent = 0: an Rs that does not change with temperature, so the hand figures stay short
    return make_part(part_number="TR-1", kind="rectifier", package="SMA", vrrm_V=100.0, if_avg_A=2.0,
                     tj_max_C=150.0, rth_ja_K_per_W=50.0, is_A=1e-12, n=1.0, rs_ohm=0.05, rs_temp_exponent=0.0,
                     ir_A=1e-6, ir_vr_V=100.0, ir_t_C=25.0, price=0.10, lifecycle="active")
