"""The shortlist's hover text shows a check's margin in its own unit beside the % (SPEC §4, §8)."""

import pytest

pytest.importorskip("PySide6")

from partpick.gui.shortlist_view import check_tooltip  # noqa: E402


def test_tooltip_margin_in_kelvin_and_share_of_the_allowed_rise():
    # Tj 108.5 °C against 125 °C at 70 °C ambient: 16.5 K of a 55 K rise = 30 % (worked by hand)
    check = {"name": "junction_temp", "passed": True, "unit": "°C", "value": 108.5, "limit": 125.0,
             "limit_source": "policy commercial: Tj max − 25 K", "margin": 16.5, "margin_pct": 30.0,
             "corner": {"supply_V": 18.0, "load_A": 1.0, "ambient_C": 70.0, "state": "steady"}}
    text = check_tooltip(check, "series")
    assert "Margin: +16.5 K (30 % of the allowed rise)" in text
    assert "(from policy commercial: Tj max − 25 K)" in text
