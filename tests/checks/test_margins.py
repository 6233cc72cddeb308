"""One margin rule for every check (SPEC §4 "Margins"), against values worked out by hand.

margin = limit − value (upper limit) or value − limit (lower limit), in the check's own unit;
margin_pct = 100·margin/budget, budget = |limit|, or limit − ambient for a temperature check (the
share of the allowed rise still unused); a temperature budget ≤ 0 fails at −100 % with the reason
"ambient at or above the limit"; a zero limit gives 0 when met, −100 when not; negative fails.
Every expected number below is computed by hand in the comment beside it.
"""

from __future__ import annotations

import numpy as np
import pytest

from checks_builders import make_part
from partpick.checks.partdata import PartArrays
from partpick.checks.ranking import rank_candidates
from partpick.checks.results import NO_TEMPERATURE_BUDGET, PointTable, worst_case_check
from partpick.checks.roles.base import RoleResult

POINTS = PointTable(supply_V=np.array([12.0, 14.0]), load_A=np.array([1.0, 1.0]),
                    ambient_C=np.array([0.0, 100.0]), state=("steady", "steady"))


def test_upper_limit_margin_and_share_of_the_limit():
    # values 3 V and 4 V against 5 V: margins 2 V and 1 V; the worst is 1 V = 20 % of 5 V
    c = worst_case_check("reverse_voltage", "V", [[3.0, 4.0]], [5.0], [0, 1], "max", "test")
    assert c.margin[0] == pytest.approx(1.0, abs=1e-12)
    assert c.margin_pct[0] == pytest.approx(20.0, abs=1e-9)
    assert c.point[0] == 1 and bool(c.passed[0])


def test_lower_limit_margin_is_value_minus_limit():
    # output 10.5 V and 12 V against a minimum of 11 V: margins −0.5 V and +1 V; worst −0.5/11 = −4.545 %
    c = worst_case_check("output_min", "V", [[10.5, 12.0]], [11.0], [0, 1], "min", "test")
    assert c.margin[0] == pytest.approx(-0.5, abs=1e-12)
    assert c.margin_pct[0] == pytest.approx(-100 * 0.5 / 11.0, abs=1e-9)
    assert c.point[0] == 0 and not c.passed[0]
    entry = c.entries([0], POINTS)[0]
    assert entry["margin"] == pytest.approx(-0.5) and entry["margin_pct"] == pytest.approx(-4.545454, abs=1e-5)


def test_temperature_budget_is_the_allowed_rise_and_picks_the_worst_share():
    # limit 125 °C. Point 0: ambient 0 °C, Tj 119 °C → 6 K of a 125 K rise = 4.8 %.
    #               Point 1: ambient 100 °C, Tj 120 °C → 5 K of a 25 K rise = 20 %.
    # The smaller kelvin margin (point 1) is not the worst: point 0 has used more of its allowed rise.
    c = worst_case_check("junction_temp", "°C", [[119.0, 120.0]], [125.0], [0, 1], "max", "test",
                         ambient_C=POINTS.ambient_C)
    assert c.point[0] == 0
    assert c.margin[0] == pytest.approx(6.0, abs=1e-12)
    assert c.margin_pct[0] == pytest.approx(4.8, abs=1e-9)
    assert bool(c.passed[0])
    # per part ambients (P, K): the same numbers for a second part whose hot point sits at 110 °C:
    # Tj 120 → 5 K of 15 K = 33.3 %; point 0 as before, 4.8 % is still the worst
    c2 = worst_case_check("junction_temp", "°C", [[119.0, 120.0]] * 2, [125.0, 125.0], [0, 1], "max", "test",
                          ambient_C=np.array([[0.0, 100.0], [0.0, 110.0]]))
    assert c2.margin_pct.tolist() == pytest.approx([4.8, 4.8], abs=1e-9)


def test_temperature_check_over_its_limit():
    # ambient 25 °C, Tj 135 °C against 125 °C: −10 K of a 100 K rise = −10 %, fails
    c = worst_case_check("junction_temp", "°C", [[135.0]], [125.0], [0], "max", "test", ambient_C=[25.0])
    assert c.margin[0] == pytest.approx(-10.0) and c.margin_pct[0] == pytest.approx(-10.0)
    assert not c.passed[0] and c.reason[0] is None


