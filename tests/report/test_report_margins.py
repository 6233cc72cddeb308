"""Margins in every output: the check's own unit beside the %, one wording (SPEC §4 "Margins", §8).

The check dicts are written by hand to SPEC §5's keys; each margin is worked out by hand beside it.
"""

import csv
import io

import pytest
from report_data import SERIES_REQ

from partpick.report import render
from partpick.report.plain import check_sheet_lines
from partpick.report.review import check_sheet_html
from partpick.report.words import margin_text

HOT = {"supply_V": 18.0, "load_A": 1.0, "ambient_C": 70.0, "state": "steady"}


def _tj(value, limit=125.0, ambient=70.0, reason=None):
    # Hand-computed: margin = limit − value [K]; % = 100·margin/(limit − ambient), the allowed rise.
    margin = limit - value
    budget = limit - ambient
    pct = -100.0 if budget <= 0 else 100.0 * margin / budget
    out = {"name": "junction_temp", "value": value, "limit": limit, "unit": "°C", "limit_source": "policy commercial",
           "margin": margin, "margin_pct": pct, "passed": margin >= 0 and budget > 0,
           "corner": dict(HOT, ambient_C=ambient)}
    if reason:
        out["reason"] = reason
    return out


def test_temperature_margin_in_kelvin_and_share_of_the_allowed_rise():
    # Tj 108.5 °C, limit 125 °C, ambient 70 °C: margin 16.5 K of a 55 K rise = 30 %.
    assert margin_text(_tj(108.5)) == "+16.5 K (30 % of the allowed rise)"
    # over the limit: 130 °C → −5.00 K, −5/55 = −9.1 %
    assert margin_text(_tj(130.0)) == "−5.00 K (−9.1 % of the allowed rise)"


def test_a_temperature_check_without_a_budget_says_why():
    # ambient 130 °C above a 125 °C limit: no allowed rise, −100 % (SPEC §4)
    text = margin_text(_tj(131.0, ambient=130.0, reason="ambient at or above the limit"))
    assert text == "−6.00 K (−100 % of the allowed rise: ambient at or above the limit)"


def test_voltage_current_power_margins_are_shares_of_the_limit():
    # reverse voltage 12.8 V against 16 V: +3.2 V, 3.2/16 = 20 %
    v = {"name": "reverse_voltage", "unit": "V", "value": 12.8, "limit": 16.0, "margin": 3.2, "margin_pct": 20.0,
         "corner": HOT}
    assert margin_text(v) == "+3.20 V (20 %)"
    # a lower limit (output_min): 10.5 V against 11 V minimum → −0.5 V, −0.5/11 = −4.5 %
    low = {"name": "output_min", "unit": "V", "value": 10.5, "limit": 11.0, "margin": -0.5,
           "margin_pct": 100 * -0.5 / 11.0, "corner": HOT}
    assert margin_text(low) == "−500 mV (−4.5 %)"
    # power in % of Pallow: 58 against 100 → +42 % of Pallow, 42 %
    p = {"name": "power", "unit": "% of Pallow", "value": 58.0, "limit": 100.0, "margin": 42.0, "margin_pct": 42.0,
         "corner": HOT}
    assert margin_text(p) == "+42.0 % of Pallow (42 %)"


def test_a_temperature_margin_on_another_basis_is_not_called_a_share_of_the_rise():
    # A °C check whose % is the share of |limit| (not of limit − ambient) gets no "allowed rise" words.
    c = {"name": "reverse_runaway", "unit": "°C", "value": 87.0, "limit": 150.0, "margin": 63.0,
         "margin_pct": 42.0, "corner": dict(HOT, state="reverse", ambient_C=85.0)}
    assert margin_text(c, "ac_rectifier") == "+63.0 K (42 %)"
    # the series runaway's % is the share of the thermal resistance unused (SPEC §4)
    c["margin_pct"] = 30.0
    assert margin_text(c, "series") == "+63.0 K (30 % of the thermal resistance unused)"


def test_unknown_margin_is_a_dash():
    assert margin_text({"name": "leakage", "unit": "A", "value": None, "margin": None, "margin_pct": None}) == "—"


def _candidate():
    checks = [_tj(108.5), {"name": "reverse_voltage", "unit": "V", "value": 12.8, "limit": 16.0, "margin": 3.2,
                           "margin_pct": 20.0, "passed": True, "corner": HOT,
                           "limit_source": "policy commercial: 80 % of VRRM"}]
    return {"rank": 1, "part_number": "TST-S40", "kind": "schottky", "package": "SMA", "passed": True,
            "failed_checks": [], "checks": checks, "metrics": {}}


def test_text_check_sheet_and_html_sheet_use_the_same_words():
    cand = _candidate()
    text = "\n".join(check_sheet_lines(cand, "series"))
    html_text = check_sheet_html(cand, {}, "series")
    for expected in ("+16.5 K (30 % of the allowed rise)", "+3.20 V (20 %)"):
        assert expected in text
        assert expected in html_text
    # and each limit says where it came from
    assert "policy commercial: 80 % of VRRM" in text and "policy commercial: 80 % of VRRM" in html_text


def test_csv_carries_margin_limit_and_its_source(parts_by_number):
    result = {"partpick_version": "0", "requirement": dict(SERIES_REQ), "policy": {}, "library": {},
              "candidates": [_candidate()]}
    rows = list(csv.DictReader(io.StringIO(render(result, "csv", parts_by_number=parts_by_number,
                                                  requirement=SERIES_REQ).decode("utf-8"))))
    row = rows[0]
    assert float(row["junction_temp_margin"]) == pytest.approx(16.5)
    assert float(row["junction_temp_margin_pct"]) == pytest.approx(100 * 16.5 / 55)
    assert float(row["reverse_voltage_margin"]) == pytest.approx(3.2)
    assert float(row["reverse_voltage_limit"]) == pytest.approx(16.0)
    assert row["reverse_voltage_limit_source"] == "policy commercial: 80 % of VRRM"


def test_table_says_where_each_limit_came_from(parts_by_number):
    policy = {"name": "commercial", "limits": {"pn": {
        "reverse_pct": {"value": 80.0, "unit": "%", "source": "policy commercial"},
        "current_pct": {"value": 60.0, "unit": "%", "source": "requirement current_limit_pct"},
        "tj_cap_C": {"value": None, "unit": "°C", "source": "policy commercial"}}}}
    result = {"partpick_version": "0", "requirement": dict(SERIES_REQ), "policy": policy, "library": {},
              "candidates": [_candidate()]}
    text = render(result, "table", parts_by_number=parts_by_number, requirement=SERIES_REQ).decode("utf-8")
    assert "  pn, policy commercial: reverse_pct 80 %, tj_cap_C none" in text
    assert "  pn, requirement current_limit_pct: current_pct 60 %" in text
    html_text = render(result, "html", parts_by_number=parts_by_number, requirement=SERIES_REQ).decode("utf-8")
    assert "requirement current_limit_pct" in html_text