@pytest.mark.parametrize(("ambient", "tj"), [(130.0, 131.0), (125.0, 125.0), (130.0, np.nan)])
def test_no_temperature_budget_fails_at_minus_100_with_its_reason(ambient, tj):
    # ambient at or above the 125 °C limit: no allowed rise, whatever Tj is (even unknown)
    c = worst_case_check("junction_temp", "°C", [[40.0, tj]], [125.0], [0, 1], "max", "test",
                         ambient_C=[25.0, ambient])
    assert c.point[0] == 1
    assert c.margin_pct[0] == -100.0
    assert not c.passed[0]
    assert c.reason[0] == NO_TEMPERATURE_BUDGET == "ambient at or above the limit"
    entry = c.entries([0], POINTS)[0]
    assert entry["margin_pct"] == -100.0 and entry["reason"] == "ambient at or above the limit"


def test_zero_limit_gives_zero_when_met_and_minus_100_when_not():
    met = worst_case_check("leakage", "A", [[0.0]], [0.0], [0], "max", "test")
    assert met.margin_pct[0] == 0.0 and met.margin[0] == 0.0 and bool(met.passed[0])
    missed = worst_case_check("leakage", "A", [[1e-3]], [0.0], [0], "max", "test")
    assert missed.margin_pct[0] == -100.0 and missed.margin[0] == pytest.approx(-1e-3) and not missed.passed[0]


def test_nan_value_is_unknown_never_shown_as_a_number():
    c = worst_case_check("forward_drop", "V", [[0.5, np.nan]], [1.0], [0, 1], "max", "test",
                         reasons=[(np.array([True]), "no model")])
    assert c.point[0] == 1  # the unknown point is the worst
    assert np.isnan(c.value[0]) and np.isnan(c.margin[0]) and np.isnan(c.margin_pct[0])
    assert not c.passed[0] and c.reason[0] == "no model"
    entry = c.entries([0], POINTS)[0]
    assert entry["value"] is None and entry["margin"] is None and entry["margin_pct"] is None


def test_headroom_compares_temperature_and_voltage_margins_like_with_like():
    # Two invented parts, each with a reverse-voltage check (30 % of its limit: 70 V of 100 V) and a Tj
    # check against 125 °C:
    #   A: Tj 115 °C at 100 °C ambient → 10 K of a 25 K rise = 40 %  (8 % of the 125 °C limit)
    #   B: Tj 100 °C at  25 °C ambient → 25 K of a 100 K rise = 25 %  (20 % of the limit)
    # A has used 60 % of its allowed rise, B 75 %: A has more headroom. Smallest margins: A 30 %
    # (its voltage), B 25 % (its Tj). Measured against |limit| (°C from an arbitrary zero) the order
    # would flip (A 8 %, B 20 %).
    parts = PartArrays([make_part(part_number="MG-A", kind="rectifier"), make_part(part_number="MG-B",
                                                                                  kind="rectifier")])
    points = PointTable(supply_V=np.array([12.0, 12.0]), load_A=np.array([1.0, 1.0]),
                        ambient_C=np.array([100.0, 25.0]), state=("steady", "steady"))
    voltage = worst_case_check("reverse_voltage", "V", [[70.0], [70.0]], [100.0, 100.0], [0], "max", "t")
    # each part's Tj at its own ambient (P, K) = (2, 1)
    tj = worst_case_check("junction_temp", "°C", [[115.0], [100.0]], [125.0, 125.0], [0], "max", "t",
                          ambient_C=np.array([[100.0], [25.0]]))
    assert tj.margin_pct.tolist() == pytest.approx([40.0, 25.0], abs=1e-9)
    result = RoleResult(points=points, checks=[voltage, tj], metrics={"forward_drop_V": np.zeros(2),
                                                                     "dissipation_W": np.zeros(2)},
                        metric_points={}, internals={})
    ranking = rank_candidates(result, parts, "headroom", {"drop": "forward_drop_V", "dissipation": "dissipation_W"})
    assert ranking.smallest_margin.tolist() == pytest.approx([30.0, 25.0], abs=1e-9)
    assert [parts.part_number[i] for i in ranking.order] == ["MG-A", "MG-B"]
